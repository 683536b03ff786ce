import { useMemo, useState } from "react";
import { z } from "zod";
import { Link } from "react-router";
import { Button } from "../../../components/button";
import { TextArea, TextField } from "../../../components/field";
import { can } from "../../../domain/permissions";
import { HOLD_STATE_LABELS, type HoldPoint } from "../../../domain/rts-gate";
import type { Role } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import {
  RELEASE_REASON_MIN,
  patchStepBody,
  signBody,
  type RtsStage,
  type RtsStep,
} from "../../../schemas/return-to-service";
import { useRtsAction } from "../api";
import { stamp as when } from "../../../lib/clock";

const STATE_MARK: Record<HoldPoint["state"], string> = {
  met: "✔",
  released: "⚑",
  ready: "○",
  blocked: "✖",
  waiting: "…",
};
const STATE_CLASS: Record<HoldPoint["state"], string> = {
  met: "border-kelp-400",
  released: "border-flare-400 bg-flare-700/30",
  ready: "border-brass-400",
  blocked: "border-rust-400",
  waiting: "border-hull-600",
};

/** The hold point's words → the request body; patchStepBody (the server's own schema) validates it. */
const stepForm = (version: number) =>
  z
    .object({ title: z.string(), detail: z.string() })
    .transform((v) => ({ ...v, version }) as z.input<typeof patchStepBody>)
    .pipe(patchStepBody);

/** Edits a hold point's words; opened afresh from the step as it is now. */
function StepWordsForm({ siteId, step, onDone }: { siteId: string; step: RtsStep; onDone: () => void }) {
  const act = useRtsAction(siteId);
  const schema = useMemo(() => stepForm(step.version), [step.version]);
  const form = useSchemaForm(schema, { title: step.title, detail: step.detail });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync({ method: "PATCH", path: `/return-to-service/steps/${step.id}`, body })
      .then(onDone, (err: unknown) => showSaveError(form, err)),
  );
  const message = formMessage(formState.errors);
  return (
    <form
      className="space-y-2"
      aria-label={`Edit hold point ${step.title}`}
      onSubmit={(ev) => void submit(ev)}
      noValidate
    >
      <TextField label="Hold point" {...register("title")} required error={e("title")} />
      <TextArea label="What it asks for" {...register("detail")} error={e("detail")} />
      {message && (
        <p role="alert" className="text-sm text-rust-300">
          {message}
        </p>
      )}
      <div className="flex gap-2">
        <Button type="submit" disabled={formState.isSubmitting}>
          Save the hold point
        </Button>
        <Button tone="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/** The curator's edits of one hold point while its stage is being prepared: words, order, removal. */
function StepEditor({ siteId, stage, index, hp }: { siteId: string; stage: RtsStage; index: number; hp: HoldPoint }) {
  const act = useRtsAction(siteId);
  const step = stage.steps.find((s) => s.id === hp.stepId)!;
  const [mode, setMode] = useState<"idle" | "edit" | "remove">("idle");
  const move = (toIndex: number) =>
    act.mutate({ method: "POST", path: `/return-to-service/steps/${step.id}/move`, body: { toIndex } });
  const last = stage.steps.length - 1;
  return (
    <div className="mt-2">
      {mode === "idle" && (
        <div className="flex flex-wrap gap-2 text-sm">
          <Button tone="quiet" onClick={() => setMode("edit")} aria-label={`Edit hold point: ${step.title}`}>
            Edit
          </Button>
          <Button tone="quiet" disabled={index === 0 || act.isPending} onClick={() => move(index - 1)}>
            <span aria-hidden>↑</span> Move up
          </Button>
          <Button tone="quiet" disabled={index === last || act.isPending} onClick={() => move(index + 1)}>
            <span aria-hidden>↓</span> Move down
          </Button>
          <Button tone="quiet" onClick={() => setMode("remove")} aria-label={`Remove hold point: ${step.title}`}>
            Remove
          </Button>
        </div>
      )}
      {mode === "remove" && (
        <p className="flex flex-wrap items-center gap-2 text-sm">
          Remove “{step.title}” from this stage?
          <Button
            tone="danger"
            disabled={act.isPending}
            onClick={() => act.mutate({ method: "DELETE", path: `/return-to-service/steps/${step.id}` })}
          >
            Yes, remove it
          </Button>
          <Button tone="quiet" onClick={() => setMode("idle")}>
            Keep it
          </Button>
        </p>
      )}
      {mode === "edit" && <StepWordsForm siteId={siteId} step={step} onDone={() => setMode("idle")} />}
      {act.error && (
        <p role="alert" className="mt-1 text-sm text-rust-300">
          {act.error instanceof ApiError ? act.error.message : String(act.error)}
        </p>
      )}
    </div>
  );
}

/** The reason → the request body; signBody (the server's own schema) validates it. */
const releaseForm = (attempt: number) =>
  z
    .object({ reason: z.string() })
    .transform((v) => ({ kind: "released", reason: v.reason, attempt }) as z.input<typeof signBody>)
    .pipe(signBody);

/** The curator lets a blocked hold point pass, with a reason recorded and shown in red for ever. */
function ReleaseForm({
  siteId,
  stage,
  hp,
  onDone,
}: {
  siteId: string;
  stage: RtsStage;
  hp: HoldPoint;
  onDone: () => void;
}) {
  const act = useRtsAction(siteId);
  const schema = useMemo(() => releaseForm(stage.attempt), [stage.attempt]);
  const form = useSchemaForm(schema, { reason: "" });
  const { register, formState } = form;
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync({ method: "POST", path: `/return-to-service/steps/${hp.stepId}/signoffs`, body })
      .then(onDone, (err: unknown) => showSaveError(form, err)),
  );
  const message = serverMessage(formState.errors);
  return (
    <form
      className="mt-2 space-y-2"
      aria-label={`Release ${hp.title} with a reason`}
      onSubmit={(ev) => void submit(ev)}
      noValidate
    >
      <TextArea
        label="Reason (recorded and shown in red for ever)"
        {...register("reason")}
        required
        minLength={RELEASE_REASON_MIN}
        error={fieldError(formState.errors, "reason")}
      />
      {message && (
        <p role="alert" className="text-sm text-rust-300">
          {message}
        </p>
      )}
      <div className="flex gap-2">
        <Button tone="danger" type="submit" disabled={formState.isSubmitting}>
          Release this hold point
        </Button>
        <Button tone="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/**
 * One hold point: its state, what blocks it (each with a link), who signed what, and the
 * controls the person's role allows. Energising a stage that would operate a breaker past its
 * budget asks once more, with the suggestion to feed from the temporary supply instead; the
 * budget never blocks.
 */
export function HoldPointRow({
  siteId,
  stage,
  hp,
  index,
  role,
  isQualified,
  editing,
}: {
  siteId: string;
  stage: RtsStage;
  hp: HoldPoint;
  index: number;
  role: Role | "admin";
  isQualified: boolean;
  /** The curator is editing this stage's hold points. */
  editing: boolean;
}) {
  const act = useRtsAction(siteId);
  const [releasing, setReleasing] = useState(false);
  const [confirmBudget, setConfirmBudget] = useState(false);
  const step = stage.steps.find((s) => s.id === hp.stepId)!;
  const may = hp.qualifiedOnly ? isQualified && can(role, "rts.sign") : can(role, "rts.sign");
  const error = act.error instanceof ApiError ? act.error.message : act.error ? String(act.error) : null;
  const sign = () =>
    act.mutate({
      method: "POST",
      path: `/return-to-service/steps/${hp.stepId}/signoffs`,
      body: { attempt: stage.attempt } satisfies z.input<typeof signBody>,
    });
  const overBudget = hp.kind === "energise" ? stage.operationWarnings : [];
  return (
    <li className={`rounded-md border-l-4 bg-hull-900 p-3 ${STATE_CLASS[hp.state]}`} data-testid={`hold-${hp.kind}`}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <p className="font-semibold">
          <span aria-hidden>{STATE_MARK[hp.state]} </span>
          {hp.title}
          {hp.qualifiedOnly && <span className="ml-2 text-xs text-mist">(qualified person only)</span>}
        </p>
        <span className="text-sm">{HOLD_STATE_LABELS[hp.state]}</span>
      </div>
      {step.detail && <p className="text-sm text-mist">{step.detail}</p>}
      {hp.blockers.length > 0 && (
        <ul className="mt-2 space-y-1 text-sm" aria-label="What blocks it">
          {hp.blockers.map((b) => (
            <li key={b.message}>
              ✖{" "}
              <Link to={b.href} className="underline">
                {b.message}
              </Link>
            </li>
          ))}
        </ul>
      )}
      {step.entries.map((e) => (
        <p
          key={e.id}
          className={`mt-1 text-sm ${e.kind === "released" ? "font-semibold text-flare-300" : e.supersededBy ? "text-fog line-through" : ""}`}
        >
          {e.kind === "released" ? "Released with reason by" : e.kind === "struck" ? "Struck out by" : "Signed by"}{" "}
          {e.signerName}, {when(e.signedAt)}
          {e.reason && ` — ${e.reason}`}
          {e.note && ` · ${e.note}`}
        </p>
      ))}
      {hp.state === "ready" && may && overBudget.length > 0 && confirmBudget && (
        <div role="alert" className="mt-2 rounded-md border border-brass-400 p-2 text-sm">
          <p className="font-semibold text-brass-300">Energising this stage operates breakers past their budget:</p>
          <ul className="list-inside list-disc">
            {overBudget.map((w) => (
              <li key={w.componentId}>
                {w.designation}: {w.warning}
              </li>
            ))}
          </ul>
          <p className="mt-1">The budget warns; it does not stop you. Sign only if the qualified person decides so.</p>
        </div>
      )}
      <div className="mt-2 flex flex-wrap gap-2">
        {hp.state === "ready" && may && (
          <Button
            onClick={() => (overBudget.length && !confirmBudget ? setConfirmBudget(true) : sign())}
            disabled={act.isPending}
          >
            {hp.kind === "energise"
              ? confirmBudget
                ? "Sign anyway: energised now"
                : "Sign: energised now"
              : "Sign this hold point"}
          </Button>
        )}
        {hp.state === "blocked" && !hp.qualifiedOnly && can(role, "rts.release_blocked") && !releasing && (
          <Button tone="danger" onClick={() => setReleasing(true)}>
            Release with a reason…
          </Button>
        )}
      </div>
      {releasing && <ReleaseForm siteId={siteId} stage={stage} hp={hp} onDone={() => setReleasing(false)} />}
      {error && (
        <p role="alert" className="mt-2 text-sm text-rust-300">
          {error}
        </p>
      )}
      {editing && stage.status === "planned" && can(role, "rts.plan") && (
        <StepEditor siteId={siteId} stage={stage} index={index} hp={hp} />
      )}
    </li>
  );
}

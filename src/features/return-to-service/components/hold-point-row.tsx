import { useMemo, useState } from "react";
import { z } from "zod";
import { Link } from "react-router";
import { Button } from "../../../components/button";
import { TextArea, TextField } from "../../../components/field";
import { can } from "../../../domain/permissions";
import { HOLD_STATE_LABELS, type HoldPoint } from "../../../domain/rts-gate";
import { AFTER_ENERGISE_KINDS } from "../../../domain/return-to-service";
import type { Role } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import {
  RELEASE_REASON_MIN,
  patchStepBody,
  signBody,
  supersedeBody,
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

/** The entry in force on a hold point (the last of its chain not superseded), if any. */
const inForce = (step: RtsStep) => step.entries.filter((e) => !e.supersededBy && e.kind !== "struck").at(-1) ?? null;

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
  // A release that no longer covers what blocks is replaced by a new one (it supersedes the old entry).
  const entry = inForce(stage.steps.find((x) => x.id === hp.stepId)!);
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync(
        entry
          ? {
              method: "POST",
              path: `/return-to-service/signoffs/${entry.id}/supersede`,
              body: { kind: "released", reason: body.reason } satisfies z.input<typeof supersedeBody>,
            }
          : { method: "POST", path: `/return-to-service/steps/${hp.stepId}/signoffs`, body },
      )
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

/** The note → a signature's request body; signBody (the server's own schema) validates it. */
const signForm = (attempt: number) =>
  z
    .object({ note: z.string() })
    .transform((v) => ({ attempt, note: v.note }) as z.input<typeof signBody>)
    .pipe(signBody);

/**
 * Signing asks once more, with room for what was checked (a fuse's rating, where it was isolated): a signature
 * cannot be taken back, only struck out with a reason. Energising past a breaker's operation budget says so here.
 */
function SignForm({
  siteId,
  stage,
  hp,
  overBudget,
  onDone,
}: {
  siteId: string;
  stage: RtsStage;
  hp: HoldPoint;
  overBudget: RtsStage["operationWarnings"];
  onDone: () => void;
}) {
  const act = useRtsAction(siteId);
  const schema = useMemo(() => signForm(stage.attempt), [stage.attempt]);
  const form = useSchemaForm(schema, { note: "" });
  const { register, formState } = form;
  const energise = hp.kind === "energise";
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync({ method: "POST", path: `/return-to-service/steps/${hp.stepId}/signoffs`, body })
      .then(onDone, (err: unknown) => showSaveError(form, err)),
  );
  const message = serverMessage(formState.errors);
  return (
    <form
      className="mt-2 space-y-2 rounded-md bg-hull-850 p-2 ring-1 ring-hull-600"
      aria-label={`Sign ${hp.title}`}
      onSubmit={(ev) => void submit(ev)}
      noValidate
    >
      {overBudget.length > 0 && (
        <div role="alert" className="rounded-md border border-brass-400 p-2 text-sm">
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
      <TextArea
        label={energise ? "Note (optional: the supply and device, who was clear)" : "Note (optional: what you checked)"}
        {...register("note")}
        rows={2}
        error={fieldError(formState.errors, "note")}
      />
      <p className="text-sm text-mist">
        {energise
          ? "Records the energisation now, in your name. Energise from a safe position, under NFPA 70E and local rules."
          : "Recorded in your name and kept; a mistake is struck out with a reason, never erased."}
      </p>
      {message && (
        <p role="alert" className="text-sm text-rust-300">
          {message}
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={formState.isSubmitting}>
          {energise ? (overBudget.length ? "Sign anyway: energised now" : "Sign: energised now") : "Sign"}
        </Button>
        <Button tone="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/** The reason → a strike's request body; supersedeBody (the server's own schema) validates it. */
const strikeForm = z
  .object({ reason: z.string() })
  .transform((v) => ({ kind: "struck", reason: v.reason }) as z.input<typeof supersedeBody>)
  .pipe(supersedeBody);

/** Strikes out the entry in force, with a reason (it supersedes the entry; both stay in the log). */
function StrikeForm({
  siteId,
  entryId,
  title,
  onDone,
}: {
  siteId: string;
  entryId: string;
  title: string;
  onDone: () => void;
}) {
  const act = useRtsAction(siteId);
  const form = useSchemaForm(strikeForm, { reason: "" });
  const { register, formState } = form;
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync({ method: "POST", path: `/return-to-service/signoffs/${entryId}/supersede`, body })
      .then(onDone, (err: unknown) => showSaveError(form, err)),
  );
  const message = serverMessage(formState.errors);
  return (
    <form
      className="mt-2 space-y-2 rounded-md bg-hull-850 p-2 ring-1 ring-hull-600"
      aria-label={`Strike out the entry on ${title}`}
      onSubmit={(ev) => void submit(ev)}
      noValidate
    >
      <TextArea
        label="Why strike it out (kept in the log)"
        {...register("reason")}
        rows={2}
        required
        error={fieldError(formState.errors, "reason")}
      />
      {message && (
        <p role="alert" className="text-sm text-rust-300">
          {message}
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" tone="danger" disabled={formState.isSubmitting}>
          Strike it out
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
 * controls the person's role allows: sign (asked once more, with a note), release with a reason,
 * strike out. Energising a stage that would operate a breaker past its budget says so before
 * the signature; the budget never blocks. An entry overtaken by new evidence says so.
 */
export function HoldPointRow({
  siteId,
  stage,
  hp,
  index,
  role,
  isQualified,
  me,
  editing,
}: {
  siteId: string;
  stage: RtsStage;
  hp: HoldPoint;
  index: number;
  role: Role | "admin";
  isQualified: boolean;
  /** The signed-in person's id: they may strike out their own entries. */
  me: string | undefined;
  /** The curator is editing this stage's hold points. */
  editing: boolean;
}) {
  const [open, setOpen] = useState<"sign" | "release" | "strike" | null>(null);
  const step = stage.steps.find((s) => s.id === hp.stepId)!;
  const may = hp.qualifiedOnly ? isQualified && can(role, "rts.sign") : can(role, "rts.sign");
  const overBudget = hp.kind === "energise" ? stage.operationWarnings : [];
  const entry = inForce(step);
  // The signer or the curator strikes an entry out while it can still change what happens: before the energisation,
  // or an after-energisation hold point while the stage is live. Once the stage was energised on an entry, it is
  // corrected by a new one (the server refuses a strike there).
  const strikable =
    stage.status === "planned" ||
    (stage.status === "energised" && AFTER_ENERGISE_KINDS.has(hp.kind) && !hp.qualifiedOnly);
  const mayStrike = !!entry && strikable && can(role, "rts.sign") && (entry.signedBy === me || can(role, "rts.plan"));
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
      {hp.overtaken && (
        <p className="mt-2 rounded-md bg-rust-700/30 p-2 text-sm ring-1 ring-rust-400">
          {hp.signoff?.kind === "released"
            ? "Something blocks that this release did not cover: it counts again only when that is dealt with, or released again with a reason that covers it."
            : "Signed before what blocks now: it counts again only when nothing blocks it. Strike it out and sign afresh once the evidence is in place."}
        </p>
      )}
      {open === null && (
        <div className="mt-2 flex flex-wrap gap-2">
          {hp.state === "ready" && may && (
            <Button onClick={() => setOpen("sign")}>
              {hp.kind === "energise" ? "Sign: energised now…" : "Sign this hold point…"}
            </Button>
          )}
          {hp.state === "blocked" && !hp.qualifiedOnly && can(role, "rts.release_blocked") && (
            <Button tone="danger" onClick={() => setOpen("release")}>
              {entry?.kind === "released" ? "Release again with a reason…" : "Release with a reason…"}
            </Button>
          )}
          {mayStrike && (
            <Button tone="quiet" onClick={() => setOpen("strike")} aria-label={`Strike out the entry on ${hp.title}…`}>
              Strike out…
            </Button>
          )}
        </div>
      )}
      {open === "sign" && (
        <SignForm siteId={siteId} stage={stage} hp={hp} overBudget={overBudget} onDone={() => setOpen(null)} />
      )}
      {open === "release" && <ReleaseForm siteId={siteId} stage={stage} hp={hp} onDone={() => setOpen(null)} />}
      {open === "strike" && entry && (
        <StrikeForm siteId={siteId} entryId={entry.id} title={hp.title} onDone={() => setOpen(null)} />
      )}
      {editing && stage.status === "planned" && can(role, "rts.plan") && (
        <StepEditor siteId={siteId} stage={stage} index={index} hp={hp} />
      )}
    </li>
  );
}

import { useMemo, useState } from "react";
import { z } from "zod";
import { Link } from "react-router";
import { Button } from "../../../components/button";
import { TextArea } from "../../../components/field";
import { paths } from "../../../config/paths";
import { can } from "../../../domain/permissions";
import { STAGE_STATE_LABELS } from "../../../domain/rts-gate";
import { SUPPLY_LABELS, VOLTAGE_STEP_LABELS } from "../../../domain/return-to-service";
import { restartBody, type RtsBoardView, type RtsStage } from "../../../schemas/return-to-service";
import { fieldError, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import type { Role } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { useRtsAction } from "../api";
import { HoldPointRow } from "./hold-point-row";
import { AddHoldPoint, StageActions } from "./plan-controls";
import { StageForm } from "./stage-form";
import { stamp as when } from "../../../lib/clock";

/** What was done about the incident → the request body; restartBody (the server's own schema) validates it. */
const restartForm = (version: number) =>
  z
    .object({ reason: z.string() })
    .transform((v) => ({ ...v, version }) as z.input<typeof restartBody>)
    .pipe(restartBody);

/** The curator starts a stopped or de-energised stage again: every hold point is signed again. */
function RestartForm({ siteId, stage, onDone }: { siteId: string; stage: RtsStage; onDone: () => void }) {
  const act = useRtsAction(siteId);
  const schema = useMemo(() => restartForm(stage.version), [stage.version]);
  const form = useSchemaForm(schema, { reason: "" });
  const { register, formState } = form;
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync({ method: "POST", path: `/return-to-service/stages/${stage.id}/restart`, body })
      .then(onDone, (err: unknown) => showSaveError(form, err)),
  );
  const message = serverMessage(formState.errors);
  return (
    <form
      className="mt-2 space-y-2"
      aria-label={`Start ${stage.name} again`}
      onSubmit={(ev) => void submit(ev)}
      noValidate
    >
      <TextArea
        label="What was done about the incident (recorded; every hold point is signed again)"
        {...register("reason")}
        required
        error={fieldError(formState.errors, "reason")}
      />
      {message && (
        <p role="alert" className="text-sm text-rust-300">
          {message}
        </p>
      )}
      <div className="flex gap-2">
        <Button type="submit" disabled={formState.isSubmitting}>
          Start attempt {stage.attempt + 1}
        </Button>
        <Button tone="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

export function StageCard({
  siteId,
  boardId,
  stage,
  role,
  isQualified,
  me,
  index,
  view,
}: {
  siteId: string;
  boardId: string;
  stage: RtsStage;
  role: Role | "admin";
  isQualified: boolean;
  /** The signed-in person's id: they may strike out their own entries. */
  me: string | undefined;
  index: number;
  view: RtsBoardView;
}) {
  const act = useRtsAction(siteId);
  const [editing, setEditing] = useState(false);
  const [editSteps, setEditSteps] = useState(false);
  const [restarting, setRestarting] = useState(false);
  const g = stage.gate;
  const planner = can(role, "rts.plan");
  // A released stage is part of the record: its hold points fold away (open them to read).
  const holdPoints = (
    <ol className="mt-3 space-y-2" aria-label="Hold points">
      {g.holdPoints.map((hp, i) => (
        <HoldPointRow
          key={hp.stepId}
          siteId={siteId}
          stage={stage}
          hp={hp}
          index={i}
          role={role}
          isQualified={isQualified}
          me={me}
          editing={editSteps}
        />
      ))}
    </ol>
  );
  return (
    <article
      id={`stage-${stage.id}`}
      aria-labelledby={`stage-title-${stage.id}`}
      className="rounded-lg bg-hull-800 p-4 ring-1 ring-hull-600"
      data-testid="stage"
    >
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id={`stage-title-${stage.id}`} className="text-xl font-bold">
          Stage {index + 1}: {stage.name}
        </h2>
        <span className="rounded-md bg-hull-950 px-2 py-1 text-sm font-semibold" data-testid="stage-state">
          {STAGE_STATE_LABELS[g.state]}
          {stage.attempt > 1 ? ` · attempt ${stage.attempt}` : ""}
        </span>
      </header>
      <dl className="mt-2 grid grid-cols-1 gap-x-4 gap-y-1 text-sm sm:grid-cols-2">
        <div>
          <dt className="inline text-mist">Brings back: </dt>
          <dd className="inline">
            {[...stage.sections.map((s) => s.name), ...stage.positions.map((p) => p.designation)].join(", ")} (
            {stage.circuitCount} positions)
          </dd>
        </div>
        <div>
          <dt className="inline text-mist">Supply: </dt>
          <dd className="inline">
            {SUPPLY_LABELS[stage.supply]}, {VOLTAGE_STEP_LABELS[stage.voltageStep].toLowerCase()}
            {stage.stepVolts ? ` (${stage.stepVolts} V)` : ""}
          </dd>
        </div>
        <div>
          <dt className="inline text-mist">Protection: </dt>
          <dd className="inline">
            {stage.protectionDevice || "—"}{" "}
            {stage.protectionRatingA ? `${stage.protectionRatingA} A` : "rating not recorded"} (limit{" "}
            {stage.protectionLimitA ? `${stage.protectionLimitA} A` : "not set"})
          </dd>
        </div>
        <div>
          <dt className="inline text-mist">Qualified person: </dt>
          <dd className="inline">{stage.qualifiedPerson?.name ?? "none named"}</dd>
        </div>
        <div>
          <dt className="inline text-mist">Watch: </dt>
          <dd className="inline">
            {stage.watchHours} h, a check every {stage.checkEveryHours} h
          </dd>
        </div>
        {stage.energisedAt && (
          <div>
            <dt className="inline text-mist">Energised: </dt>
            <dd className="inline">{when(stage.energisedAt)}</dd>
          </div>
        )}
      </dl>
      {stage.watch && (
        <p
          className={`mt-2 rounded-md p-2 text-sm ${stage.watch.overdueSince ? "bg-rust-700 font-semibold" : "bg-hull-900"}`}
          data-testid="watch-state"
        >
          {stage.watch.overdueSince
            ? `⚠ Watch check overdue since ${when(stage.watch.overdueSince)}.`
            : stage.watch.nextDueAt
              ? `Next watch check due ${when(stage.watch.nextDueAt)}.`
              : "Watch period complete."}{" "}
          <Link className="underline" to={paths.rtsWatch.href(siteId, boardId, stage.id)}>
            Record a watch check
          </Link>
        </p>
      )}
      {g.releasedWithReason.map((r) => (
        <p key={r.stepId} className="mt-2 rounded-md border border-flare-400 p-2 text-sm font-semibold text-flare-300">
          ⚑ Released with reason — {r.title}: “{r.reason}” ({r.by}, {when(r.at)})
        </p>
      ))}
      {stage.operationWarnings.map((w) => (
        <p key={w.componentId} className="mt-2 text-sm text-brass-300">
          ⚠ {w.designation}: {w.warning}
        </p>
      ))}
      {stage.status === "released" ? (
        <details className="mt-3">
          <summary className="inline-flex min-h-11 cursor-pointer items-center underline">
            Hold points and signatures ({g.holdPoints.length})
          </summary>
          {holdPoints}
        </details>
      ) : (
        holdPoints
      )}
      {stage.status === "planned" && planner && (
        <div className="mt-2 flex flex-wrap gap-2">
          <Button tone="quiet" aria-pressed={editSteps} onClick={() => setEditSteps(!editSteps)}>
            {editSteps ? "Done editing hold points" : "Edit hold points"}
          </Button>
          {editSteps && <AddHoldPoint siteId={siteId} stage={stage} />}
        </div>
      )}
      <div className="mt-3 flex flex-wrap gap-2 text-sm">
        <Link
          className="inline-flex min-h-11 items-center underline"
          to={paths.rtsStageSheet.href(siteId, boardId, stage.id)}
        >
          Printable stage sheet
        </Link>
        {(stage.status === "energised" || stage.status === "stopped") && can(role, "rts.de_energise") && (
          <Button
            tone="quiet"
            onClick={() =>
              act.mutate({
                method: "POST",
                path: `/return-to-service/stages/${stage.id}/de-energise`,
                body: { note: "" },
              })
            }
          >
            Record de-energised
          </Button>
        )}
        {(stage.status === "stopped" || stage.status === "de_energised") && can(role, "rts.restart") && !restarting && (
          <Button tone="quiet" onClick={() => setRestarting(true)}>
            Start a new attempt…
          </Button>
        )}
      </div>
      {restarting && <RestartForm siteId={siteId} stage={stage} onDone={() => setRestarting(false)} />}
      {act.error && (
        <p role="alert" className="mt-2 text-sm text-rust-300">
          {act.error instanceof ApiError ? act.error.message : String(act.error)}
        </p>
      )}
      {planner &&
        (editing ? (
          <div className="mt-3">
            <StageForm siteId={siteId} view={view} stage={stage} onDone={() => setEditing(false)} />
          </div>
        ) : (
          <StageActions
            siteId={siteId}
            stage={stage}
            index={index}
            count={view.stages.length}
            onEdit={() => setEditing(true)}
          />
        ))}
    </article>
  );
}

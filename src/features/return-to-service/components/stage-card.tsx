import { useState } from "react";
import { Link } from "react-router";
import { Button } from "../../../components/button";
import { paths } from "../../../config/paths";
import { can } from "../../../domain/permissions";
import { HOLD_STATE_LABELS, STAGE_STATE_LABELS, type HoldPoint } from "../../../domain/rts-gate";
import { SUPPLY_LABELS, VOLTAGE_STEP_LABELS } from "../../../domain/return-to-service";
import type { RtsStage } from "../../../schemas/return-to-service";
import type { Role } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { useRtsAction } from "../api";

const when = (iso: string) => new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" });
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

function HoldPointRow({
  siteId,
  stage,
  hp,
  role,
  isQualified,
}: {
  siteId: string;
  stage: RtsStage;
  hp: HoldPoint;
  role: Role | "admin";
  isQualified: boolean;
}) {
  const act = useRtsAction(siteId);
  const [reason, setReason] = useState("");
  const [releasing, setReleasing] = useState(false);
  const step = stage.steps.find((s) => s.id === hp.stepId)!;
  const may = hp.qualifiedOnly ? isQualified && can(role, "rts.sign") : can(role, "rts.sign");
  const error = act.error instanceof ApiError ? act.error.message : act.error ? String(act.error) : null;
  const sign = (body: Record<string, unknown>) =>
    act.mutate({
      method: "POST",
      path: `/return-to-service/steps/${hp.stepId}/signoffs`,
      body: { attempt: stage.attempt, ...body },
    });
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
      <div className="mt-2 flex flex-wrap gap-2">
        {hp.state === "ready" && may && (
          <Button onClick={() => sign({})} disabled={act.isPending}>
            {hp.kind === "energise" ? "Sign: energised now" : "Sign this hold point"}
          </Button>
        )}
        {hp.state === "blocked" && !hp.qualifiedOnly && can(role, "rts.release_blocked") && !releasing && (
          <Button tone="danger" onClick={() => setReleasing(true)}>
            Release with a reason…
          </Button>
        )}
      </div>
      {releasing && (
        <form
          className="mt-2 space-y-2"
          onSubmit={(e) => {
            e.preventDefault();
            sign({ kind: "released", reason });
          }}
        >
          <label className="block text-sm">
            Reason (recorded and shown in red for ever)
            <textarea
              className="mt-1 w-full rounded-md bg-hull-800 p-2"
              value={reason}
              onChange={(e) => setReason(e.target.value)}
              required
              minLength={10}
            />
          </label>
          <Button tone="danger" type="submit" disabled={act.isPending}>
            Release this hold point
          </Button>
        </form>
      )}
      {error && (
        <p role="alert" className="mt-2 text-sm text-rust-300">
          {error}
        </p>
      )}
    </li>
  );
}

export function StageCard({
  siteId,
  boardId,
  stage,
  role,
  isQualified,
  index,
}: {
  siteId: string;
  boardId: string;
  stage: RtsStage;
  role: Role | "admin";
  isQualified: boolean;
  index: number;
}) {
  const act = useRtsAction(siteId);
  const g = stage.gate;
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
      <ol className="mt-3 space-y-2" aria-label="Hold points">
        {g.holdPoints.map((hp) => (
          <HoldPointRow key={hp.stepId} siteId={siteId} stage={stage} hp={hp} role={role} isQualified={isQualified} />
        ))}
      </ol>
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
        {(stage.status === "stopped" || stage.status === "de_energised") && can(role, "rts.restart") && (
          <Button
            tone="quiet"
            onClick={() => {
              const reason = window.prompt("What was done about it? (recorded)");
              if (reason)
                act.mutate({
                  method: "POST",
                  path: `/return-to-service/stages/${stage.id}/restart`,
                  body: { reason, version: stage.version },
                });
            }}
          >
            Start a new attempt
          </Button>
        )}
      </div>
      {act.error && (
        <p role="alert" className="mt-2 text-sm text-rust-300">
          {act.error instanceof ApiError ? act.error.message : String(act.error)}
        </p>
      )}
    </article>
  );
}

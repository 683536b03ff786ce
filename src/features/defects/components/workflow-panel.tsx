import { useState } from "react";
import { Button } from "../../../components/button";
import { DEFECT_STATUS_LABELS, type DefectStatus } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { DefectDetail, DefectOptions } from "../../../schemas/defects";
import { useAssignDefect, useEvidence, useMoveDefect } from "../api";
import { memberLabel, repairCrew } from "../assignees";

const VERB: Partial<Record<DefectStatus, string>> = {
  scheduled: "Schedule the work",
  under_repair: "Start the repair",
  awaiting_retest: "Repair done: ready for re-test",
  closed: "Re-tested: close",
  raised: "Reopen",
  deferred: "Defer",
  accepted_as_is: "Accept as is",
};

/**
 * Status moves this person may make (from the server's allowedTargets), and the curator's assignment.
 * The close is offered only to someone other than the repairer (the server leaves it out of their
 * targets) and stays disabled, saying what is missing, until evidence is linked.
 */
export function WorkflowPanel({
  siteId,
  detail,
  options,
  canManage,
  meId,
}: {
  siteId: string;
  detail: DefectDetail;
  options?: DefectOptions;
  canManage: boolean;
  /** The signed-in person, to tell the repairer why they are not offered the close. */
  meId?: string;
}) {
  const d = detail.defect;
  const move = useMoveDefect(siteId, d.id, d.ref);
  const [kept, setKept] = useState<DefectStatus | null>(null);
  const assign = useAssignDefect(siteId, d.id);
  const [reason, setReason] = useState("");
  const err = move.error ?? assign.error;
  const closable = detail.allowedTargets.includes("closed");
  const evidence = useEvidence(siteId, d.id).data;
  const proven = !!evidence && (evidence.retestsMeeting > 0 || evidence.afterPhotos > 0);
  const iRepaired = d.status === "awaiting_retest" && !!meId && d.repairedBy === meId;
  return (
    <section aria-labelledby="wf-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="wf-title" className="text-lg font-bold">
        Work on it
      </h2>
      {iRepaired && (
        <p className="mt-1" data-testid="repairer-note">
          You did this repair, so you cannot close it: someone else checks the re-test and closes it.
        </p>
      )}
      {detail.allowedTargets.length === 0 && !iRepaired && (
        <p className="text-mist">Your role cannot move this defect from “{DEFECT_STATUS_LABELS[d.status]}”.</p>
      )}
      {kept && (
        <p role="status" className="mt-2 text-tide-300" data-testid="move-pending">
          Move to “{DEFECT_STATUS_LABELS[kept]}” kept on this phone: it is sent when the signal returns.
        </p>
      )}
      {detail.allowedTargets.length > 0 && (
        <>
          <label className="mt-2 block text-sm font-semibold text-mist">
            Note or reason (needed to defer or accept as is)
            <input
              value={reason}
              onChange={(e) => setReason(e.target.value)}
              maxLength={2000}
              className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
            />
          </label>
          <div className="mt-2 flex flex-wrap gap-2">
            {detail.allowedTargets.map((to) => (
              <Button
                key={to}
                tone={to === "accepted_as_is" || to === "deferred" ? "quiet" : "primary"}
                disabled={move.isPending || (to === "closed" && !proven)}
                aria-describedby={to === "closed" ? "close-needs" : undefined}
                onClick={() =>
                  move.mutate(
                    { to, reason, version: d.version },
                    {
                      onSuccess: (r) => {
                        setReason("");
                        setKept(r.queued ? to : null);
                      },
                    },
                  )
                }
              >
                {VERB[to] ?? DEFECT_STATUS_LABELS[to]}
              </Button>
            ))}
          </div>
          {closable && (
            <p id="close-needs" data-testid="close-needs" className={`mt-2 text-sm ${proven ? "text-kelp-300" : ""}`}>
              {!evidence
                ? "Checking what proves the repair…"
                : proven
                  ? `Evidence is linked (${evidenceWords(evidence)}). Closing records you as the one who verified it.`
                  : "Cannot close yet: nothing proves the repair. Link a re-test reading that meets its criterion, or file an after-work photo, under “Evidence of the repair”."}
            </p>
          )}
        </>
      )}
      {canManage && (
        <label className="mt-4 block text-sm font-semibold text-mist">
          Assigned to
          <select
            className="mt-1 block min-h-11 w-full max-w-xs rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
            value={d.assigneeId ?? ""}
            onChange={(e) => assign.mutate({ assigneeId: e.target.value || null, version: d.version })}
          >
            <option value="">Nobody</option>
            {repairCrew(options, d.assigneeId).map((c) => (
              <option key={c.id} value={c.id}>
                {memberLabel(c)}
              </option>
            ))}
          </select>
        </label>
      )}
      {err && (
        <p role="alert" className="mt-2 text-flare-300">
          {err instanceof ApiError ? err.message : "That did not work."}
        </p>
      )}
    </section>
  );
}

function evidenceWords(e: { retestsMeeting: number; afterPhotos: number }) {
  const parts = [];
  if (e.retestsMeeting)
    parts.push(`${e.retestsMeeting} re-test${e.retestsMeeting === 1 ? "" : "s"} meeting the criterion`);
  if (e.afterPhotos) parts.push(`${e.afterPhotos} after-work photo${e.afterPhotos === 1 ? "" : "s"}`);
  return parts.join(", ");
}

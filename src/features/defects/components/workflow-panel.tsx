import { useState } from "react";
import { Button } from "../../../components/button";
import { DEFECT_STATUS_LABELS, type DefectStatus } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { DefectDetail, DefectOptions } from "../../../schemas/defects";
import { useAssignDefect, useMoveDefect } from "../api";

const VERB: Partial<Record<DefectStatus, string>> = {
  scheduled: "Schedule the work",
  under_repair: "Start the repair",
  awaiting_retest: "Repair done: ready for re-test",
  closed: "Re-tested: close",
  raised: "Reopen",
  deferred: "Defer",
  accepted_as_is: "Accept as is",
};

/** Status moves this person may make (from the server's allowedTargets), and the curator's assignment. */
export function WorkflowPanel({
  siteId,
  detail,
  options,
  canManage,
}: {
  siteId: string;
  detail: DefectDetail;
  options?: DefectOptions;
  canManage: boolean;
}) {
  const d = detail.defect;
  const move = useMoveDefect(siteId, d.id);
  const assign = useAssignDefect(siteId, d.id);
  const [reason, setReason] = useState("");
  const err = move.error ?? assign.error;
  return (
    <section aria-labelledby="wf-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="wf-title" className="text-lg font-bold">
        Work on it
      </h2>
      {detail.allowedTargets.length === 0 && (
        <p className="text-mist">Your role cannot move this defect from “{DEFECT_STATUS_LABELS[d.status]}”.</p>
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
                disabled={move.isPending}
                onClick={() => move.mutate({ to, reason, version: d.version }, { onSuccess: () => setReason("") })}
              >
                {VERB[to] ?? DEFECT_STATUS_LABELS[to]}
              </Button>
            ))}
          </div>
          {d.status === "awaiting_retest" && (
            <p className="mt-2 text-sm text-mist">Closing needs someone other than the person who did the repair.</p>
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
            {options?.crew.map((c) => (
              <option key={c.id} value={c.id}>
                {c.name}
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

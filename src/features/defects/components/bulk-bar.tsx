import { useState } from "react";
import { Button } from "../../../components/button";
import { DEFECT_STATUSES, DEFECT_STATUS_LABELS, type DefectStatus } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { BulkBody, DefectOptions } from "../../../schemas/defects";
import { useBulkDefects } from "../api";
import { memberLabel, repairCrew } from "../assignees";

type Kind = "assign" | "status" | "due";
const control = "mt-1 block min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk";

/** The curator's bulk change of the selected defects: choose, then confirm once. */
export function BulkBar({
  siteId,
  ids,
  options,
  onDone,
}: {
  siteId: string;
  ids: string[];
  options?: DefectOptions;
  onDone: () => void;
}) {
  const [kind, setKind] = useState<Kind>("assign");
  const [assignee, setAssignee] = useState("");
  const [to, setTo] = useState<DefectStatus>("scheduled");
  const [reason, setReason] = useState("");
  const [due, setDue] = useState("");
  const [confirming, setConfirming] = useState(false);
  const [error, setError] = useState<{ message: string; items: string[] } | null>(null);
  const bulk = useBulkDefects(siteId);
  const crew = repairCrew(options);

  const action: BulkBody["action"] =
    kind === "assign"
      ? { type: "assign", assigneeId: assignee || null }
      : kind === "status"
        ? { type: "status", to, reason }
        : { type: "due", dueOn: due || null };
  const summary =
    kind === "assign"
      ? `assign to ${crew.find((c) => c.id === assignee)?.name ?? "nobody"}`
      : kind === "status"
        ? `move to “${DEFECT_STATUS_LABELS[to]}”`
        : due
          ? `set due date ${due}`
          : "clear the due date";

  const apply = () =>
    bulk.mutate(
      { ids, action },
      {
        onSuccess: () => {
          setConfirming(false);
          setError(null);
          onDone();
        },
        onError: (e) => {
          setConfirming(false);
          setError({
            message: e instanceof ApiError ? e.message : "That did not work.",
            items: e instanceof ApiError ? Object.values(e.fields) : [],
          });
        },
      },
    );

  return (
    <section
      aria-label="Change the selected defects"
      className="no-print rounded-lg bg-hull-850 p-3 ring-1 ring-brass-400"
    >
      <div className="flex flex-wrap items-end gap-3">
        <p className="min-h-11 self-center font-semibold">{ids.length} selected</p>
        <label className="text-sm font-semibold text-mist">
          Change
          <select
            className={control}
            value={kind}
            onChange={(e) => {
              setKind(e.target.value as Kind);
              setConfirming(false);
            }}
          >
            <option value="assign">Assignee</option>
            <option value="status">Status</option>
            <option value="due">Due date</option>
          </select>
        </label>
        {kind === "assign" && (
          <label className="text-sm font-semibold text-mist">
            Assign to
            <select className={control} value={assignee} onChange={(e) => setAssignee(e.target.value)}>
              <option value="">Nobody</option>
              {crew.map((c) => (
                <option key={c.id} value={c.id}>
                  {memberLabel(c)}
                </option>
              ))}
            </select>
          </label>
        )}
        {kind === "status" && (
          <>
            <label className="text-sm font-semibold text-mist">
              New status
              <select className={control} value={to} onChange={(e) => setTo(e.target.value as DefectStatus)}>
                {DEFECT_STATUSES.map((s) => (
                  <option key={s} value={s}>
                    {DEFECT_STATUS_LABELS[s]}
                  </option>
                ))}
              </select>
            </label>
            <label className="text-sm font-semibold text-mist">
              Reason (deferring or accepting as is)
              <input className={`${control} w-64`} value={reason} onChange={(e) => setReason(e.target.value)} />
            </label>
          </>
        )}
        {kind === "due" && (
          <label className="text-sm font-semibold text-mist">
            Due on
            <input type="date" className={control} value={due} onChange={(e) => setDue(e.target.value)} />
          </label>
        )}
        {!confirming && <Button onClick={() => setConfirming(true)}>Apply…</Button>}
      </div>
      {confirming && (
        <div
          role="alertdialog"
          aria-label="Confirm the change"
          className="mt-3 flex flex-wrap items-center gap-3 rounded-md bg-hull-800 p-3"
        >
          <p>
            Change {ids.length} defect{ids.length === 1 ? "" : "s"}: {summary}? All of them change or none do.
          </p>
          <Button onClick={apply} disabled={bulk.isPending}>
            Yes, change {ids.length}
          </Button>
          <Button tone="quiet" onClick={() => setConfirming(false)}>
            Cancel
          </Button>
        </div>
      )}
      {error && (
        <div role="alert" className="mt-3 text-flare-300">
          <p>{error.message}</p>
          <ul className="list-disc pl-5">
            {error.items.map((m) => (
              <li key={m}>{m}</li>
            ))}
          </ul>
        </div>
      )}
    </section>
  );
}

import { DEFECT_STATUS_LABELS, type DefectStatus } from "../../../domain/vocab";
import type { DefectDetail } from "../../../schemas/defects";
import { stamp as when } from "../../../lib/clock";

const label = (s: string | null) => (s ? (DEFECT_STATUS_LABELS[s as DefectStatus] ?? s) : "—");

/** Status history (who moved it, when, why) and the record's audit trail. */
export function DefectHistory({ detail }: { detail: DefectDetail }) {
  return (
    <section aria-labelledby="hist-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="hist-title" className="text-lg font-bold">
        History
      </h2>
      <ol className="mt-2 space-y-1 text-sm">
        {detail.history.map((h) => (
          <li key={h.id} className="border-l-2 border-hull-600 pl-3">
            <span className="font-mono text-fog">{when(h.at)}</span> {h.actorName ?? "Someone"}:{" "}
            {h.fromStatus ? <>{label(h.fromStatus)} → </> : "raised as "}
            <strong>{label(h.toStatus)}</strong>
            {h.reason && <span className="block text-mist">“{h.reason}”</span>}
          </li>
        ))}
      </ol>
      <details className="mt-3">
        <summary className="min-h-11 cursor-pointer py-2 text-sm font-semibold">
          Every change ({detail.audit.length})
        </summary>
        <ol className="space-y-1 text-sm">
          {detail.audit.map((a) => (
            <li key={a.id}>
              <span className="font-mono text-fog">{when(a.at)}</span> {a.actorName ?? "Someone"} — {a.action}
              {a.after ? <code className="ml-1 break-all text-xs text-mist">{JSON.stringify(a.after)}</code> : null}
            </li>
          ))}
        </ol>
      </details>
    </section>
  );
}

import { PART_STATUS_LABELS } from "../../../domain/vocab";
import type { LineDetail } from "../../../schemas/parts";
import { stamp } from "../../../lib/clock";

export function HistoryList({ history }: { history: LineDetail["history"] }) {
  return (
    <section aria-labelledby="history-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="history-title" className="text-lg font-bold">
        History
      </h2>
      <ol className="mt-2 space-y-2">
        {history.map((h) => (
          <li key={h.id} className="text-sm">
            <time dateTime={h.at} className="font-mono text-fog">
              {stamp(h.at)}
            </time>{" "}
            {h.fromStatus && h.toStatus && (
              <span className="font-semibold">
                {PART_STATUS_LABELS[h.fromStatus]} → {PART_STATUS_LABELS[h.toStatus]}:{" "}
              </span>
            )}
            {h.summary}
            {h.actorName && <span className="text-mist"> — {h.actorName}</span>}
          </li>
        ))}
      </ol>
    </section>
  );
}

import type { PhaseComparison } from "../../../schemas/readings";
import { megohms, when } from "../format";
import { SourceDetails } from "./source-details";

/** A, B and C to ground side by side (a flagged phase marked with ▼ and words), then the trend. */
export function PhaseComparisonCard({ comparison: c }: { comparison: PhaseComparison }) {
  const flaggedTrend = c.trend.some((t) => t.flagged);
  // A phase not measured is not "fine": say which were not, and that a lone phase has nothing to be compared with.
  const missing = (["A", "B", "C"] as const).filter((p) => c.values[p] == null).map((p) => `${p}–G`);
  const alone = 3 - missing.length < 2;
  const verdict =
    c.flagged.length || flaggedTrend
      ? "▼ Flagged: investigate before going on"
      : alone && c.trend.length === 0
        ? "Nothing to compare yet"
        : "Nothing flagged";
  return (
    <div className="space-y-2" data-testid="phase-comparison">
      <p className="font-semibold">
        {c.label} <span className="text-sm font-normal text-mist">· latest {when(c.measuredAt)}</span>
      </p>
      <ul className="grid grid-cols-3 gap-2" aria-label="Phase to ground, corrected">
        {(["A", "B", "C"] as const).map((p) => {
          const low = c.flagged.includes(p);
          return (
            <li
              key={p}
              className={`rounded-md p-2 text-center ${low ? "ring-2 ring-flare-400" : "ring-1 ring-hull-600"}`}
            >
              <span className="block font-mono font-bold">{p}–G</span>
              <span className="block font-mono">{megohms(c.values[p])}</span>
              {low && <span className="block text-xs font-bold text-flare-300">▼ low</span>}
            </li>
          );
        })}
      </ul>
      {c.trend.length > 0 && (
        <ul className="text-sm" aria-label="Against the previous test">
          {c.trend.map((t) => (
            <li key={t.conductors}>
              {t.conductors}: {megohms(t.previous)} → {megohms(t.current)}
              {t.flagged ? ` ▼ down ${Math.round(t.dropFraction * 100)} %` : ""}
            </li>
          ))}
        </ul>
      )}
      <p className="font-semibold" data-testid="phase-flag">
        {verdict}
      </p>
      <ul className="text-sm">
        {c.reasons.map((r) => (
          <li key={r}>{r}</li>
        ))}
        {missing.length > 0 && (
          <li data-testid="phase-missing">
            Not measured: {missing.join(", ")}.{" "}
            {alone ? "One phase alone is not compared with the others." : "The phases measured are compared."}
          </li>
        )}
        {!c.reasons.length && !alone && <li>No phase low, no drop flagged.</li>}
      </ul>
      <SourceDetails sources={[{ title: "Comparison rules", source: c.source }]} />
    </div>
  );
}

export function PhaseComparisonList({ comparisons }: { comparisons: PhaseComparison[] }) {
  if (comparisons.length === 0)
    return <p className="text-mist">No circuit has two phases (or two tests) to compare yet.</p>;
  return (
    <ul className="space-y-2" aria-label="Phase comparisons">
      {comparisons.map((c) => (
        <li key={c.key} className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700">
          <PhaseComparisonCard comparison={c} />
        </li>
      ))}
    </ul>
  );
}

import { TRIP_UNIT_LABELS } from "../../../domain/trip-test";
import { TRIP_TEST_LABELS, type TripTest } from "../../../schemas/readings";
import { sig, when } from "../format";
import { SourceDetails } from "./source-details";
import { VerdictBadge } from "./verdict-badge";

/** Newest first, as cards (they read on a phone as well as a desk). */
export function TripTestHistory({ tests, showTarget = true }: { tests: TripTest[]; showTarget?: boolean }) {
  if (tests.length === 0) return <p className="text-mist">No trip tests yet.</p>;
  return (
    <ul className="space-y-2" aria-label="Trip tests">
      {tests.map((t) => (
        <li key={t.id} className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700" data-testid="trip-test">
          <div className="flex flex-wrap items-baseline justify-between gap-2">
            <span className="font-semibold">
              {showTarget && <span className="font-mono">{t.designation} · </span>}
              {TRIP_TEST_LABELS[t.test]}
              {t.pole && <span className="text-mist"> · pole {t.pole}</span>}
            </span>
            <span className="text-sm text-mist">{when(t.measuredAt)}</span>
          </div>
          <p className="mt-1 font-mono">
            {sig(t.ratingAmps)} A {TRIP_UNIT_LABELS[t.tripUnit].toLowerCase()}
            {t.test === "inverse_time"
              ? ` · ${t.testAmps == null ? "—" : sig(t.testAmps)} A → ${t.tripSeconds == null ? "did not trip" : `${sig(t.tripSeconds)} s`}`
              : ` · picked up at ${t.pickupAmps == null ? "—" : sig(t.pickupAmps)} A`}
          </p>
          <p className="text-sm text-mist">Window {t.judgement.window}</p>
          <div className="mt-1">
            <VerdictBadge verdict={t.judgement.verdict} />
          </div>
          <ul className="mt-1 text-sm">
            {t.judgement.reasons.map((r) => (
              <li key={r}>{r}</li>
            ))}
          </ul>
          <SourceDetails sources={[{ title: "Band", source: t.judgement.source }]} />
          {t.recordedBy && (
            <p className="text-xs text-fog">
              Recorded by {t.recordedBy}
              {t.instrument && ` · ${t.instrument}`}
            </p>
          )}
        </li>
      ))}
    </ul>
  );
}

import { useState } from "react";
import { CONDUCTOR_LABELS, type InsulationReading } from "../../../schemas/readings";
import { megohms, sig, when } from "../format";
import { SourceDetails } from "./source-details";
import { VerdictBadge } from "./verdict-badge";
import { ReadingDefects } from "./reading-defects";

const BOUND_WORDS = { exact: "", at_least: "at least ", at_most: "at most ", not_computable: "" } as const;
/** " · PI at least 2.1", " · PI not computable", or nothing. */
function ratioWords(label: string, value: number | null, bound: keyof typeof BOUND_WORDS | null) {
  if (bound === "not_computable") return ` · ${label} not computable`;
  return value == null ? "" : ` · ${label} ${BOUND_WORDS[bound ?? "exact"]}${sig(value)}`;
}

/** Newest first; as a list of cards so it reads on a phone as well as a desk. */
export function InsulationHistory({
  readings,
  showTarget = true,
  limit = 10,
}: {
  readings: InsulationReading[];
  showTarget?: boolean;
  limit?: number;
}) {
  const [all, setAll] = useState(false);
  if (readings.length === 0) return <p className="text-mist">No insulation readings yet.</p>;
  const shown = all ? readings : readings.slice(0, limit);
  return (
    <>
      <ul className="space-y-2" aria-label="Insulation readings">
        {shown.map((r) => {
          const j = r.judgement;
          return (
            <li key={r.id} className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700" data-testid="insulation-reading">
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <span className="font-semibold">
                  {showTarget && <span className="font-mono">{r.designation ?? r.circuit}</span>}
                  {showTarget && r.designation && r.circuit && <span className="text-mist"> · {r.circuit}</span>}
                  <span className="text-mist"> · {CONDUCTOR_LABELS[r.conductors]}</span>
                </span>
                <span className="text-sm text-mist">{when(r.measuredAt)}</span>
              </div>
              <p className="mt-1 font-mono">
                {megohms(r.megohms, r.megohmsQualifier)} at {sig(r.equipmentTempC)} °C, {r.testVoltsDc} V DC
                {" → "}
                <strong className="text-chalk" data-testid="corrected">
                  {j.correctedMegohms == null
                    ? "not corrected"
                    : `${megohms(j.correctedMegohms, j.qualifier)} at ${j.baseTemperatureC} °C`}
                </strong>
              </p>
              <p className="text-sm text-mist">
                Minimum {megohms(j.minimum.megohms)}
                {ratioWords("PI", j.pi, j.piBound)}
                {j.pi != null && j.piBound !== "not_computable" && ` (minimum ${j.minimumPi})`}
                {ratioWords("DAR", j.dar, j.darBound)}
                {j.dewPointC != null && ` · dew point ${sig(j.dewPointC)} °C`}
                {j.testVoltageOver && ` · above the suggested ${j.suggestedTestVoltsDc} V DC`}
              </p>
              <div className="mt-1">
                <VerdictBadge verdict={j.verdict} />
              </div>
              <ul className="mt-1 text-sm">
                {[...j.reasons, ...j.notes].map((x) => (
                  <li key={x}>{x}</li>
                ))}
              </ul>
              <ReadingDefects kind="insulation" reading={r} />
              <SourceDetails
                sources={[
                  ...(j.correction ? [{ title: "Temperature correction", source: j.correction }] : []),
                  { title: "Minimum", source: j.minimum.source },
                  ...(j.pi != null ? [{ title: "Polarization index", source: j.piSource }] : []),
                  ...(j.dewPointC != null || !j.validForJudging
                    ? [{ title: "Valid for judging", source: j.validitySource }]
                    : []),
                ]}
              />
              {r.recordedBy && (
                <p className="text-xs text-fog">
                  Recorded by {r.recordedBy}
                  {r.instrument && ` · ${r.instrument}`}
                </p>
              )}
            </li>
          );
        })}
      </ul>
      {shown.length < readings.length && (
        <button
          type="button"
          onClick={() => setAll(true)}
          className="min-h-11 rounded-md px-4 ring-1 ring-hull-600 hover:bg-hull-700"
        >
          Show all {readings.length} readings
        </button>
      )}
    </>
  );
}

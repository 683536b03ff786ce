import type { ContactReading } from "../../../schemas/readings";
import { sig, when } from "../format";
import { SourceDetails } from "./source-details";
import { VerdictBadge } from "./verdict-badge";
import { ReadingDefects } from "./reading-defects";

/** Hatched pattern plus the word "high": an outlier pole never relies on colour alone. */
const HATCH = {
  backgroundImage: "repeating-linear-gradient(45deg, rgba(236,138,94,0.35) 0 6px, transparent 6px 12px)",
};

export function ContactHistory({ readings }: { readings: ContactReading[] }) {
  if (readings.length === 0) return <p className="text-mist">No contact-resistance readings yet.</p>;
  return (
    <ul className="space-y-2" aria-label="Contact-resistance readings">
      {readings.map((r) => {
        const flagged = new Set([...r.judgement.outliers, ...r.judgement.overMaximum]);
        const highest = Math.max(...r.poleMicroOhms);
        return (
          <li key={r.id} className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700">
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <span className="font-mono font-semibold">{r.designation}</span>
              <span className="text-sm text-mist">
                {when(r.measuredAt)} · {sig(r.testCurrentA)} A test current
              </span>
            </div>
            <table className="mt-2 w-full text-sm">
              <caption className="sr-only">Pole readings of {r.designation}</caption>
              <thead>
                <tr className="text-left text-fog">
                  <th scope="col">Pole</th>
                  <th scope="col">µΩ</th>
                  <th scope="col" className="w-1/2">
                    Relative
                  </th>
                  <th scope="col">Flag</th>
                </tr>
              </thead>
              <tbody>
                {r.poleMicroOhms.map((v, i) => (
                  <tr key={i} data-outlier={flagged.has(i) || undefined}>
                    <th scope="row" className="py-1 text-left font-normal">
                      Pole {i + 1}
                    </th>
                    <td className="font-mono">{sig(v)}</td>
                    <td>
                      <div
                        aria-hidden="true"
                        className={`h-4 rounded-sm ${flagged.has(i) ? "ring-2 ring-rust-400" : "bg-tide-700"}`}
                        style={{ width: `${Math.max(4, (v / highest) * 100)}%`, ...(flagged.has(i) ? HATCH : {}) }}
                      />
                    </td>
                    <td>
                      {flagged.has(i) ? (
                        <strong className="text-rust-300">▲ High</strong>
                      ) : (
                        <span className="text-mist">—</span>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-1 text-sm text-mist">
              Limit at the recorded threshold: {sig(r.judgement.limitMicroOhms)} µΩ
            </p>
            <div className="mt-1">
              <VerdictBadge verdict={r.judgement.verdict} />
            </div>
            <ul className="mt-1 text-sm">
              {r.judgement.reasons.map((x) => (
                <li key={x}>{x}</li>
              ))}
            </ul>
            <ReadingDefects kind="contact" reading={r} />
            <SourceDetails
              sources={r.judgement.sources.map((s, i) => ({
                title: i === 0 ? "Pole comparison" : "Manufacturer",
                source: s,
              }))}
            />
            {r.notes && <p className="text-sm text-mist">{r.notes}</p>}
          </li>
        );
      })}
    </ul>
  );
}

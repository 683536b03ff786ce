import { CONDUCTOR_LABELS, type StepVoltageTest } from "../../../schemas/readings";
import { sig, when } from "../format";
import { SourceDetails } from "./source-details";
import { VerdictBadge } from "./verdict-badge";

/** Each test's steps as a small table (volts → MΩ), its verdict, reasons and source. */
export function StepTestHistory({ tests }: { tests: StepVoltageTest[] }) {
  if (tests.length === 0) return <p className="text-mist">No step-voltage tests yet.</p>;
  return (
    <ul className="space-y-2" aria-label="Step-voltage tests">
      {tests.map((t) => (
        <li key={t.id} className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700" data-testid="step-test">
          <div className="flex flex-wrap items-baseline justify-between gap-2">
            <span className="font-semibold">
              <span className="font-mono">{t.designation ?? t.circuit}</span>
              <span className="text-mist"> · {CONDUCTOR_LABELS[t.conductors]}</span>
            </span>
            <span className="text-sm text-mist">{when(t.measuredAt)}</span>
          </div>
          <table className="mt-1 font-mono text-sm">
            <caption className="sr-only">Steps</caption>
            <thead>
              <tr>
                <th scope="col" className="pr-4 text-left font-semibold text-mist">
                  V DC
                </th>
                <th scope="col" className="text-left font-semibold text-mist">
                  MΩ
                </th>
              </tr>
            </thead>
            <tbody>
              {t.steps.map((s) => (
                <tr key={s.testVoltsDc}>
                  <td className="pr-4">{s.testVoltsDc}</td>
                  <td>{sig(s.megohms)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <div className="mt-1">
            <VerdictBadge verdict={t.judgement.verdict} />
          </div>
          <ul className="mt-1 text-sm">
            {t.judgement.reasons.map((r) => (
              <li key={r}>{r}</li>
            ))}
          </ul>
          <SourceDetails sources={[{ title: "Step-voltage rule", source: t.judgement.source }]} />
        </li>
      ))}
    </ul>
  );
}

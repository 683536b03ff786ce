import type { GroundHunt } from "../../../schemas/readings";
import { when } from "../format";
import { JudgedResult } from "./judged-result";

const MARK = { bright: "●", dim: "◐", dark: "○" } as const;

/** One hunt: its steps in order with the lamps as shapes and words, then what they point at. */
export function GroundHuntLog({ hunt, live = false }: { hunt: GroundHunt; live?: boolean }) {
  return (
    <section aria-label={`Ground hunt ${hunt.hunt}`} className="space-y-2" data-testid="ground-hunt">
      <h3 className="text-lg font-bold">{hunt.hunt}</h3>
      <ol className="space-y-1">
        {hunt.steps.map((s, i) => (
          <li key={s.id} className="rounded-md bg-hull-850 p-2 ring-1 ring-hull-700" data-testid="hunt-step">
            <span className="text-sm text-mist">
              {i + 1}. {when(s.measuredAt)}
            </span>
            <span className="block font-semibold">
              {s.action === "opened" ? "Opened" : "Closed again"} {s.feeder}
            </span>
            <span className="block font-mono">
              {(["A", "B", "C"] as const).map((p) => (
                <span key={p} className="mr-3">
                  <span aria-hidden="true">{MARK[s.lamps[p]]}</span> {p} {s.lamps[p]}
                </span>
              ))}
            </span>
          </li>
        ))}
      </ol>
      <JudgedResult
        live={live}
        testId="hunt-finding"
        title={hunt.finding.feeder ? `Points at ${hunt.finding.feeder}` : "Not found yet"}
        lines={[hunt.finding.words]}
        sources={[{ title: "How a hunt is read", source: hunt.source }]}
      />
    </section>
  );
}

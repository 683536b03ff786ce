import type { Verdict } from "../../../domain/reading-judgement";
import type { CriterionSourceDto } from "../../../schemas/readings";
import { SourceDetails } from "./source-details";
import { VerdictBadge } from "./verdict-badge";

/**
 * What the server computed for a reading just saved (or listed): the verdict, its reasons in
 * words and the source of the rule, one tap away. Nothing here is recomputed on the phone.
 */
export function JudgedResult({
  title,
  verdict,
  lines,
  sources,
  live = false,
  testId,
}: {
  title: string;
  verdict?: Verdict | null;
  lines: string[];
  sources: Array<{ title: string; source: CriterionSourceDto }>;
  /** Announce it (a result that just arrived), rather than a list entry. */
  live?: boolean;
  testId?: string;
}) {
  return (
    <div
      role={live ? "status" : undefined}
      data-testid={testId}
      className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-600"
    >
      <p className="font-semibold">{title}</p>
      {verdict && (
        <div className="mt-1">
          <VerdictBadge verdict={verdict} />
        </div>
      )}
      <ul className="mt-1 space-y-1 text-sm">
        {lines.map((l) => (
          <li key={l}>{l}</li>
        ))}
      </ul>
      <SourceDetails sources={sources} />
    </div>
  );
}

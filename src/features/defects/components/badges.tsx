import {
  DEFECT_SEVERITY_LABELS,
  DEFECT_STATUS_LABELS,
  type DefectSeverity,
  type DefectStatus,
} from "../../../domain/vocab";

// Condition is never colour alone: every badge carries its words (and severity its number).
const SEVERITY_TONE: Record<DefectSeverity, string> = {
  cosmetic: "bg-hull-700 text-mist",
  degraded: "bg-tide-700 text-tide-300",
  impaired: "bg-rust-700 text-rust-300",
  disabling: "bg-flare-700 text-flare-300",
};
export function SeverityBadge({ severity }: { severity: DefectSeverity }) {
  return (
    <span
      className={`inline-block whitespace-nowrap rounded px-2 py-0.5 text-xs font-semibold ${SEVERITY_TONE[severity]}`}
    >
      {DEFECT_SEVERITY_LABELS[severity]}
    </span>
  );
}

/*
 * A defect's state is drawn as a repair tag (the card a crew ties to a part): a notched
 * left edge, a mark for the stage of the work and the word. The edge colour repeats the
 * word; it never stands alone. Tideline's own marks: ▲ raised, ◷ scheduled (a clock),
 * ⚒ under repair, Ω awaiting re-test (the meter's unit), ✓ closed, ⇥ deferred, ≈ accepted as is.
 */
const STATUS_MARK: Record<DefectStatus, string> = {
  raised: "▲",
  scheduled: "◷",
  under_repair: "⚒",
  awaiting_retest: "Ω",
  closed: "✓",
  deferred: "⇥",
  accepted_as_is: "≈",
};
const STATUS_EDGE: Record<DefectStatus, string> = {
  raised: "border-l-rust-400",
  scheduled: "border-l-tide-400",
  under_repair: "border-l-brass-400",
  awaiting_retest: "border-l-brass-300",
  closed: "border-l-kelp-400",
  deferred: "border-l-hull-500",
  accepted_as_is: "border-l-hull-500",
};
export function StatusBadge({ status }: { status: DefectStatus; title?: string }) {
  return (
    <span
      data-status={status}
      className={`repair-tag inline-flex items-center gap-1.5 whitespace-nowrap border-l-4 bg-hull-800 py-0.5 pl-2.5 pr-2 text-xs font-semibold ${STATUS_EDGE[status]}`}
    >
      <span aria-hidden="true" className="font-mono">
        {STATUS_MARK[status]}
      </span>
      {DEFECT_STATUS_LABELS[status]}
    </span>
  );
}

export function FlagMarks({ safety, blocking }: { safety: boolean; blocking: boolean }) {
  if (!safety && !blocking) return null;
  return (
    <span className="mt-1 flex flex-wrap gap-1 text-xs">
      {safety && <span className="rounded border border-flare-400 px-1.5 text-flare-300">⚡ Safety-critical</span>}
      {blocking && <span className="rounded border border-brass-400 px-1.5 text-brass-300">■ Blocks energising</span>}
    </span>
  );
}

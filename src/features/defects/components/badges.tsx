import { DEFECT_SEVERITY_LABELS, DEFECT_STATUS_LABELS, type DefectSeverity, type DefectStatus } from "../../../domain/vocab";

// Condition is never colour alone: every badge carries its words (and severity its number).
const SEVERITY_TONE: Record<DefectSeverity, string> = {
  cosmetic: "bg-hull-700 text-mist",
  degraded: "bg-tide-700 text-tide-300",
  impaired: "bg-rust-700 text-rust-300",
  disabling: "bg-flare-700 text-flare-300",
};
export function SeverityBadge({ severity }: { severity: DefectSeverity }) {
  return <span className={`inline-block whitespace-nowrap rounded px-2 py-0.5 text-xs font-semibold ${SEVERITY_TONE[severity]}`}>{DEFECT_SEVERITY_LABELS[severity]}</span>;
}

const STATUS_MARK: Record<DefectStatus, string> = {
  open: "○", triaged: "◔", in_repair: "◑", awaiting_verification: "◕", closed: "●", deferred: "⏸", wont_fix: "✕",
};
export function StatusBadge({ status }: { status: DefectStatus; title?: string }) {
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap rounded bg-hull-800 px-2 py-0.5 text-xs ring-1 ring-hull-600">
      <span aria-hidden="true">{STATUS_MARK[status]}</span>
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

import { HERITAGE_RULE_LABELS, PART_STATUS_LABELS, type HeritageRule, type PartStatus } from "../../../domain/vocab";

/** Shape + words, never colour alone: ◆ strict, ◈ period, ○ anything that fits. */
const RULE_STYLE: Record<HeritageRule, { mark: string; cls: string }> = {
  original_only: { mark: "◆", cls: "border-brass-400 bg-brass-700/40 text-brass-300" },
  period_ok: { mark: "◈", cls: "border-tide-400 bg-tide-700/40 text-tide-300" },
  modern_ok: { mark: "○", cls: "border-kelp-400 bg-kelp-700/40 text-kelp-300" },
};

export function HeritageRuleBadge({ rule, large = false }: { rule: HeritageRule; large?: boolean }) {
  const s = RULE_STYLE[rule];
  return (
    <span data-testid="heritage-rule" className={`inline-flex items-center gap-1.5 rounded-md border-2 font-semibold ${s.cls} ${large ? "px-3 py-1.5 text-base" : "px-2 py-0.5 text-sm"}`}>
      <span aria-hidden="true">{s.mark}</span>
      {HERITAGE_RULE_LABELS[rule]}
    </span>
  );
}

const STEPS: PartStatus[] = ["wanted", "lead_found", "acquired", "received", "fitted"];

export function PartStatusBadge({ status }: { status: PartStatus }) {
  const step = STEPS.indexOf(status);
  const cls = status === "cancelled" ? "bg-hull-700 text-mist line-through decoration-1" : status === "fitted" ? "bg-kelp-700 text-chalk" : "bg-hull-700 text-chalk";
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap rounded px-2 py-0.5 text-sm ${cls}`}>
      {step >= 0 && <span className="font-mono text-xs text-mist" aria-hidden="true">{step + 1}/5</span>}
      {PART_STATUS_LABELS[status]}
    </span>
  );
}

export const money = (v: number | null | undefined) => (v == null ? "—" : v.toLocaleString("en-GB", { minimumFractionDigits: 2, maximumFractionDigits: 2 }));

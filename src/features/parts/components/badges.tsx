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
    <span
      data-testid="heritage-rule"
      className={`inline-flex items-center gap-1.5 rounded-md border-2 font-semibold ${s.cls} ${large ? "px-3 py-1.5 text-base" : "px-2 py-0.5 text-sm"}`}
    >
      <span aria-hidden="true">{s.mark}</span>
      {HERITAGE_RULE_LABELS[rule]}
    </span>
  );
}

/*
 * Where the part is on its way to the board, as a store-room word with a mark of its own
 * (⌕ hunted, ☍ a lead, ➜ on its way, ☑ in the store and inspected, ⚙ fitted, — cancelled). The marks
 * are decoration beside the word (aria-hidden) and none is in the shipped fonts, so they come from the system's
 * fallback fonts: on Debian (`fc-list ':charset=26df'`) no font carried ⛟, which drew as an empty box; DejaVu Sans
 * carries the ones above.
 */
const PART_MARK: Record<PartStatus, string> = {
  wanted: "⌕",
  lead_found: "☍",
  acquired: "➜",
  received: "☑",
  fitted: "⚙",
  cancelled: "—",
};

export function PartStatusBadge({ status }: { status: PartStatus }) {
  const cls =
    status === "cancelled"
      ? "border-hull-600 text-mist line-through decoration-1"
      : status === "fitted"
        ? "border-kelp-400 text-kelp-300"
        : "border-hull-500 text-chalk";
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap border-b-2 px-1 py-0.5 text-sm ${cls}`}>
      <span className="font-mono text-xs" aria-hidden="true">
        {PART_MARK[status]}
      </span>
      {PART_STATUS_LABELS[status]}
    </span>
  );
}

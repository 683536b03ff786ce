import { VERDICT_LABELS, type Verdict } from "../../../domain/reading-judgement";

/** Text and a shape for each verdict, never colour alone. */
const LOOK: Record<Verdict, { mark: string; cls: string }> = {
  meets: { mark: "✓", cls: "bg-kelp-700/40 text-kelp-300 ring-kelp-400" },
  below_minimum: { mark: "▼", cls: "bg-flare-700/40 text-flare-300 ring-flare-400" },
  investigate: { mark: "?", cls: "bg-rust-700/40 text-rust-300 ring-rust-400" },
  not_valid: { mark: "⊘", cls: "bg-hull-800 text-mist ring-hull-500" },
};

export function VerdictBadge({ verdict }: { verdict: Verdict }) {
  const look = LOOK[verdict];
  return (
    <span
      data-verdict={verdict}
      className={`inline-flex items-center gap-1 rounded px-2 py-0.5 text-sm font-semibold ring-1 ${look.cls}`}
    >
      <span aria-hidden="true" className="font-mono">
        {look.mark}
      </span>
      {VERDICT_LABELS[verdict]}
    </span>
  );
}

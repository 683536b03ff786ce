/**
 * Operations budget of an old breaker: every open and close wears a mechanism that has
 * not been made for decades, so the crew operates it as few times as possible. The
 * budget warns, it never blocks. Defaults are Tideline's, for the curator to change:
 * common practice is to spare pre-1950 breakers; the endurance figures in the LV power
 * breaker standards (ANSI C37.50 / IEEE C37.13, thousands of operations for a new breaker
 * — cited from memory) do not apply to a flooded 80-year-old mechanism.
 */
import type { ComponentKind } from "./vocab";

/** Kinds whose opens and closes are counted against a budget. */
export const OPERATED_KINDS: ReadonlySet<ComponentKind> = new Set([
  "molded_case_breaker",
  "power_breaker",
  "bus_tie",
  "switch",
]);

/** Tideline's default budgets by age (year on the nameplate; unknown counts as old). */
export const DEFAULT_BUDGETS = [
  { before: 1950, operations: 10, basis: "Made before 1950 (or year unknown): spare it — Tideline's default" },
  { before: 1980, operations: 50, basis: "Made 1950–1979 — Tideline's default" },
  { before: Infinity, operations: 500, basis: "Made 1980 or later — Tideline's default" },
] as const;

/**
 * The default operations budget for a component, or null when its kind is not counted.
 * @param year nameplate year, or null when unknown (treated as pre-1950: the cautious reading)
 */
export function defaultOperationsBudget(
  kind: ComponentKind,
  year: number | null,
): { budget: number; basis: string } | null {
  if (!OPERATED_KINDS.has(kind)) return null;
  if (year !== null && !(Number.isInteger(year) && year > 1800 && year < 3000))
    throw new RangeError(`year must be a plausible year, got ${year}`);
  const row = DEFAULT_BUDGETS.find((b) => (year ?? 0) < b.before)!;
  return { budget: row.operations, basis: row.basis };
}

export interface OperationsStatus {
  used: number;
  budget: number;
  remaining: number;
  /** Would `planned` more operations take it past its budget? */
  wouldExceed: boolean;
  overBudget: boolean;
  warning: string | null;
}

/**
 * Operations used against the budget, and a warning when `planned` more would pass it.
 * The suggestion follows the trade's habit: feed the section from the temporary supply
 * instead of working the old breaker.
 */
export function operationsStatus(used: number, budget: number, planned = 0): OperationsStatus {
  for (const [n, v] of [
    ["used", used],
    ["budget", budget],
    ["planned", planned],
  ] as const)
    if (!Number.isInteger(v) || v < 0) throw new RangeError(`${n} must be a whole number ≥ 0, got ${v}`);
  const remaining = budget - used;
  const overBudget = used > budget;
  const wouldExceed = used + planned > budget;
  let warning: string | null = null;
  if (overBudget) warning = `Operated ${used} times against a budget of ${budget}.`;
  else if (wouldExceed)
    warning = `${planned} more operation${planned === 1 ? "" : "s"} would pass its budget (${used} of ${budget} used).`;
  if (warning) warning += " Consider energising from the temporary supply instead of operating it.";
  return { used, budget, remaining, wouldExceed, overBudget, warning };
}

/**
 * The wanted list's own rules beyond the spec key of ./parts: which status moves are
 * allowed, how a need (a whole component or a named sub-part) is keyed against a line's
 * must-match list, and how estimated and spent money split across boards.
 * All Tideline's own rules (no external standard); the money split is plain
 * proportional allocation (common practice).
 */
import { partSpecKey, normaliseText, type PartSpec } from "./parts";
import { requireNumber, requireOneOf } from "./guards";
import { COMPONENT_KIND_LABELS, PART_STATUSES, type HeritageRule, type PartStatus } from "./vocab";

export const LEAD_SOURCE_KINDS = ["donor", "dealer", "collector", "salvage", "other"] as const;
export type LeadSourceKind = (typeof LEAD_SOURCE_KINDS)[number];
export const LEAD_SOURCE_KIND_LABELS: Record<LeadSourceKind, string> = {
  donor: "Donor vessel or site",
  dealer: "Dealer",
  collector: "Collector",
  salvage: "Salvage yard",
  other: "Other",
};

export const LEAD_STATUSES = ["open", "chasing", "secured", "dead"] as const;
export type LeadStatus = (typeof LEAD_STATUSES)[number];
export const LEAD_STATUS_LABELS: Record<LeadStatus, string> = {
  open: "Noted",
  chasing: "Chasing",
  secured: "Secured",
  dead: "Came to nothing",
};

/** Lines still being worked: demand can join them. */
export const OPEN_PART_STATUSES: readonly PartStatus[] = ["wanted", "lead_found", "acquired", "received"];

/** Allowed moves. Forward along the chain, one step back to undo a slip, cancel from any open state, reopen a cancelled line. */
const MOVES: Record<PartStatus, readonly PartStatus[]> = {
  wanted: ["lead_found", "acquired", "cancelled"],
  lead_found: ["wanted", "acquired", "cancelled"],
  acquired: ["lead_found", "received", "cancelled"],
  received: ["acquired", "fitted", "cancelled"],
  fitted: [],
  cancelled: ["wanted"],
};

/** @throws RangeError for a status outside PART_STATUSES */
export function canMovePart(from: PartStatus, to: PartStatus): boolean {
  requireOneOf("from", from, PART_STATUSES);
  requireOneOf("to", to, PART_STATUSES);
  return MOVES[from].includes(to);
}

export const nextPartStatuses = (from: PartStatus): readonly PartStatus[] =>
  MOVES[requireOneOf("from", from, PART_STATUSES)];

/**
 * Key of a need against a line: partSpecKey of the spec under the line's must-match list,
 * plus the normalised sub-part text when the need is not the whole component
 * ("|need=arc%20chute"). A blank need keys exactly like the spec alone.
 */
export function needKey(spec: PartSpec, need?: string | null): string {
  const text = normaliseText(need);
  const base = partSpecKey(spec);
  return text ? `${base}|need=${encodeURIComponent(text)}` : base;
}

/** True when a need joins a line whose spec and must-match list are given. */
export function needMatchesLine(
  need: { spec: PartSpec; need?: string | null },
  line: { spec: PartSpec; need?: string | null },
): boolean {
  const mustMatch = line.spec.mustMatch;
  return needKey({ ...need.spec, mustMatch }, need.need) === needKey(line.spec, line.need);
}

export interface BudgetLineInput {
  /** Quantity per board id ("" for needs tied to no board: spares, consumables). */
  qtyByBoard: Record<string, number>;
  estimatedUnitCost: number | null;
  /** Sum of the line's acquisition costs. */
  spent: number;
}
export interface BudgetRow {
  boardId: string;
  estimated: number;
  spent: number;
  /** Lines with a quantity here but no estimated unit cost yet. */
  unestimatedLines: number;
}

const round2 = (x: number) => Math.round(x * 100) / 100;

/**
 * Estimated vs spent per board. estimated = unit cost × qty on that board; spent is the
 * line's acquisition total shared in proportion to each board's quantity (a line with no
 * quantity left puts its spend on "" — not tied to a board). Money in the site's currency,
 * rounded to cents. Proportional allocation: common practice.
 * @throws RangeError for a negative quantity, cost or spend
 */
export function budgetByBoard(lines: readonly BudgetLineInput[]): {
  rows: BudgetRow[];
  total: { estimated: number; spent: number };
} {
  const rows = new Map<string, BudgetRow>();
  const row = (b: string) =>
    rows.get(b) ?? rows.set(b, { boardId: b, estimated: 0, spent: 0, unestimatedLines: 0 }).get(b)!;
  for (const line of lines) {
    requireNumber("spent", line.spent, { min: 0 });
    if (line.estimatedUnitCost !== null) requireNumber("estimatedUnitCost", line.estimatedUnitCost, { min: 0 });
    const entries = Object.entries(line.qtyByBoard).filter(([, q]) => requireNumber("qty", q, { min: 0 }) > 0);
    const totalQty = entries.reduce((s, [, q]) => s + q, 0);
    if (totalQty === 0 && line.spent > 0) row("").spent += line.spent;
    for (const [board, q] of entries) {
      const r = row(board);
      if (line.estimatedUnitCost === null) r.unestimatedLines += 1;
      else r.estimated += line.estimatedUnitCost * q;
      r.spent += (line.spent * q) / totalQty;
    }
  }
  const out = [...rows.values()].map((r) => ({ ...r, estimated: round2(r.estimated), spent: round2(r.spent) }));
  const total = out.reduce(
    (t, r) => ({ estimated: round2(t.estimated + r.estimated), spent: round2(t.spent + r.spent) }),
    { estimated: 0, spent: 0 },
  );
  return { rows: out, total };
}

/**
 * One readable line for a spec, e.g. "Power (open-frame) breaker · 225 A · 3-pole · 600 V ·
 * frame K-225 · Drawout · Northbay Electric NB 3 — arc chute". Blank fields are left out.
 */
/** A frame in words: "frame L-400", but "100 A frame" as given ("frame 100 A frame" reads doubled). */
export const frameWords = (frame: string) => (/\bframe\b/i.test(frame) ? frame.trim() : `frame ${frame.trim()}`);

export function partTitle(spec: PartSpec, need?: string | null): string {
  const bits = [COMPONENT_KIND_LABELS[spec.kind] ?? spec.kind];
  if (spec.ratingAmps != null) bits.push(`${spec.ratingAmps} A`);
  if (spec.poles != null) bits.push(`${spec.poles}-pole`);
  if (spec.voltageRating != null) bits.push(`${spec.voltageRating} V`);
  if (spec.frame?.trim()) bits.push(frameWords(spec.frame));
  if (spec.mounting?.trim()) bits.push(spec.mounting.trim());
  const maker = [spec.maker?.trim(), spec.model?.trim()].filter(Boolean).join(" ");
  if (maker) bits.push(maker);
  const title = bits.join(" · ");
  return need?.trim() ? `${title} — ${need.trim()}` : title;
}

/** What a fitted part makes of the component it goes into: its heritage stays, or it becomes a period or modern replacement. */
export type FittedHeritageChoice = "unchanged" | "period" | "modern";

/**
 * The default answer to "what does the fitted part make of the component?".
 * A line naming a sub-part ("arc chute", its `need`) is fitted into the existing component, whose
 * heritage stays. A line without one sources a whole component, and a whole component that comes
 * from the wanted list is never the original fabric it replaces (common practice of heritage
 * conservation: original fabric is the material that was there; a like-for-like salvage part is a
 * period replacement). Lines that allow a modern equivalent default to a modern replacement;
 * "original pattern only" and "period equivalent" lines to a period one. The person fitting it
 * can still choose otherwise.
 */
export function defaultFittedHeritage(line: { need: string; heritageRule: HeritageRule }): FittedHeritageChoice {
  requireOneOf<HeritageRule>("heritageRule", line.heritageRule, ["original_only", "period_ok", "modern_ok"]);
  if (normaliseText(line.need)) return "unchanged";
  return line.heritageRule === "modern_ok" ? "modern" : "period";
}

/**
 * A wanted-list line's short number, said on the phone or written on a parcel: "W-12" (Tideline's
 * own prefix, W for wanted). Numbers are per site, given by the database in order of creation.
 */
export function lineRef(number: number): string {
  requireNumber("number", number);
  if (!Number.isInteger(number) || number < 1)
    throw new RangeError(`number must be a whole number from 1, got ${number}`);
  return `W-${number}`;
}

/** The line number a person typed: "W-12", "w12", "W 12", "#12" or "12" → 12; anything else → null. */
export function parseLineRef(typed: string): number | null {
  if (typeof typed !== "string") throw new RangeError("typed must be a string");
  const m = /^\s*(?:w\s*-?\s*|#\s*)?0*(\d{1,9})\s*$/i.exec(typed);
  if (!m) return null;
  const n = Number(m[1]);
  return n >= 1 && n <= 2_147_483_647 ? n : null;
}

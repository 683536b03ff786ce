/**
 * Work-order priority for defects: Tideline's own points formula, shown term by term
 * so a curator can see why one defect sits above another. Points are a planning aid;
 * hazards are controlled by qualified people, not by a score.
 */
import { DEFECT_SEVERITIES, type DefectSeverity } from "./vocab";
import { requireNumber, requireOneOf } from "./guards";

export const PARTS_AVAILABILITY = ["in_hand", "wanted", "none_needed", "unobtainable"] as const;
export type PartsAvailability = (typeof PARTS_AVAILABILITY)[number];

export const SEVERITY_POINTS: Record<DefectSeverity, number> = {
  cosmetic: 10,
  degraded: 25,
  impaired: 45,
  disabling: 70,
};
export const SAFETY_POINTS = 40;
export const BLOCKING_POINTS = 25;
export const HERITAGE_POINTS = 10;
export const PARTS_POINTS: Record<PartsAvailability, number> = {
  in_hand: 10,
  none_needed: 10,
  wanted: 0,
  unobtainable: -10,
};
/** Effort penalty: EFFORT_SCALE · log2(1 + hours), rounded, capped at EFFORT_CAP. */
export const EFFORT_SCALE = 8;
export const EFFORT_CAP = 30;
/** An unestimated defect is charged as one working day, so leaving effort blank never helps. */
export const UNKNOWN_EFFORT_HOURS = 8;

export interface PriorityInput {
  severity: DefectSeverity;
  safetyCritical: boolean;
  blocksEnergisation: boolean;
  originalFabric: boolean;
  /** Estimated hours of work, ≥ 0, or null when not estimated. */
  effortHours: number | null;
  partsAvailable: PartsAvailability;
}

export interface PriorityTerm {
  key: "severity" | "safety" | "blocking" | "heritage" | "effort" | "parts";
  label: string;
  points: number;
}

/** Effort penalty in points (≤ 0), monotone non-increasing in hours. */
export function effortPoints(effortHours: number | null): number {
  const h = effortHours === null ? UNKNOWN_EFFORT_HOURS : requireNumber("effortHours", effortHours, { min: 0 });
  return 0 - Math.min(EFFORT_CAP, Math.round(EFFORT_SCALE * Math.log2(1 + h))); // 0 − x avoids −0
}

/**
 * Priority score, higher first. Formula (Tideline's own, no external source):
 *   score = severity (cosmetic 10, degraded 25, impaired 45, disabling 70)
 *         + 40 if safety-critical + 25 if it blocks energisation + 10 if original fabric
 *         + parts (in hand or none needed +10, wanted 0, unobtainable −10)
 *         − min(30, round(8 · log2(1 + effort hours)))   (blank effort counts as 8 h)
 * Integer points; `terms` always lists all six and sums exactly to `score`.
 * @throws RangeError for an unknown severity or parts value, or negative/NaN hours
 */
export function priorityScore(input: PriorityInput): { score: number; terms: PriorityTerm[] } {
  requireOneOf("severity", input.severity, DEFECT_SEVERITIES);
  requireOneOf("partsAvailable", input.partsAvailable, PARTS_AVAILABILITY);
  const effort = effortPoints(input.effortHours);
  const effortLabel =
    input.effortHours === null
      ? `Effort not estimated (counted as ${UNKNOWN_EFFORT_HOURS} h)`
      : `Effort ${input.effortHours} h`;
  const terms: PriorityTerm[] = [
    { key: "severity", label: `Severity: ${input.severity}`, points: SEVERITY_POINTS[input.severity] },
    { key: "safety", label: "Safety-critical", points: input.safetyCritical ? SAFETY_POINTS : 0 },
    { key: "blocking", label: "Blocks energisation", points: input.blocksEnergisation ? BLOCKING_POINTS : 0 },
    { key: "heritage", label: "Original fabric", points: input.originalFabric ? HERITAGE_POINTS : 0 },
    { key: "effort", label: effortLabel, points: effort },
    {
      key: "parts",
      label: `Parts: ${input.partsAvailable.replace("_", " ")}`,
      points: PARTS_POINTS[input.partsAvailable],
    },
  ];
  return { score: terms.reduce((s, t) => s + t.points, 0), terms };
}

export interface Rankable {
  id: string;
  /** ISO 8601 timestamp. */
  createdAt: string;
  score: number;
  /** A safety-critical defect ranks above every defect that is not: a shock or arc-flash hazard comes first. */
  safetyCritical?: boolean;
  /**
   * Settled: no longer open work (closed, deferred or accepted as is; `ACTIVE_STATUSES` of defect-workflow.ts are
   * the open ones). Every settled defect ranks below all open work, so the register's first rows are what is still
   * to do. Absent means open.
   */
  settled?: boolean;
  pin?: { direction: "above" | "below"; relativeTo: string } | null;
}

function timeOf(createdAt: string): number {
  const t = Date.parse(createdAt);
  if (Number.isNaN(t)) throw new RangeError(`createdAt must be an ISO 8601 timestamp, got ${createdAt}`);
  return t;
}

/**
 * Stable order: open work before settled defects, then safety-critical first (whatever the points: a hazard is
 * never outranked by convenience), then score descending, then older first (createdAt ascending), then id.
 */
export function compareByPriority(a: Rankable, b: Rankable): number {
  const da = a.settled ? 1 : 0;
  const db = b.settled ? 1 : 0;
  if (da !== db) return da - db;
  const sa = a.safetyCritical ? 1 : 0;
  const sb = b.safetyCritical ? 1 : 0;
  if (sa !== sb) return sb - sa;
  if (a.score !== b.score) return b.score - a.score;
  const dt = timeOf(a.createdAt) - timeOf(b.createdAt);
  if (dt !== 0) return dt;
  return a.id < b.id ? -1 : a.id > b.id ? 1 : 0;
}

/**
 * Ranks defects by compareByPriority, then applies curator pins: a pinned item moves to
 * just above or below the item it names. Pins are applied one at a time in base order,
 * so when pins conflict the later one wins; a pin to a missing id or to itself is ignored.
 * @throws RangeError for duplicate ids or an unparsable createdAt
 */
export function rankDefects<T extends Rankable>(items: readonly T[]): T[] {
  const ids = new Set(items.map((i) => i.id));
  if (ids.size !== items.length) throw new RangeError("defect ids must be unique");
  const base = [...items].sort(compareByPriority);
  const order = base.slice();
  for (const item of base) {
    const pin = item.pin;
    if (!pin || pin.relativeTo === item.id || !ids.has(pin.relativeTo)) continue;
    order.splice(order.indexOf(item), 1);
    const target = order.findIndex((x) => x.id === pin.relativeTo);
    order.splice(pin.direction === "above" ? target : target + 1, 0, item);
  }
  return order;
}

/** The formula in words for the help page, built from the constants above. */
export const PRIORITY_FORMULA_TEXT = [
  "**How Tideline orders defects** (highest priority score first)",
  "",
  `- Severity: cosmetic ${SEVERITY_POINTS.cosmetic}, degraded ${SEVERITY_POINTS.degraded}, impaired ${SEVERITY_POINTS.impaired}, disabling ${SEVERITY_POINTS.disabling}`,
  `- Safety-critical: +${SAFETY_POINTS}`,
  `- Blocks energising its section: +${BLOCKING_POINTS}`,
  `- Original fabric at risk: +${HERITAGE_POINTS}`,
  `- Parts: in hand or none needed +${PARTS_POINTS.in_hand}, wanted ${PARTS_POINTS.wanted}, unobtainable ${PARTS_POINTS.unobtainable}`,
  `- Effort: minus ${EFFORT_SCALE} × log₂(1 + hours), at most ${EFFORT_CAP}; a blank estimate counts as ${UNKNOWN_EFFORT_HOURS} hours`,
  "",
  "Open work comes first: defects closed, deferred or accepted as is follow every defect still to do.",
  "Among each, safety-critical defects always come before every defect that is not, whatever the points; the points order each group.",
  "Equal scores: the older defect first, then by reference. The curator can place a defect just before or after another (the curator's order).",
  "The score plans the work; it does not make anything safe. Hazards are for qualified people under NFPA 70E.",
].join("\n");

/**
 * Part specifications for the wanted list: a canonical key so that identical needs
 * from different board positions merge into one line for the scrounger, and any
 * difference in a field that must match keeps them apart.
 */
import { COMPONENT_KINDS, type ComponentKind } from "./vocab";
import { requireNumber, requireOneOf, requirePositive } from "./guards";

export const SPEC_FIELDS = ["ratingAmps", "poles", "voltageRating", "frame", "mounting", "maker", "model"] as const;
export type SpecField = (typeof SPEC_FIELDS)[number];

export interface PartSpec {
  kind: ComponentKind;
  ratingAmps?: number | null;
  poles?: number | null;
  voltageRating?: number | null;
  frame?: string | null;
  mounting?: string | null;
  maker?: string | null;
  model?: string | null;
  /** Fields two needs must share to merge. Absent → every field must match. */
  mustMatch?: string[];
}

/**
 * Free-text normalisation: Unicode NFKC, trim, collapse runs of whitespace to one
 * space, lowercase. Punctuation is kept, so "K-225" and "K 225" stay different:
 * makers' catalogue numbers use hyphens meaningfully, and a wrong merge (one line
 * standing for two different parts) costs more than a duplicate line a person can see.
 */
export function normaliseText(value: string | null | undefined): string {
  if (value == null) return "";
  if (typeof value !== "string") throw new RangeError("text fields must be strings");
  return value.normalize("NFKC").trim().replace(/\s+/g, " ").toLowerCase();
}

function fieldValue(spec: PartSpec, field: SpecField): string {
  const v = spec[field];
  if (v == null) return "";
  if (field === "poles") {
    requireNumber("poles", v as number, { min: 1 });
    if (!Number.isInteger(v)) throw new RangeError(`poles must be a whole number, got ${String(v)}`);
    return String(v);
  }
  if (field === "ratingAmps" || field === "voltageRating") return String(requirePositive(field, v as number));
  return encodeURIComponent(normaliseText(v as string));
}

function mustMatchFields(spec: PartSpec): SpecField[] {
  if (spec.mustMatch === undefined) return [...SPEC_FIELDS];
  if (!Array.isArray(spec.mustMatch)) throw new RangeError("mustMatch must be an array");
  const chosen = new Set(spec.mustMatch.map((f) => requireOneOf("mustMatch field", f as SpecField, SPEC_FIELDS)));
  return SPEC_FIELDS.filter((f) => chosen.has(f));
}

/**
 * Canonical key of a part need.
 * Formula: "kind|field=value|…" over the must-match fields in SPEC_FIELDS order, text
 * normalised (normaliseText) and URI-encoded, empty for a blank field; when mustMatch
 * is given the key also carries the list ("~fields"), so needs with different
 * must-match lists never merge. Source: Tideline's own rule (no external standard).
 * @throws RangeError for an unknown kind or mustMatch field, non-positive rating or voltage, non-integer poles
 */
export function partSpecKey(spec: PartSpec): string {
  requireOneOf("kind", spec.kind, COMPONENT_KINDS);
  SPEC_FIELDS.forEach((f) => fieldValue(spec, f)); // validate every field, compared or not
  const fields = mustMatchFields(spec);
  const body = fields.map((f) => `${f}=${fieldValue(spec, f)}`);
  const suffix = spec.mustMatch === undefined ? [] : [`~${fields.join(",")}`];
  return [spec.kind, ...body, ...suffix].join("|");
}

/** True when two needs would merge into one wanted-list line. */
export function sameSpec(a: PartSpec, b: PartSpec): boolean {
  return partSpecKey(a) === partSpecKey(b);
}

export interface DemandLine {
  key: string;
  /** The first-seen spec of the group (its wording is what the list shows). */
  spec: PartSpec;
  qty: number;
  /** Board positions needing it, first-seen order, without repeats. */
  positionIds: string[];
}

/**
 * Merges needs with the same partSpecKey: quantities add, position ids collect.
 * Lines come out in the order their first need appears.
 * @throws RangeError for a quantity that is not a whole number ≥ 1, or a bad spec
 */
export function aggregateDemand(
  items: ReadonlyArray<{ spec: PartSpec; positionId?: string; qty: number }>,
): DemandLine[] {
  const lines = new Map<string, DemandLine>();
  for (const item of items) {
    requireNumber("qty", item.qty, { min: 1 });
    if (!Number.isInteger(item.qty)) throw new RangeError(`qty must be a whole number, got ${item.qty}`);
    const key = partSpecKey(item.spec);
    const line = lines.get(key) ?? { key, spec: item.spec, qty: 0, positionIds: [] };
    line.qty += item.qty;
    if (item.positionId !== undefined && !line.positionIds.includes(item.positionId))
      line.positionIds.push(item.positionId);
    lines.set(key, line);
  }
  return [...lines.values()];
}

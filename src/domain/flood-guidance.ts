/**
 * First-pass disposition for a flood-exposed component: clean, rebuild, replace or
 * source. Tideline's own small rule table, written from memory of NEMA GD 1
 * "Evaluating Water-Damaged Electrical Equipment" and the NFPA 70B chapter on
 * equipment exposed to water, and checked against published summaries of the NEMA
 * replace / recondition lists. It proposes; a qualified person decides on site with
 * the manufacturer where one exists. It never says equipment may be energised.
 */
import {
  COMPONENT_KINDS,
  CONTAMINANTS,
  HERITAGE,
  INSULATION_STATES,
  MECHANISM,
  WATER_TYPES,
  type ComponentKind,
  type Contaminant,
  type Disposition,
  type Heritage,
  type InsulationState,
  type Mechanism,
  type WaterType,
} from "./vocab";
import { astmD610Grade } from "./corrosion";
import { requireNumber, requireOneOf } from "./guards";

/** What the crew reads beside a recommendation: which guidance it follows. */
export const FLOOD_GUIDANCE_SOURCE =
  "Follows NEMA GD 1 (Evaluating Water-Damaged Electrical Equipment) and NFPA 70B (equipment exposed " +
  "to water); a qualified person confirms every result.";
/** Where the rule table comes from, for the help text of the flood record (not the recommendation). */
export const FLOOD_GUIDANCE_PROVENANCE =
  "Tideline's own small rule table, written from memory of NEMA GD 1 and the NFPA 70B chapter on equipment " +
  "exposed to water and checked against published summaries of the NEMA replace / recondition lists. " +
  "Check the current editions and the manufacturer's instructions.";

type Rule = { disposition: "rebuild" | "replace"; reason: string };

/** What the guide says for each kind once it has been below the water line (or wet inside). */
export const SUBMERGED_RULES: Record<ComponentKind, Rule> = {
  molded_case_breaker: {
    disposition: "replace",
    reason: "Submerged molded-case breakers are replaced: they are sealed and cannot be opened to clean and dry.",
  },
  fuse: {
    disposition: "replace",
    reason: "Submerged fuses are replaced; water and silt get into the fuse and its holder.",
  },
  meter: { disposition: "replace", reason: "Submerged meters and metering equipment are replaced." },
  relay: { disposition: "replace", reason: "Submerged electromechanical relays are replaced." },
  ground_lamp: { disposition: "replace", reason: "Submerged lamps and lampholders are replaced, as lighting is." },
  terminal_strip: {
    disposition: "replace",
    reason: "Terminal strips are treated like wiring devices, which are replaced after submersion.",
  },
  transformer: {
    disposition: "replace",
    reason:
      "Submerged dry-type and control transformers are replaced; only a liquid-filled unit may be reconditioned, on its maker's advice.",
  },
  power_breaker: {
    disposition: "rebuild",
    reason: "Power (open-frame) breakers may be reconditioned by trained people after consulting the manufacturer.",
  },
  busbar: {
    disposition: "rebuild",
    reason: "Bus structure may be reconditioned: cleaned, dried, inspected and tested by qualified people.",
  },
  bus_tie: {
    disposition: "rebuild",
    reason: "A bus tie is reconditioned with the bus structure and breakers it joins.",
  },
  switch: {
    disposition: "rebuild",
    reason:
      "Open and bolted-pressure switches may be reconditioned; an enclosed safety switch or molded-case switch is replaced instead.",
  },
  enclosed_switch: {
    disposition: "replace",
    reason: "Submerged enclosed safety switches are replaced, not reconditioned (NEMA GD 1).",
  },
  electronic_trip_unit: {
    disposition: "replace",
    reason:
      "Submerged electronic trip units (and their sensors and accessories) are replaced: water and silt ruin the electronics (NEMA GD 1).",
  },
  other: {
    disposition: "replace",
    reason: "Not in Tideline's table: submerged equipment is replaced unless its maker says it may be reconditioned.",
  },
};

const RANK: Record<Disposition, number> = { clean: 0, rebuild: 1, replace: 2, source: 3 };
const worse = (a: Disposition, b: Disposition): Disposition => (RANK[b] > RANK[a] ? b : a);
const CORROSIVE_WATER: readonly WaterType[] = ["salt", "brackish", "sewage"];
/** Signs the water reached the part whatever the recorded water line says (common practice). */
export const WATER_CONTACT_EVIDENCE: readonly Contaminant[] = [
  "water_inside",
  "silt",
  "water_marks",
  "corrosion_products",
];
/** Kinds that are sealed or electronic: they cannot be opened to degrease or wash. */
const SEALED_KINDS: readonly ComponentKind[] = [
  "molded_case_breaker",
  "electronic_trip_unit",
  "fuse",
  "meter",
  "relay",
  "enclosed_switch",
  "ground_lamp",
];

export interface FloodInput {
  kind: ComponentKind;
  waterType: WaterType;
  belowWaterLine: boolean;
  hoursSubmerged?: number;
  contaminants: Contaminant[];
  insulation?: InsulationState;
  mechanism?: Mechanism;
  percentRusted?: number;
  heritage?: Heritage;
}

export interface FloodRecommendation {
  disposition: Disposition;
  reasons: string[];
  source: string;
}

function validate(input: FloodInput): void {
  requireOneOf("kind", input.kind, COMPONENT_KINDS);
  requireOneOf("waterType", input.waterType, WATER_TYPES);
  if (typeof input.belowWaterLine !== "boolean") throw new RangeError("belowWaterLine must be true or false");
  if (!Array.isArray(input.contaminants)) throw new RangeError("contaminants must be an array");
  input.contaminants.forEach((c) => requireOneOf("contaminant", c, CONTAMINANTS));
  if (input.insulation !== undefined) requireOneOf("insulation", input.insulation, INSULATION_STATES);
  if (input.mechanism !== undefined) requireOneOf("mechanism", input.mechanism, MECHANISM);
  if (input.heritage !== undefined) requireOneOf("heritage", input.heritage, HERITAGE);
  if (input.hoursSubmerged !== undefined) {
    requireNumber("hoursSubmerged", input.hoursSubmerged, { min: 0 });
    if (input.hoursSubmerged > 0 && !input.belowWaterLine) {
      throw new RangeError("hoursSubmerged above 0 contradicts belowWaterLine = false");
    }
  }
}

const EVIDENCE_WORDS: Partial<Record<Contaminant, string>> = {
  water_inside: "water inside",
  silt: "silt",
  water_marks: "water marks",
  corrosion_products: "fresh corrosion products",
};

/** Step 1: exposure — water line, evidence of water contact, salt or sewage. */
function exposure(input: FloodInput, reasons: string[]): Disposition {
  const evidence = WATER_CONTACT_EVIDENCE.filter((c) => input.contaminants.includes(c));
  if (input.belowWaterLine || evidence.length > 0) {
    if (!input.belowWaterLine) {
      reasons.push(
        `Evidence of water contact (${evidence.map((c) => EVIDENCE_WORDS[c]).join(", ")}) overrides the recorded water line: treated as if it had been below it.`,
      );
    }
    const rule = SUBMERGED_RULES[input.kind];
    reasons.push(rule.reason);
    if (rule.disposition === "rebuild" && CORROSIVE_WATER.includes(input.waterType)) {
      reasons.push(
        "Salt or sewage residue is corrosive and conductive: reconditioning must include full strip-down and washing.",
      );
    }
    return rule.disposition;
  }
  if (CORROSIVE_WATER.includes(input.waterType) || input.contaminants.includes("salt_crust")) {
    reasons.push(
      "Above the water line, but salt or sewage residue is corrosive and conductive: recondition rather than just clean.",
    );
    return "rebuild";
  }
  reasons.push("Above the water line with no sign of water contact: clean and inspect.");
  if (input.contaminants.includes("mould")) reasons.push("Mould present: clean with suitable respiratory protection.");
  return "clean";
}

/** Step 2: condition found — insulation, mechanism, rust. */
function condition(input: FloodInput, start: Disposition, reasons: string[]): Disposition {
  let d = start;
  if (input.insulation === "charred") {
    d = worse(d, "replace");
    reasons.push("Charred insulation cannot be restored.");
  }
  if (input.insulation === "swollen") {
    d = worse(d, "replace");
    reasons.push("Swollen or delaminated insulation has lost its strength and cannot be restored.");
  }
  if (input.insulation === "tracking") {
    d = worse(d, "rebuild");
    reasons.push("Tracking must be removed and the insulation re-tested.");
  }
  if (input.contaminants.includes("oil")) {
    if (SEALED_KINDS.includes(input.kind)) {
      d = worse(d, "replace");
      reasons.push(
        "Oil on a sealed or electronic part: it cannot be opened to degrease, and oil carries silt and salt into it.",
      );
    } else {
      d = worse(d, "rebuild");
      reasons.push(
        "Oil on the part: strip and degrease, since oil holds conductive dirt on insulation and attacks some older insulating materials.",
      );
    }
  }
  if (input.mechanism === "seized") {
    d = worse(d, "replace");
    reasons.push("A seized mechanism means the part cannot be relied on to operate.");
  }
  if (input.mechanism === "stiff") {
    d = worse(d, "rebuild");
    reasons.push("A stiff mechanism needs stripping, cleaning and lubricating.");
  }
  if (input.percentRusted !== undefined && astmD610Grade(input.percentRusted) <= 3) {
    d = worse(d, "rebuild");
    reasons.push("More than 10 % of the surface is rusted (ASTM D610 grade 3 or worse): dismantle, not just clean.");
  }
  return d;
}

/**
 * Recommends clean / rebuild / replace / source with plain-sentence reasons.
 * Rules, in order: (1) below the water line, or any evidence of water contact (water
 * inside, silt, water marks, fresh corrosion products — the evidence overrides the
 * recorded water line) → SUBMERGED_RULES by kind (enclosed safety switches and electronic
 * trip units are replaced);
 * above it → clean, or rebuild when the water was salt, brackish or sewage or a salt
 * crust is present. (2) Charred or swollen insulation or a seized mechanism → replace;
 * tracking, a stiff mechanism or rust over 10 % (ASTM D610 grade ≤ 3) → at least
 * rebuild; oil → replace for sealed or electronic kinds, else at least rebuild (Tideline's
 * rule: oil holds conductive dirt and cannot be washed out of a sealed part). (3) An original part that would be replaced → source, since originals are
 * no longer made. Submersion time is recorded but sets no threshold (the guide gives none).
 * Source: FLOOD_GUIDANCE_SOURCE (from memory of NEMA GD 1 / NFPA 70B).
 * @throws RangeError for values outside the vocab lists, negative hours, hours submerged
 *   for a part above the water line, or a percentRusted outside 0–100
 */
export function recommendDisposition(input: FloodInput): FloodRecommendation {
  validate(input);
  const reasons: string[] = [];
  let d = condition(input, exposure(input, reasons), reasons);
  if (input.heritage === "original" && d === "replace") {
    d = "source";
    reasons.push(
      "Original fabric: originals are no longer made, so source a period part, or have a qualified person judge whether this one can be rebuilt.",
    );
  } else if (input.heritage === "original" && d === "rebuild") {
    reasons.push("Original fabric: keep it and rebuild it.");
  }
  reasons.push(
    "A qualified person confirms this on site; Tideline does not judge equipment fit to energise (see NFPA 70E).",
  );
  return { disposition: d, reasons, source: FLOOD_GUIDANCE_SOURCE };
}

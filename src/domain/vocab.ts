/**
 * The words Tideline uses for the things on a board, each as a closed list with a
 * plain-language label. Stored values are the keys (snake_case); screens show labels.
 * Imported by the schemas, the server and the client, so every list exists once.
 */

export const ROLES = ["curator", "volunteer", "photographer", "scrounger", "viewer"] as const;
export type Role = (typeof ROLES)[number];
export const ROLE_LABELS: Record<Role, string> = {
  curator: "Curator (restoration lead)",
  volunteer: "Volunteer",
  photographer: "Photographer",
  scrounger: "Parts scrounger",
  viewer: "Viewer",
};

export const WATER_TYPES = ["fresh", "brackish", "salt", "sewage"] as const;
export type WaterType = (typeof WATER_TYPES)[number];
export const WATER_TYPE_LABELS: Record<WaterType, string> = {
  fresh: "Fresh water",
  brackish: "Brackish water",
  salt: "Salt water",
  sewage: "Sewage-contaminated",
};

export const EARTHING = ["ungrounded", "solid", "resistance"] as const;
export type Earthing = (typeof EARTHING)[number];
export const EARTHING_LABELS: Record<Earthing, string> = {
  ungrounded: "Ungrounded (isolated)",
  solid: "Solidly grounded",
  resistance: "Resistance grounded",
};

/** What sits in a position. Breakers are split because flood guidance treats them apart. */
export const COMPONENT_KINDS = [
  "molded_case_breaker",
  "power_breaker",
  "meter",
  "ground_lamp",
  "fuse",
  "switch",
  "bus_tie",
  "busbar",
  "transformer",
  "relay",
  "terminal_strip",
  "other",
  "electronic_trip_unit",
  "enclosed_switch",
] as const;
export type ComponentKind = (typeof COMPONENT_KINDS)[number];
export const COMPONENT_KIND_LABELS: Record<ComponentKind, string> = {
  molded_case_breaker: "Molded-case breaker",
  power_breaker: "Air circuit breaker (open-frame power breaker)",
  meter: "Meter",
  ground_lamp: "Ground-detection lamp",
  fuse: "Fuse / fuse holder",
  switch: "Switch",
  bus_tie: "Bus tie",
  busbar: "Busbar / bus section",
  transformer: "Transformer",
  relay: "Relay",
  terminal_strip: "Terminal strip",
  other: "Other",
  electronic_trip_unit: "Electronic trip unit",
  enclosed_switch: "Enclosed safety switch",
};
/** Short text shown on a board tile beside the kind glyph (never colour alone). */
export const COMPONENT_KIND_SHORT: Record<ComponentKind, string> = {
  // The trade's abbreviations: MCCB (molded-case circuit breaker; MCB is a miniature breaker),
  // ACB (air circuit breaker, the open-frame low-voltage power circuit breaker).
  molded_case_breaker: "MCCB",
  power_breaker: "ACB",
  meter: "MTR",
  ground_lamp: "GL",
  fuse: "FU",
  switch: "SW",
  bus_tie: "TIE",
  busbar: "BUS",
  transformer: "XFMR",
  relay: "RLY",
  terminal_strip: "TB",
  other: "OTH",
  electronic_trip_unit: "ETU",
  enclosed_switch: "ESW",
};

export const HERITAGE = ["original", "period", "modern"] as const;
export type Heritage = (typeof HERITAGE)[number];
export const HERITAGE_LABELS: Record<Heritage, string> = {
  original: "Original to the board",
  period: "Period replacement",
  modern: "Modern replacement",
};

export const DISPOSITIONS = ["clean", "rebuild", "replace", "source"] as const;
export type Disposition = (typeof DISPOSITIONS)[number];
export const DISPOSITION_LABELS: Record<Disposition, string> = {
  clean: "Clean",
  rebuild: "Rebuild",
  replace: "Replace",
  source: "Source",
};

export const CUSTODY = [
  "in_place",
  "removed",
  "in_workshop",
  "ready_to_refit",
  "refitted",
  "scrapped",
  "missing",
] as const;
export type Custody = (typeof CUSTODY)[number];
export const CUSTODY_LABELS: Record<Custody, string> = {
  in_place: "In place",
  removed: "Removed (tagged)",
  in_workshop: "In workshop",
  ready_to_refit: "Ready to refit",
  refitted: "Refitted",
  scrapped: "Scrapped",
  missing: "Missing",
};

export const MECHANISM = ["free", "stiff", "seized", "not_tried"] as const;
export type Mechanism = (typeof MECHANISM)[number];
export const MECHANISM_LABELS: Record<Mechanism, string> = {
  free: "Operates freely",
  stiff: "Stiff",
  seized: "Seized",
  not_tried: "Not tried",
};

export const INSULATION_STATES = ["intact", "tracking", "charred", "swollen"] as const;
export type InsulationState = (typeof INSULATION_STATES)[number];
export const INSULATION_STATE_LABELS: Record<InsulationState, string> = {
  intact: "Intact",
  tracking: "Tracking",
  charred: "Charred",
  swollen: "Swollen / delaminated",
};

export const CONTAMINANTS = [
  "silt",
  "salt_crust",
  "oil",
  "mould",
  "water_inside",
  "water_marks",
  "corrosion_products",
] as const;
export type Contaminant = (typeof CONTAMINANTS)[number];
export const CONTAMINANT_LABELS: Record<Contaminant, string> = {
  silt: "Silt / mud",
  salt_crust: "Salt crust",
  oil: "Oil",
  mould: "Mould / organic growth",
  water_inside: "Water still inside",
  water_marks: "Water marks / tide line",
  corrosion_products: "Fresh corrosion products (verdigris, white salts)",
};

export const DEFECT_CATEGORIES = [
  "corrosion",
  "contamination",
  "insulation",
  "heat",
  "mechanical",
  "missing_part",
  "wiring",
  "enclosure",
  "other",
] as const;
export type DefectCategory = (typeof DEFECT_CATEGORIES)[number];
export const DEFECT_CATEGORY_LABELS: Record<DefectCategory, string> = {
  corrosion: "Corrosion",
  contamination: "Contamination",
  insulation: "Insulation damage",
  heat: "Heat damage",
  mechanical: "Mechanical",
  missing_part: "Missing part",
  wiring: "Wiring / termination",
  enclosure: "Enclosure",
  other: "Other",
};

/** Tideline's own severity scale, lowest first. */
export const DEFECT_SEVERITIES = ["cosmetic", "degraded", "impaired", "disabling"] as const;
export type DefectSeverity = (typeof DEFECT_SEVERITIES)[number];
export const DEFECT_SEVERITY_LABELS: Record<DefectSeverity, string> = {
  cosmetic: "1 · Cosmetic",
  degraded: "2 · Degraded",
  impaired: "3 · Impaired",
  disabling: "4 · Disabling",
};
export const DEFECT_SEVERITY_DEFINITIONS: Record<DefectSeverity, string> = {
  cosmetic: "Appearance only; the part still does its job and nothing worsens if left.",
  degraded: "Works now but is deteriorating (surface rust, light contamination); fix before it spreads.",
  impaired: "Does its job only partly or unreliably (stiff mechanism, low insulation, loose termination).",
  disabling: "Cannot do its job or stops its section being brought back (seized, charred, missing).",
};

export const DEFECT_STATUSES = [
  "raised",
  "scheduled",
  "under_repair",
  "awaiting_retest",
  "closed",
  "deferred",
  "accepted_as_is",
] as const;
export type DefectStatus = (typeof DEFECT_STATUSES)[number];
export const DEFECT_STATUS_LABELS: Record<DefectStatus, string> = {
  raised: "Raised",
  scheduled: "Scheduled",
  under_repair: "Under repair",
  awaiting_retest: "Awaiting re-test",
  closed: "Closed",
  deferred: "Deferred",
  accepted_as_is: "Accepted as is",
};

export const PART_STATUSES = ["wanted", "lead_found", "acquired", "received", "fitted", "cancelled"] as const;
export type PartStatus = (typeof PART_STATUSES)[number];
export const PART_STATUS_LABELS: Record<PartStatus, string> = {
  wanted: "Wanted",
  lead_found: "Lead found",
  acquired: "Acquired",
  received: "Received and inspected",
  fitted: "Fitted",
  cancelled: "Cancelled",
};

export const HERITAGE_RULES = ["original_only", "period_ok", "modern_ok"] as const;
export type HeritageRule = (typeof HERITAGE_RULES)[number];
export const HERITAGE_RULE_LABELS: Record<HeritageRule, string> = {
  original_only: "Original pattern only",
  period_ok: "Period equivalent acceptable",
  modern_ok: "Modern equivalent acceptable",
};

export const PHOTO_KINDS = [
  "as_found",
  "nameplate",
  "damage",
  "during_work",
  "after_work",
  "thermal",
  "other",
] as const;
export type PhotoKind = (typeof PHOTO_KINDS)[number];
export const PHOTO_KIND_LABELS: Record<PhotoKind, string> = {
  as_found: "As found",
  nameplate: "Nameplate",
  damage: "Damage detail",
  during_work: "During work",
  after_work: "After work",
  thermal: "Thermal image",
  other: "Other",
};

// ---- Words of the readings, the register and the watch, which their schemas re-export. They live here, free of
// zod, because the sync bar names an outbox item's fields with them (src/schemas/field-labels.ts) on every page:
// importing them from the schemas built every readings, defect and return-to-service schema before the first page.

export const PARTS_STATES = ["none_needed", "in_hand", "wanted", "unobtainable"] as const;
export const PARTS_STATE_LABELS: Record<(typeof PARTS_STATES)[number], string> = {
  none_needed: "No parts needed",
  in_hand: "Parts in hand",
  wanted: "Parts wanted",
  unobtainable: "Parts unobtainable",
};

export const CONDUCTORS = ["A-B", "B-C", "C-A", "A-G", "B-G", "C-G", "line-load"] as const;
export type Conductors = (typeof CONDUCTORS)[number];
export const CONDUCTOR_LABELS: Record<Conductors, string> = {
  "A-B": "A to B",
  "B-C": "B to C",
  "C-A": "C to A",
  "A-G": "A to ground",
  "B-G": "B to ground",
  "C-G": "C to ground",
  "line-load": "Open pole, line to load",
};
export const QUALIFIER_LABELS = { at_or_above: "≥ meter's limit", below: "≤ resolution" } as const;

export const TRIP_TESTS = ["inverse_time", "instantaneous"] as const;
export const TRIP_TEST_LABELS = {
  inverse_time: "Overload (inverse-time) at 300 %",
  instantaneous: "Instantaneous pickup",
} as const;

/** How the earth-fault lamps looked at a watch check after re-energising. */
export const WATCH_LAMP_LOOKS = ["equal", "one_dim", "one_dark", "not_seen"] as const;
export const WATCH_LAMP_LOOK_LABELS: Record<(typeof WATCH_LAMP_LOOKS)[number], string> = {
  equal: "All three equal",
  one_dim: "One dim",
  one_dark: "One dark",
  not_seen: "Not seen",
};

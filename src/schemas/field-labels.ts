/**
 * The words a person reads for each field of the records the phone's outbox sends, one
 * map per record kind (the outbox item's `kind`). The sync bar's refused and conflicting items name
 * fields with these instead of the request's keys (`blocksEnergisation` → "Blocks energising its
 * section"); the forms that write these records use the same words for their labels where they
 * import them (the defect's edit panel does).
 */

import {
  CONTAMINANT_LABELS,
  CUSTODY_LABELS as CUSTODY_STATE_WORDS,
  DEFECT_CATEGORY_LABELS,
  DEFECT_SEVERITY_LABELS,
  DEFECT_STATUS_LABELS,
  INSULATION_STATE_LABELS,
  MECHANISM_LABELS,
  PARTS_STATE_LABELS,
  CONDUCTOR_LABELS,
  QUALIFIER_LABELS,
  TRIP_TEST_LABELS,
  WATCH_LAMP_LOOK_LABELS as LAMP_LOOK_LABELS,
} from "../domain/vocab";
import { TRIP_UNIT_LABELS } from "../domain/trip-test";

export type FieldLabels = Readonly<Record<string, string>>;

export const DEFECT_FIELD_LABELS = {
  title: "What is wrong",
  description: "Details",
  boardId: "Board",
  sectionId: "Section",
  positionId: "Position",
  componentId: "Component",
  inspectionId: "Inspection",
  fromReading: "Raised from reading",
  category: "Category",
  severity: "Severity",
  safetyCritical: "Safety-critical",
  blocksEnergisation: "Blocks energising its section",
  effortHours: "Effort (hours)",
  costEstimate: "Cost",
  partsNeeded: "Parts needed",
  partsState: "Parts",
  assigneeId: "Assigned to",
  dueOn: "Due on",
  status: "Status",
  to: "Move to",
  reason: "Note or reason",
  repairedBy: "Repaired by",
  version: "Version",
  ref: "Number",
  updatedAt: "Last changed",
} as const satisfies FieldLabels;

const INSPECTION_LABELS: FieldLabels = {
  percentRusted: "Surface rusted (%)",
  belowWaterLine: "Below the flood water line",
  contaminants: "What is on it",
  mechanism: "Mechanism",
  insulation: "Insulation",
  notes: "Notes",
  at: "Made on the phone at",
};

const CUSTODY_LABELS: FieldLabels = {
  toState: "Move to",
  custody: "Where in the chain",
  location: "Where is it now?",
  note: "Note",
  tagNumber: "Tag number on the bag",
  releaseReason: "Reason for releasing the chain's rule",
  at: "Made on the phone at",
  version: "Version",
};

const READING_COMMON: FieldLabels = {
  componentId: "Component",
  circuit: "Circuit",
  instrument: "Instrument",
  notes: "Notes",
  measuredAt: "Measured at",
  ambientTempC: "Ambient temperature (°C)",
  equipmentTempC: "Equipment temperature (°C)",
  conductors: "Conductors tested",
};

/** Keyed by the outbox item's `kind` (src/features/*\/api.ts: submitOrQueue / queueEdit). */
export const FIELD_LABELS: Readonly<Record<string, FieldLabels>> = {
  defect: DEFECT_FIELD_LABELS,
  defect_edit: DEFECT_FIELD_LABELS,
  defect_status: DEFECT_FIELD_LABELS,
  inspection: INSPECTION_LABELS,
  custody: CUSTODY_LABELS,
  insulation: {
    ...READING_COMMON,
    testVoltsDc: "Test voltage (V DC)",
    megohms: "Reading (MΩ)",
    megohmsQualifier: "The meter showed it",
    humidityPercent: "Relative humidity (%)",
    durationS: "Test duration (s)",
    r30s: "At 30 s (MΩ)",
    r1min: "At 1 min (MΩ)",
    r10min: "At 10 min (MΩ)",
    r30sQualifier: "30 s shown as",
    r1minQualifier: "1 min shown as",
    r10minQualifier: "10 min shown as",
  },
  contact: { ...READING_COMMON, poleMicroOhms: "Pole readings (µΩ)", testCurrentA: "Test current (A)" },
  thermal: {
    ...READING_COMMON,
    componentTempC: "Component temperature (°C)",
    similarTempC: "Similar component, similar load (°C)",
    ambientTempC: "Ambient air (°C)",
    loadPercent: "Load (% of rating)",
    loadAmps: "Load (A)",
    photoId: "Thermal image",
    instrument: "Camera",
  },
  ground: {
    ...READING_COMMON,
    energisation: "Energisation",
    lineVolts: "Line voltage (V)",
    lamps: "Lamps",
    volts: "Volts to ground",
    branchOhms: "Lamp branch resistance (Ω)",
    capacitanceMicroF: "Capacitance to ground per phase (µF)",
  },
  trip: {
    ...READING_COMMON,
    test: "Test",
    tripUnit: "Trip unit",
    adjustable: "Adjustable",
    pole: "Pole",
    ratingAmps: "Breaker rating (A)",
    systemVolts: "System voltage (V)",
    testAmps: "Test current (A)",
    tripSeconds: "Trip time (s)",
    bandMinSeconds: "Manufacturer's band, fastest (s)",
    bandMaxSeconds: "Manufacturer's band, slowest (s)",
    settingAmps: "Instantaneous setting (A)",
    publishedLowAmps: "Published low (A)",
    publishedHighAmps: "Published high (A)",
    pickupAmps: "Pickup current (A)",
  },
  step: { ...READING_COMMON, steps: "Steps", instrument: "Test set" },
  hunt: {
    ...READING_COMMON,
    hunt: "Hunt",
    positionId: "Position",
    feeder: "Feeder",
    action: "Opened or closed",
    lamps: "Lamps",
  },
  watch_check: {
    at: "Checked at",
    lamps: "Ground lamps",
    lampPhase: "Which phase's lamp",
    smell: "Smell",
    sound: "Sound",
    warmToHand: "Warm",
    thermalPositionId: "Thermal reading at",
    thermalC: "Thermal reading (°C)",
    ambientC: "Air temperature (°C)",
    note: "Note",
  },
  photo: { caption: "Caption", stage: "Stage", files: "Photo" },
};

/**
 * The label of a field of a record kind; a key no map knows is spelled out from its camelCase
 * ("heritageAfter" → "Heritage after") rather than shown raw.
 */
export function fieldLabel(kind: string, key: string): string {
  const known = FIELD_LABELS[kind]?.[key];
  if (known) return known;
  const words = key
    .replace(/Id$/, "")
    .replace(/([a-z0-9])([A-Z])/g, "$1 $2")
    .replace(/_/g, " ")
    .toLowerCase();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

/**
 * The words for a stored value, per field of the records the phone sends: the same labels the
 * forms show (`none_needed` → "No parts needed"), so a conflict or a refused item reads as the form
 * did. Keyed by the field; `kind`-specific maps first (a watch check's `lamps` differs from a
 * ground check's).
 */
const VALUE_WORDS: Readonly<Record<string, Readonly<Record<string, string>>>> = {
  severity: DEFECT_SEVERITY_LABELS,
  status: DEFECT_STATUS_LABELS,
  to: DEFECT_STATUS_LABELS,
  category: DEFECT_CATEGORY_LABELS,
  partsState: PARTS_STATE_LABELS,
  toState: CUSTODY_STATE_WORDS,
  custody: CUSTODY_STATE_WORDS,
  mechanism: MECHANISM_LABELS,
  insulation: INSULATION_STATE_LABELS,
  contaminants: CONTAMINANT_LABELS,
  conductors: CONDUCTOR_LABELS,
  megohmsQualifier: QUALIFIER_LABELS,
  r30sQualifier: QUALIFIER_LABELS,
  r1minQualifier: QUALIFIER_LABELS,
  r10minQualifier: QUALIFIER_LABELS,
  test: TRIP_TEST_LABELS,
  tripUnit: TRIP_UNIT_LABELS,
  action: { opened: "Opened", closed: "Closed" },
};
const VALUE_WORDS_BY_KIND: Readonly<Record<string, Readonly<Record<string, Readonly<Record<string, string>>>>>> = {
  watch_check: { lamps: LAMP_LOOK_LABELS },
};

/** The words for a field's value kind by kind; a value no map knows is shown as it is. */
export function valueWords(kind: string, key: string, value: string): string {
  return VALUE_WORDS_BY_KIND[kind]?.[key]?.[value] ?? VALUE_WORDS[key]?.[value] ?? value;
}

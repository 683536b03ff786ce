/**
 * Readings: one zod schema per request body (the form and the server share it) and the
 * response shapes the client parses. Ranges keep impossible numbers out before the domain
 * functions see them; the correction's own temperature range is checked by the server
 * against the site's method (→ 400 naming the field).
 */
import { z } from "zod";
import { text as safeText, int, isoDateTime } from "./common";
import {
  groundCheckSchema,
  LAMP_LOOKS,
  PHASE_KEYS,
  phases,
  readingBase as base,
  sourceSchema,
  verdict,
} from "./ground-check";
import { CORRECTION_METHODS } from "../domain/reading-judgement";
import { READING_QUALIFIERS, THERMAL_CLASSES } from "../domain/insulation";
import { TRIP_UNITS } from "../domain/trip-test";
import { CONDUCTORS, TRIP_TESTS } from "../domain/vocab";

// The words live with the trade's other words (no zod there: the sync bar names fields without building schemas).
export {
  CONDUCTORS,
  CONDUCTOR_LABELS,
  QUALIFIER_LABELS,
  TRIP_TESTS,
  TRIP_TEST_LABELS,
  type Conductors,
} from "../domain/vocab";
export { LAMP_LOOKS, PHASE_KEYS, sourceSchema, groundCheckSchema } from "./ground-check";
export type { CriterionSourceDto, GroundCheck } from "./ground-check";
export const INSULATION_MEDIA = ["solid", "oil"] as const;

/** "Reading" → "Enter the reading" for a blank field; "must be a number" only for what is not one. */
const numberError = (label: string) => (iss: { input?: unknown }) =>
  iss.input == null
    ? `Enter the ${/^[A-Z][a-z]/.test(label) ? label[0].toLowerCase() + label.slice(1) : label}`
    : `${label} must be a number`;
const num = (label: string, min: number, max: number, unit: string) =>
  z
    .number({ error: numberError(label) })
    .min(min, { message: `${label} must be at least ${min} ${unit}` })
    .max(max, { message: `${label} must be at most ${max} ${unit}` });
const positive = (label: string, max: number, unit: string) =>
  z
    .number({ error: numberError(label) })
    .positive({ message: `${label} must be more than 0 ${unit}` })
    .max(max, { message: `${label} must be at most ${max} ${unit}` });
const opt = <T extends z.ZodType>(s: T) => s.nullish().transform((v) => v ?? null);
/** A megohm value: 0 is a reading (a dead short), not an error. */
const megohms = (label: string) => num(label, 0, 1e7, "MΩ");
const qualifier = opt(
  z.enum(READING_QUALIFIERS, { message: "Choose at or above the meter's range, or below its resolution" }),
);

const measuredAt = isoDateTime("Give the date and time of the reading");
const text = (max: number) => safeText().trim().max(max).default("");

/** A reading on a circuit names a component or the circuit (or both). */
function namesItsTarget(): [
  (b: { componentId: string | null; circuit: string }) => boolean,
  { message: string; path: string[] },
] {
  return [
    (b) => b.componentId !== null || b.circuit !== "",
    { message: "Name the circuit or choose a component", path: ["circuit"] },
  ];
}

export const insulationReadingBody = z
  .object({
    componentId: opt(z.uuid({ message: "componentId must be a UUID" })),
    circuit: text(120),
    testVoltsDc: int({ message: "Test voltage must be whole volts" })
      .min(50, { message: "Test voltage must be at least 50 V DC" })
      .max(15000, { message: "Test voltage must be at most 15000 V DC" }),
    megohms: megohms("Reading"),
    megohmsQualifier: qualifier,
    conductors: z.enum(CONDUCTORS, { message: "Choose which conductors were tested" }),
    equipmentTempC: num("Equipment temperature", -10, 110, "°C"),
    ambientTempC: opt(num("Ambient temperature", -40, 80, "°C")),
    humidityPercent: opt(num("Relative humidity", 0, 100, "%")),
    durationS: opt(
      int()
        .min(1, { message: "Duration must be at least 1 s" })
        .max(3600, { message: "Duration must be at most 3600 s" }),
    ),
    r30s: opt(megohms("30-second reading")),
    r1min: opt(megohms("1-minute reading")),
    r10min: opt(megohms("10-minute reading")),
    r30sQualifier: qualifier,
    r1minQualifier: qualifier,
    r10minQualifier: qualifier,
    instrument: text(200),
    notes: text(2000),
    measuredAt,
  })
  .refine(...namesItsTarget());
export type InsulationReadingBody = z.input<typeof insulationReadingBody>;

/** Three insulation readings, A, B and C to ground, taken together (the phone's phase comparison form). */
const ir = insulationReadingBody.shape;
export const phaseSetBody = z
  .object({
    componentId: ir.componentId,
    circuit: ir.circuit,
    testVoltsDc: ir.testVoltsDc,
    equipmentTempC: ir.equipmentTempC,
    ambientTempC: ir.ambientTempC,
    humidityPercent: ir.humidityPercent,
    instrument: ir.instrument,
    notes: ir.notes,
    measuredAt: ir.measuredAt,
    megohmsA: megohms("A to ground"),
    megohmsB: megohms("B to ground"),
    megohmsC: megohms("C to ground"),
    qualifierA: ir.megohmsQualifier,
    qualifierB: ir.megohmsQualifier,
    qualifierC: ir.megohmsQualifier,
  })
  .refine(...namesItsTarget());
export type PhaseSetBody = z.output<typeof phaseSetBody>;

/** The insulation reading of one phase of a phase set (each is saved and judged on its own). */
export const phaseReading = (b: PhaseSetBody, p: (typeof PHASE_KEYS)[number]) => ({
  componentId: b.componentId,
  circuit: b.circuit,
  testVoltsDc: b.testVoltsDc,
  equipmentTempC: b.equipmentTempC,
  ambientTempC: b.ambientTempC,
  humidityPercent: b.humidityPercent,
  instrument: b.instrument,
  notes: b.notes,
  measuredAt: b.measuredAt,
  conductors: `${p}-G` as const,
  megohms: b[`megohms${p}`],
  megohmsQualifier: b[`qualifier${p}`],
});

export const contactReadingBody = z.object({
  poleMicroOhms: z
    .array(positive("Pole reading", 1e7, "µΩ"))
    .min(1, { message: "Give at least one pole" })
    .max(6, { message: "At most six poles" }),
  testCurrentA: positive("Test current", 1000, "A"),
  instrument: text(200),
  notes: text(2000),
  measuredAt,
});
export type ContactReadingBody = z.input<typeof contactReadingBody>;

export const thermalScanBody = z
  .object({
    componentTempC: num("Component temperature", -40, 400, "°C"),
    similarTempC: opt(num("Similar component temperature", -40, 400, "°C")),
    ambientTempC: opt(num("Ambient temperature", -40, 80, "°C")),
    loadPercent: opt(num("Load", 0, 200, "%")),
    loadAmps: opt(num("Load current", 0, 100000, "A")),
    photoId: opt(z.uuid({ message: "photoId must be a UUID" })),
    instrument: text(200),
    notes: text(2000),
    measuredAt,
  })
  .refine((b) => b.similarTempC !== null || b.ambientTempC !== null, {
    message: "Give a similar component's temperature, the ambient, or both",
    path: ["similarTempC"],
  });
export type ThermalScanBody = z.input<typeof thermalScanBody>;

export const groundCheckBody = z
  .object({
    energisation: text(200),
    lineVolts: positive("Line voltage", 1000, "V"),
    lamps: opt(phases(z.enum(LAMP_LOOKS, { message: "Choose bright, dim or dark" }))),
    volts: opt(phases(num("Volts to ground", 0, 2000, "V"))),
    branchOhms: opt(positive("Lamp branch resistance", 1e7, "Ω")),
    capacitanceMicroF: opt(num("Capacitance to ground per phase", 0, 1000, "µF")),
    instrument: text(200),
    notes: text(2000),
    measuredAt,
  })
  .refine((b) => b.lamps !== null || b.volts !== null, {
    message: "Record how each lamp looks or its volts to ground",
    path: ["lamps"],
  });
export type GroundCheckBody = z.input<typeof groundCheckBody>;

export const criteriaBody = z
  .object({
    correctionMethod: z.enum(CORRECTION_METHODS),
    insulationMedium: z.enum(INSULATION_MEDIA),
    thermalClass: z.enum(THERMAL_CLASSES),
    minimumMegohms: opt(positive("Minimum", 1e7, "MΩ")),
    minimumSource: text(500),
    contactOutlierPercent: num("Contact threshold", 1, 500, "%"),
    dewPointMarginK: num("Dew-point margin", 0, 20, "K").default(3),
    version: int().min(0),
  })
  .refine((b) => b.minimumMegohms === null || b.minimumSource !== "", {
    message: "Say where the site's minimum comes from",
    path: ["minimumSource"],
  });
export type CriteriaBody = z.input<typeof criteriaBody>;

export const overrideBody = z
  .object({
    minimumMegohms: opt(positive("Manufacturer's minimum", 1e7, "MΩ")),
    maximumMicroOhms: opt(positive("Manufacturer's maximum", 1e7, "µΩ")),
    source: safeText().trim().min(1, { message: "Say where the manufacturer's value comes from" }).max(500),
    version: int().min(0).optional(),
  })
  .refine((b) => b.minimumMegohms !== null || b.maximumMicroOhms !== null, {
    message: "Give a minimum MΩ, a maximum µΩ, or both",
    path: ["minimumMegohms"],
  });
export type OverrideBody = z.input<typeof overrideBody>;

// ---- Responses ---------------------------------------------------------------------------
const ratioBound = z.enum(["exact", "at_least", "at_most", "not_computable"]);

export const insulationReadingSchema = z.object({
  ...base,
  circuit: safeText(),
  testVoltsDc: z.number(),
  megohms: z.number(),
  conductors: z.enum(CONDUCTORS),
  equipmentTempC: z.number(),
  ambientTempC: z.number().nullable(),
  humidityPercent: z.number().nullable(),
  durationS: z.number().nullable(),
  r30s: z.number().nullable(),
  r1min: z.number().nullable(),
  r10min: z.number().nullable(),
  megohmsQualifier: z.enum(READING_QUALIFIERS).nullable(),
  r30sQualifier: z.enum(READING_QUALIFIERS).nullable(),
  r1minQualifier: z.enum(READING_QUALIFIERS).nullable(),
  r10minQualifier: z.enum(READING_QUALIFIERS).nullable(),
  judgement: z.object({
    correctedMegohms: z.number().nullable(),
    qualifier: z.enum(READING_QUALIFIERS).nullable(),
    baseTemperatureC: z.number().nullable(),
    correction: sourceSchema.nullable(),
    minimum: z.object({ megohms: z.number(), from: z.enum(["manufacturer", "site", "table"]), source: sourceSchema }),
    pi: z.number().nullable(),
    piBound: ratioBound.nullable(),
    dar: z.number().nullable(),
    darBound: ratioBound.nullable(),
    piNotRequired: z.boolean(),
    minimumPi: z.number(),
    piSource: sourceSchema,
    validForJudging: z.boolean(),
    dewPointC: z.number().nullable(),
    validitySource: sourceSchema,
    suggestedTestVoltsDc: z.number(),
    testVoltageOver: z.boolean(),
    verdict,
    reasons: z.array(safeText()),
    notes: z.array(safeText()),
  }),
});
export type InsulationReading = z.infer<typeof insulationReadingSchema>;

export const contactReadingSchema = z.object({
  ...base,
  poleMicroOhms: z.array(z.number()),
  testCurrentA: z.number(),
  judgement: z.object({
    outliers: z.array(z.number()),
    overMaximum: z.array(z.number()),
    limitMicroOhms: z.number(),
    verdict,
    reasons: z.array(safeText()),
    sources: z.array(sourceSchema),
  }),
});
export type ContactReading = z.infer<typeof contactReadingSchema>;

export const thermalScanSchema = z.object({
  ...base,
  componentTempC: z.number(),
  similarTempC: z.number().nullable(),
  ambientTempC: z.number().nullable(),
  loadPercent: z.number().nullable(),
  loadAmps: z.number().nullable(),
  photoId: safeText().nullable(),
  judgement: z.object({
    overSimilarC: z.number().nullable(),
    overAmbientC: z.number().nullable(),
    scaledOverSimilarC: z.number().nullable(),
    scaledOverAmbientC: z.number().nullable(),
    measuredLevel: z.number(),
    scaledLevel: z.number().nullable(),
    level: z.number(),
    action: safeText(),
    warnings: z.array(safeText()),
    verdict,
    source: sourceSchema,
  }),
});
export type ThermalScan = z.infer<typeof thermalScanSchema>;

export const criteriaSchema = z.object({
  correctionMethod: z.enum(CORRECTION_METHODS),
  insulationMedium: z.enum(INSULATION_MEDIA),
  thermalClass: z.enum(THERMAL_CLASSES),
  minimumMegohms: z.number().nullable(),
  minimumSource: safeText(),
  contactOutlierPercent: z.number(),
  dewPointMarginK: z.number(),
  version: z.number(),
  updatedAt: safeText().nullable(),
});
export type Criteria = z.infer<typeof criteriaSchema>;

export const overrideSchema = z.object({
  componentId: safeText(),
  minimumMegohms: z.number().nullable(),
  maximumMicroOhms: z.number().nullable(),
  source: safeText(),
  version: z.number(),
});
export type ComponentOverride = z.infer<typeof overrideSchema>;

/** The site's boards for the readings' first page, each with its count of positions. */
export const readingTargetsSchema = z.object({
  boards: z.array(
    z.object({ id: safeText(), name: safeText(), nominalVolts: z.number(), positionCount: z.number().int() }),
  ),
});
/** A position of the board a reading can be recorded against (its current component, if any). */
export const readingTargetSchema = z.object({
  positionId: safeText(),
  designation: safeText(),
  circuit: safeText(),
  componentId: safeText().nullable(),
  kind: safeText(),
});
export type ReadingTargets = z.infer<typeof readingTargetsSchema>;

// ---- Trip tests, step-voltage tests, ground hunt, phase comparison ----------------

export const tripTestBody = z
  .object({
    test: z.enum(TRIP_TESTS, { message: "Choose the test" }),
    tripUnit: z.enum(TRIP_UNITS, { message: "Choose the trip unit" }),
    adjustable: z.boolean().default(false),
    pole: text(20),
    ratingAmps: positive("Rating", 10000, "A"),
    systemVolts: positive("System voltage", 1000, "V"),
    testAmps: opt(positive("Test current", 200000, "A")),
    tripSeconds: opt(num("Trip time", 0, 100000, "s")),
    bandMinSeconds: opt(num("Band minimum", 0, 100000, "s")),
    bandMaxSeconds: opt(num("Band maximum", 0, 100000, "s")),
    settingAmps: opt(positive("Setting", 200000, "A")),
    publishedLowAmps: opt(positive("Published low", 200000, "A")),
    publishedHighAmps: opt(positive("Published high", 200000, "A")),
    pickupAmps: opt(positive("Pickup current", 200000, "A")),
    instrument: text(200),
    notes: text(2000),
    measuredAt,
  })
  .refine((b) => b.test !== "inverse_time" || b.testAmps !== null, {
    message: "Give the test current",
    path: ["testAmps"],
  })
  .refine((b) => b.test !== "instantaneous" || b.pickupAmps !== null, {
    message: "Give the pickup current",
    path: ["pickupAmps"],
  })
  .refine(
    (b) => b.test !== "instantaneous" || !(b.tripUnit === "electronic" || b.adjustable) || b.settingAmps !== null,
    { message: "Give the setting in amperes", path: ["settingAmps"] },
  )
  .refine(
    (b) =>
      b.test !== "instantaneous" ||
      b.tripUnit === "electronic" ||
      b.adjustable ||
      (b.publishedLowAmps !== null && b.publishedHighAmps !== null),
    { message: "Give the manufacturer's published range", path: ["publishedLowAmps"] },
  )
  .refine((b) => (b.bandMinSeconds === null) === (b.bandMaxSeconds === null), {
    message: "Give both ends of the band, or neither",
    path: ["bandMaxSeconds"],
  })
  .refine((b) => b.bandMinSeconds === null || b.bandMaxSeconds === null || b.bandMaxSeconds >= b.bandMinSeconds, {
    message: "The band's maximum must be at least its minimum",
    path: ["bandMaxSeconds"],
  })
  .refine(
    (b) => b.publishedLowAmps === null || b.publishedHighAmps === null || b.publishedHighAmps >= b.publishedLowAmps,
    { message: "The high end must be at least the low end", path: ["publishedHighAmps"] },
  );
export type TripTestBody = z.input<typeof tripTestBody>;

export const tripTestSchema = z.object({
  ...base,
  test: z.enum(TRIP_TESTS),
  tripUnit: z.enum(TRIP_UNITS),
  adjustable: z.boolean(),
  pole: safeText(),
  ratingAmps: z.number(),
  systemVolts: z.number(),
  testAmps: z.number().nullable(),
  tripSeconds: z.number().nullable(),
  bandMinSeconds: z.number().nullable(),
  bandMaxSeconds: z.number().nullable(),
  settingAmps: z.number().nullable(),
  publishedLowAmps: z.number().nullable(),
  publishedHighAmps: z.number().nullable(),
  pickupAmps: z.number().nullable(),
  judgement: z.object({ verdict, reasons: z.array(safeText()), window: safeText(), source: sourceSchema }),
});
export type TripTest = z.infer<typeof tripTestSchema>;

export const stepVoltageBody = z
  .object({
    componentId: opt(z.uuid({ message: "componentId must be a UUID" })),
    circuit: text(120),
    conductors: z.enum(CONDUCTORS, { message: "Choose which conductors were tested" }),
    equipmentTempC: opt(num("Equipment temperature", -10, 110, "°C")),
    steps: z
      .array(
        z.object({
          testVoltsDc: int({ message: "Whole volts" })
            .min(50, { message: "At least 50 V DC" })
            .max(15000, { message: "At most 15000 V DC" }),
          megohms: megohms("Reading"),
        }),
      )
      .min(2, { message: "Give at least two steps" })
      .max(8, { message: "At most eight steps" }),
    instrument: text(200),
    notes: text(2000),
    measuredAt,
  })
  .refine((b) => b.componentId !== null || b.circuit !== "", {
    message: "Name the circuit or choose a component",
    path: ["circuit"],
  })
  .refine((b) => new Set(b.steps.map((s) => s.testVoltsDc)).size === b.steps.length, {
    message: "Each step needs its own voltage",
    path: ["steps"],
  });
export type StepVoltageBody = z.input<typeof stepVoltageBody>;

export const stepVoltageSchema = z.object({
  ...base,
  circuit: safeText(),
  conductors: z.enum(CONDUCTORS),
  equipmentTempC: z.number().nullable(),
  steps: z.array(z.object({ testVoltsDc: z.number(), megohms: z.number() })),
  judgement: z.object({ largestFall: z.number(), verdict, reasons: z.array(safeText()), source: sourceSchema }),
});
export type StepVoltageTest = z.infer<typeof stepVoltageSchema>;

export const groundHuntBody = z.object({
  hunt: safeText().trim().min(1, { message: "Name this hunt (e.g. the energisation it belongs to)" }).max(120),
  positionId: opt(z.uuid({ message: "positionId must be a UUID" })),
  feeder: safeText().trim().min(1, { message: "Name the feeder opened or closed" }).max(120),
  action: z.enum(["opened", "closed"], { message: "Opened or closed?" }),
  lamps: phases(z.enum(LAMP_LOOKS, { message: "Choose bright, dim or dark" })),
  notes: text(2000),
  measuredAt,
});
export type GroundHuntBody = z.input<typeof groundHuntBody>;

export const groundHuntStepSchema = z.object({
  ...base,
  hunt: safeText(),
  positionId: safeText().nullable(),
  feeder: safeText(),
  action: z.enum(["opened", "closed"]),
  lamps: phases(z.enum(LAMP_LOOKS)),
});
export type GroundHuntStep = z.infer<typeof groundHuntStepSchema>;
export const groundHuntSchema = z.object({
  hunt: safeText(),
  steps: z.array(groundHuntStepSchema),
  finding: z.object({ feeder: safeText().nullable(), words: safeText() }),
  source: sourceSchema,
});
export type GroundHunt = z.infer<typeof groundHuntSchema>;

export const phaseComparisonSchema = z.object({
  key: safeText(),
  label: safeText(),
  measuredAt: safeText(),
  values: z.object({ A: z.number().nullable(), B: z.number().nullable(), C: z.number().nullable() }),
  flagged: z.array(z.enum(PHASE_KEYS)),
  trend: z.array(
    z.object({
      conductors: z.enum(CONDUCTORS),
      previous: z.number(),
      current: z.number(),
      dropFraction: z.number(),
      flagged: z.boolean(),
    }),
  ),
  reasons: z.array(safeText()),
  source: sourceSchema,
});
export type PhaseComparison = z.infer<typeof phaseComparisonSchema>;
/** Which readings one phase comparison groups: a component's, else a named circuit's. */
export const phaseComparisonKey = (r: { componentId: string | null; circuit: string }) =>
  r.componentId ? `c:${r.componentId}` : `circuit:${r.circuit}`;

/** How many readings of each kind there are in all (a page lists the newest of each kind). */
export const readingTotalsSchema = z.object({
  insulation: z.number(),
  contacts: z.number(),
  thermal: z.number(),
  groundChecks: z.number(),
  tripTests: z.number(),
  stepTests: z.number(),
});
export type ReadingTotals = z.infer<typeof readingTotalsSchema>;

/** One insulation series of a board: a component's, or a circuit's named by hand (componentId null). */
export const dryOutSeriesSchema = z.object({
  componentId: safeText().nullable(),
  designation: safeText().nullable(),
  /** The circuit of its newest reading. */
  circuit: safeText(),
  conductors: z.array(z.enum(CONDUCTORS)),
  count: z.number(),
  latestAt: isoDateTime(),
});
export type DryOutSeries = z.infer<typeof dryOutSeriesSchema>;

/** GET …/boards/:boardId/dry-out?componentId= | ?circuit=: the series whole (`complete` false past 5,000). */
export const seriesReadingsSchema = z.object({
  readings: z.array(insulationReadingSchema),
  complete: z.boolean(),
});

export const boardReadingsSchema = z.object({
  board: z.object({ id: safeText(), name: safeText(), nominalVolts: z.number() }),
  /** The board's positions in board order: what a reading on this board can be recorded against. */
  positions: z.array(readingTargetSchema),
  insulation: z.array(insulationReadingSchema),
  contacts: z.array(contactReadingSchema),
  thermal: z.array(thermalScanSchema),
  groundChecks: z.array(groundCheckSchema),
  tripTests: z.array(tripTestSchema),
  stepTests: z.array(stepVoltageSchema),
  groundHunts: z.array(groundHuntSchema),
  phaseComparisons: z.array(phaseComparisonSchema),
  totals: readingTotalsSchema,
  /** Every insulation series on the board, newest first, over all its readings (the lists above hold the newest). */
  dryOutSeries: z.array(dryOutSeriesSchema),
  /** Components with a reading of any kind, in board order. */
  componentsWithReadings: z.array(z.object({ componentId: safeText(), designation: safeText() })),
});
export type BoardReadings = z.infer<typeof boardReadingsSchema>;

export const componentReadingsSchema = z.object({
  component: z.object({
    id: safeText(),
    boardId: safeText(),
    boardName: safeText(),
    /** Where the component sits now (its photos, a thermal image among them, are filed to the position). */
    positionId: safeText().optional(),
    designation: safeText(),
    circuit: safeText(),
    kind: safeText(),
    ratedVolts: z.number(),
  }),
  override: overrideSchema.nullable(),
  insulation: z.array(insulationReadingSchema),
  contacts: z.array(contactReadingSchema),
  thermal: z.array(thermalScanSchema),
  tripTests: z.array(tripTestSchema),
  stepTests: z.array(stepVoltageSchema),
  totals: readingTotalsSchema,
});
export type ComponentReadings = z.infer<typeof componentReadingsSchema>;

/**
 * Readings: one zod schema per request body (the form and the server share it) and the
 * response shapes the client parses. Ranges keep impossible numbers out before the domain
 * functions see them; the correction's own temperature range is checked by the server
 * against the site's method (→ 400 naming the field).
 */
import { z } from "zod";
import { text as safeText, int, isoDateTime } from "./common";
import { CORRECTION_METHODS } from "../domain/reading-judgement";
import { THERMAL_CLASSES } from "../domain/insulation";

export const CONDUCTORS = ["A-B", "B-C", "C-A", "A-G", "B-G", "C-G", "line-load"] as const;
export type Conductors = (typeof CONDUCTORS)[number];
export const CONDUCTOR_LABELS: Record<Conductors, string> = {
  "A-B": "A to B", "B-C": "B to C", "C-A": "C to A", "A-G": "A to ground", "B-G": "B to ground", "C-G": "C to ground", "line-load": "Open pole, line to load",
};
export const LAMP_LOOKS = ["bright", "dim", "dark"] as const;
export const PHASE_KEYS = ["A", "B", "C"] as const;
export const INSULATION_MEDIA = ["solid", "oil"] as const;

const num = (label: string, min: number, max: number, unit: string) =>
  z.number({ message: `${label} must be a number` }).min(min, { message: `${label} must be at least ${min} ${unit}` }).max(max, { message: `${label} must be at most ${max} ${unit}` });
const positive = (label: string, max: number, unit: string) =>
  z.number({ message: `${label} must be a number` }).positive({ message: `${label} must be more than 0 ${unit}` }).max(max, { message: `${label} must be at most ${max} ${unit}` });
const opt = <T extends z.ZodType>(s: T) => s.nullish().transform((v) => v ?? null);

const measuredAt = isoDateTime("Give the date and time of the reading");
const text = (max: number) => safeText().trim().max(max).default("");

export const insulationReadingBody = z.object({
  componentId: opt(z.uuid({ message: "componentId must be a UUID" })),
  circuit: text(120),
  testVoltsDc: int({ message: "Test voltage must be whole volts" }).min(50, { message: "Test voltage must be at least 50 V DC" }).max(15000, { message: "Test voltage must be at most 15000 V DC" }),
  megohms: positive("Reading", 1e7, "MΩ"),
  conductors: z.enum(CONDUCTORS, { message: "Choose which conductors were tested" }),
  equipmentTempC: num("Equipment temperature", -10, 110, "°C"),
  ambientTempC: opt(num("Ambient temperature", -40, 80, "°C")),
  humidityPercent: opt(num("Relative humidity", 0, 100, "%")),
  durationS: opt(int().min(1, { message: "Duration must be at least 1 s" }).max(3600, { message: "Duration must be at most 3600 s" })),
  r30s: opt(positive("30-second reading", 1e7, "MΩ")),
  r1min: opt(positive("1-minute reading", 1e7, "MΩ")),
  r10min: opt(positive("10-minute reading", 1e7, "MΩ")),
  instrument: text(200),
  notes: text(2000),
  measuredAt,
}).refine((b) => b.componentId !== null || b.circuit !== "", { message: "Name the circuit or choose a component", path: ["circuit"] });
export type InsulationReadingBody = z.input<typeof insulationReadingBody>;

export const contactReadingBody = z.object({
  poleMicroOhms: z.array(positive("Pole reading", 1e7, "µΩ")).min(1, { message: "Give at least one pole" }).max(6, { message: "At most six poles" }),
  testCurrentA: positive("Test current", 1000, "A"),
  instrument: text(200),
  notes: text(2000),
  measuredAt,
});
export type ContactReadingBody = z.input<typeof contactReadingBody>;

export const thermalScanBody = z.object({
  componentTempC: num("Component temperature", -40, 400, "°C"),
  similarTempC: opt(num("Similar component temperature", -40, 400, "°C")),
  ambientTempC: opt(num("Ambient temperature", -40, 80, "°C")),
  loadPercent: opt(num("Load", 0, 200, "%")),
  loadAmps: opt(num("Load current", 0, 100000, "A")),
  photoId: opt(z.uuid({ message: "photoId must be a UUID" })),
  instrument: text(200),
  notes: text(2000),
  measuredAt,
}).refine((b) => b.similarTempC !== null || b.ambientTempC !== null, { message: "Give a similar component's temperature, the ambient, or both", path: ["similarTempC"] });
export type ThermalScanBody = z.input<typeof thermalScanBody>;

const phases = <T extends z.ZodType>(s: T) => z.object({ A: s, B: s, C: s });
export const groundCheckBody = z.object({
  energisation: text(200),
  lineVolts: positive("Line voltage", 1000, "V"),
  lamps: opt(phases(z.enum(LAMP_LOOKS, { message: "Choose bright, dim or dark" }))),
  volts: opt(phases(num("Volts to ground", 0, 2000, "V"))),
  branchOhms: opt(positive("Lamp branch resistance", 1e7, "Ω")),
  instrument: text(200),
  notes: text(2000),
  measuredAt,
}).refine((b) => b.lamps !== null || b.volts !== null, { message: "Record how each lamp looks or its volts to ground", path: ["lamps"] });
export type GroundCheckBody = z.input<typeof groundCheckBody>;

export const criteriaBody = z.object({
  correctionMethod: z.enum(CORRECTION_METHODS),
  insulationMedium: z.enum(INSULATION_MEDIA),
  thermalClass: z.enum(THERMAL_CLASSES),
  minimumMegohms: opt(positive("Minimum", 1e7, "MΩ")),
  minimumSource: text(500),
  contactOutlierPercent: num("Contact threshold", 1, 500, "%"),
  version: int().min(0),
}).refine((b) => b.minimumMegohms === null || b.minimumSource !== "", { message: "Say where the site's minimum comes from", path: ["minimumSource"] });
export type CriteriaBody = z.input<typeof criteriaBody>;

export const overrideBody = z.object({
  minimumMegohms: opt(positive("Manufacturer's minimum", 1e7, "MΩ")),
  maximumMicroOhms: opt(positive("Manufacturer's maximum", 1e7, "µΩ")),
  source: safeText().trim().min(1, { message: "Say where the manufacturer's value comes from" }).max(500),
  version: int().min(0).optional(),
}).refine((b) => b.minimumMegohms !== null || b.maximumMicroOhms !== null, { message: "Give a minimum MΩ, a maximum µΩ, or both", path: ["minimumMegohms"] });
export type OverrideBody = z.input<typeof overrideBody>;

// ---- Responses ---------------------------------------------------------------------------
export const sourceSchema = z.object({ table: safeText(), text: safeText() });
export type CriterionSourceDto = z.infer<typeof sourceSchema>;
const verdict = z.enum(["meets", "below_minimum", "investigate"]);
const base = {
  id: safeText(),
  boardId: safeText(),
  componentId: safeText().nullable(),
  designation: safeText().nullable(),
  measuredAt: safeText(),
  instrument: safeText(),
  notes: safeText(),
  recordedBy: safeText().nullable(),
};

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
  judgement: z.object({
    correctedMegohms: z.number().nullable(),
    baseTemperatureC: z.number().nullable(),
    correction: sourceSchema.nullable(),
    minimum: z.object({ megohms: z.number(), from: z.enum(["manufacturer", "site", "table"]), source: sourceSchema }),
    pi: z.number().nullable(),
    dar: z.number().nullable(),
    minimumPi: z.number(),
    piSource: sourceSchema,
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
    level: z.number(),
    action: safeText(),
    verdict,
    source: sourceSchema,
  }),
});
export type ThermalScan = z.infer<typeof thermalScanSchema>;

export const groundCheckSchema = z.object({
  ...base,
  energisation: safeText(),
  lineVolts: z.number(),
  lamps: phases(z.enum(LAMP_LOOKS)).nullable(),
  volts: phases(z.number()).nullable(),
  branchOhms: z.number().nullable(),
  judgement: z.object({ phase: z.enum(PHASE_KEYS).nullable(), faultOhms: z.number().nullable(), words: safeText(), verdict, source: sourceSchema }),
});
export type GroundCheck = z.infer<typeof groundCheckSchema>;

export const criteriaSchema = z.object({
  correctionMethod: z.enum(CORRECTION_METHODS),
  insulationMedium: z.enum(INSULATION_MEDIA),
  thermalClass: z.enum(THERMAL_CLASSES),
  minimumMegohms: z.number().nullable(),
  minimumSource: safeText(),
  contactOutlierPercent: z.number(),
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

export const readingTargetsSchema = z.object({
  boards: z.array(z.object({
    id: safeText(),
    name: safeText(),
    nominalVolts: z.number(),
    positions: z.array(z.object({ positionId: safeText(), designation: safeText(), circuit: safeText(), componentId: safeText().nullable(), kind: safeText() })),
  })),
});
export type ReadingTargets = z.infer<typeof readingTargetsSchema>;

export const boardReadingsSchema = z.object({
  board: z.object({ id: safeText(), name: safeText(), nominalVolts: z.number() }),
  insulation: z.array(insulationReadingSchema),
  contacts: z.array(contactReadingSchema),
  thermal: z.array(thermalScanSchema),
  groundChecks: z.array(groundCheckSchema),
});
export type BoardReadings = z.infer<typeof boardReadingsSchema>;

export const componentReadingsSchema = z.object({
  component: z.object({ id: safeText(), boardId: safeText(), boardName: safeText(), designation: safeText(), circuit: safeText(), kind: safeText(), ratedVolts: z.number() }),
  override: overrideSchema.nullable(),
  insulation: z.array(insulationReadingSchema),
  contacts: z.array(contactReadingSchema),
  thermal: z.array(thermalScanSchema),
});
export type ComponentReadings = z.infer<typeof componentReadingsSchema>;

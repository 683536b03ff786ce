/**
 * One inventory spreadsheet row: cells are text, so empty means "not given", numbers are
 * parsed here, and kind / heritage accept the stored key or the label shown on screen.
 */
import { z } from "zod";
import {
  COMPONENT_KINDS,
  COMPONENT_KIND_LABELS,
  COMPONENT_KIND_SHORT,
  HERITAGE,
  HERITAGE_LABELS,
} from "../../src/domain/vocab";

const blank = (v: unknown) => v === undefined || v === null || (typeof v === "string" && v.trim() === "");
const optText = (max: number) =>
  z.preprocess(
    (v) => (blank(v) ? "" : String(v).replace(/\r\n?/g, "\n").trim()),
    z.string().max(max, { message: `At most ${max} characters` }),
  );
const reqText = (max: number, message: string) =>
  z.preprocess(
    (v) => (blank(v) ? undefined : String(v).trim()),
    z.string({ message }).max(max, { message: `At most ${max} characters` }),
  );
const numberCell = (schema: z.ZodNumber, message: string) =>
  z.preprocess(
    (v) => (blank(v) ? undefined : Number(String(v).trim().replace(",", "."))),
    schema.refine(Number.isFinite, { message }).optional(),
  );
const intCell = (min: number, max: number) =>
  numberCell(
    z
      .number({ message: "A whole number" })
      .int({ message: "A whole number" })
      .min(min, { message: `At least ${min}` })
      .max(max, { message: `At most ${max}` }),
    "A whole number",
  );
const decCell = (min: number, max: number) =>
  numberCell(
    z
      .number({ message: "A number" })
      .min(min, { message: `At least ${min}` })
      .max(max, { message: `At most ${max}` }),
    "A number",
  );
const required = <T extends z.ZodType>(s: T, message: string) => s.refine((v) => v !== undefined, { message });

const norm = (s: string) =>
  s
    .trim()
    .toLowerCase()
    .replace(/[\s\-/()]+/g, "_")
    .replace(/_+$/, "");
function vocabCell<T extends string>(keys: readonly T[], labels: Record<T, string>[], message: string) {
  const lookup = new Map<string, T>();
  for (const k of keys) {
    lookup.set(norm(k), k);
    for (const l of labels) lookup.set(norm(l[k]), k);
  }
  return z.preprocess(
    (v) => (blank(v) ? undefined : (lookup.get(norm(String(v))) ?? `?${String(v)}`)),
    z.enum(keys as unknown as [T, ...T[]], { message }),
  );
}

export const csvRowSchema = z.object({
  board: reqText(200, "Name the board"),
  section: optText(200),
  designation: reqText(40, "Give the designation"),
  kind: vocabCell(
    COMPONENT_KINDS,
    [COMPONENT_KIND_LABELS, COMPONENT_KIND_SHORT],
    `One of ${COMPONENT_KINDS.join(", ")}`,
  ),
  grid_row: required(intCell(1, 60), "Give the grid row"),
  grid_col: required(intCell(1, 60), "Give the grid column"),
  row_span: intCell(1, 60),
  col_span: intCell(1, 60),
  circuit: optText(200),
  maker: optText(200),
  model: optText(200),
  frame: optText(100),
  mounting: optText(100),
  rating_amps: decCell(0, 100_000),
  poles: intCell(1, 4),
  voltage_rating: intCell(1, 100_000),
  interrupting_ka: decCell(0, 1000),
  serial: optText(100),
  year: intCell(1850, 2100),
  meter_range: optText(100),
  lamp_watts: decCell(0, 10_000),
  heritage: z.preprocess(
    (v) => (blank(v) ? "original" : v),
    vocabCell(HERITAGE, [HERITAGE_LABELS], "original, period or modern"),
  ),
  tag_number: optText(40),
  notes: optText(4000),
});
export type CsvRow = z.output<typeof csvRowSchema>;

/** The row as the tables want it (camelCase), also shown in the preview. */
export function toRecord(r: CsvRow) {
  return {
    board: r.board,
    section: r.section || null,
    designation: r.designation,
    kind: r.kind,
    gridRow: r.grid_row!,
    gridCol: r.grid_col!,
    rowSpan: r.row_span ?? 1,
    colSpan: r.col_span ?? 1,
    circuit: r.circuit,
    maker: r.maker,
    model: r.model,
    frame: r.frame,
    mounting: r.mounting,
    ratingAmps: r.rating_amps ?? null,
    poles: r.poles ?? null,
    voltageRating: r.voltage_rating ?? null,
    interruptingKa: r.interrupting_ka ?? null,
    serial: r.serial,
    year: r.year ?? null,
    meterRange: r.meter_range,
    lampWatts: r.lamp_watts ?? null,
    heritage: r.heritage,
    tagNumber: r.tag_number || null,
    notes: r.notes,
  };
}
export type ImportRecord = ReturnType<typeof toRecord>;

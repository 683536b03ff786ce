/**
 * The wanted list as CSV (server/csv.ts: RFC 4180, UTF-8 with a BOM, formula guard). The line's
 * last change is the site's wall-clock time (src/domain/local-time.ts), the zone in the header.
 */
import { BOM, csvLines, guardCell } from "../csv";
import { localDateTime, localHeader } from "../../src/domain/local-time";
import { COMPONENT_KIND_LABELS, HERITAGE_RULE_LABELS, PART_STATUS_LABELS } from "../../src/domain/vocab";
import type { PartLine } from "../../src/schemas/parts";

export const CSV_COLUMNS = [
  "Line",
  "Status",
  "Heritage rule",
  "Kind",
  "Rating (A)",
  "Poles",
  "Voltage (V)",
  "Frame",
  "Mounting",
  "Maker",
  "Model",
  "Part wanted",
  "Qty",
  "Positions",
  "Leads",
  "Est. unit cost",
  "Estimated",
  "Spent",
  "Notes",
  "Updated",
] as const;

export const csvHeader = (timeZone: string) => CSV_COLUMNS.map((c) => (c === "Updated" ? localHeader(c, timeZone) : c));

const num = (v: number | null) => (v == null ? "" : String(v));

export function csvRow(l: PartLine, timeZone: string): string[] {
  const positions = l.positions
    .filter((p) => p.state !== "withdrawn")
    .map((p) => `${p.boardName ?? ""} ${p.designation ?? ""}`.trim())
    .filter(Boolean);
  return [
    l.ref,
    PART_STATUS_LABELS[l.status],
    HERITAGE_RULE_LABELS[l.heritageRule],
    COMPONENT_KIND_LABELS[l.kind],
    num(l.ratingAmps),
    num(l.poles),
    num(l.voltageRating),
    guardCell(l.frame),
    guardCell(l.mounting),
    guardCell(l.maker),
    guardCell(l.model),
    guardCell(l.need),
    String(l.qty),
    guardCell(positions.join("; ")),
    String(l.leadCount),
    num(l.estimatedUnitCost),
    num(l.estimated),
    String(l.spent),
    guardCell(l.notes),
    localDateTime(l.updatedAt, timeZone),
  ];
}

export function toCsv(lines: PartLine[], timeZone: string): string {
  return BOM + csvLines([csvHeader(timeZone), ...lines.map((l) => csvRow(l, timeZone))]);
}

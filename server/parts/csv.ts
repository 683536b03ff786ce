/** The wanted list as CSV (server/csv.ts: RFC 4180, UTF-8 with a BOM, formula guard). */
import { BOM, csvLines, guardCell } from "../csv";
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
] as const;

const num = (v: number | null) => (v == null ? "" : String(v));

export function csvRow(l: PartLine): string[] {
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
  ];
}

export function toCsv(lines: PartLine[]): string {
  return BOM + csvLines([[...CSV_COLUMNS], ...lines.map(csvRow)]);
}

import type { Response } from "express";
import { BOM, csvLines, guardCell } from "../csv";
import type { Db } from "../db";
import { DEFECT_CATEGORY_LABELS, DEFECT_SEVERITY_LABELS, DEFECT_STATUS_LABELS } from "../../src/domain/vocab";
import { PARTS_STATE_LABELS, type ListQuery } from "../../src/schemas/defects";
import { readPage, runExport, type ExportWriter } from "../export-stream";
import { localDateTime, localHeader } from "../../src/domain/local-time";
import { applyFilters, applySort, registerBase, ROW_SELECTION, type RegisterRow } from "./list-query";

const BATCH = 500;
const COLUMNS = [
  "Ref",
  "Title",
  "Board",
  "Section",
  "Position",
  "Category",
  "Severity",
  "Status",
  "Status reason",
  "Safety-critical",
  "Blocks energisation",
  "Effort (h)",
  "Cost estimate",
  "Parts needed",
  "Parts",
  "Assignee",
  "Due",
  "Priority points",
  "Pinned",
  "Raised",
  "Updated",
  "Description",
];

/** The header row: "Raised" and "Updated" are wall-clock times in the site's zone, named in their headers. */
export const csvHeader = (timeZone: string) =>
  COLUMNS.map((c) => (c === "Raised" || c === "Updated" ? localHeader(c, timeZone) : c));

const yn = (b: boolean) => (b ? "yes" : "no");

export function csvRecord(r: RegisterRow, timeZone: string): Array<string | number> {
  const t = (v: string | null) => guardCell(v ?? "");
  return [
    `D-${r.ref}`,
    t(r.title),
    t(r.boardName),
    t(r.sectionName),
    t(r.designation),
    DEFECT_CATEGORY_LABELS[r.category],
    DEFECT_SEVERITY_LABELS[r.severity],
    DEFECT_STATUS_LABELS[r.status],
    t(r.statusReason),
    yn(r.safetyCritical),
    yn(r.blocksEnergisation),
    r.effortHours ?? "",
    r.costEstimate ?? "",
    t(r.partsNeeded),
    PARTS_STATE_LABELS[r.partsState],
    t(r.assigneeName),
    r.dueOn ?? "",
    r.priorityScore,
    r.pinned ?? "",
    localDateTime(r.createdAt, timeZone),
    localDateTime(r.updatedAt, timeZone),
    t(r.description),
  ];
}

/**
 * Streams the filtered register as RFC 4180 CSV (CRLF, quotes doubled; papaparse), UTF-8
 * with a BOM so spreadsheets pick the encoding. The export never holds a connection while
 * the reader is slow: one short query fixes the order (the ids of every matching defect,
 * sorted as the register sorts them), then each page of BATCH rows is its own short query
 * and is written out, waiting for the socket to drain, with the connection back in the pool
 * (server/export-stream.ts: write timeout, per-person cap). A defect changed between pages
 * is written as it is now; one that stopped matching the filters is left out. Times are the
 * site's wall-clock time ("YYYY-MM-DD HH:mm:ss", src/domain/local-time.ts), the zone in the header.
 */
export async function streamCsv(
  db: Db,
  siteId: string,
  timeZone: string,
  f: ListQuery,
  today: string,
  res: Response,
  filename: string,
) {
  const ids = await orderedIds(db, siteId, f, today);
  res.setHeader("Content-Type", "text/csv; charset=utf-8");
  res.setHeader("Content-Disposition", `attachment; filename="${filename}"`);
  await runExport(res, (out) => writeDefectsCsv(db, siteId, timeZone, f, today, out, ids));
}

const orderedIds = async (db: Db, siteId: string, f: ListQuery, today: string) =>
  (
    await applySort(applyFilters(registerBase(db, siteId), f, today, siteId), f.sort, f.dir)
      .select("d.id")
      .execute()
  ).map((r) => r.id as string);

/**
 * The register's CSV into any export writer (a response, or a file made by a background job).
 * `ids` are the ordered ids when the caller already read them; `out.progress` hears rows written of all.
 */
export async function writeDefectsCsv(
  db: Db,
  siteId: string,
  timeZone: string,
  f: ListQuery,
  today: string,
  out: ExportWriter,
  ids?: string[],
) {
  const all = ids ?? (await orderedIds(db, siteId, f, today));
  out.progress?.(0, all.length);
  await out.write(BOM + csvLines([csvHeader(timeZone)]));
  for (let i = 0; i < all.length; i += BATCH) {
    const page = all.slice(i, i + BATCH);
    const rows = (await readPage(() =>
      applyFilters(registerBase(db, siteId), f, today, siteId)
        .select(ROW_SELECTION)
        .where("d.id", "in", page)
        .execute(),
    )) as RegisterRow[];
    const byId = new Map(rows.map((r) => [r.id, r]));
    const ordered = page.map((id) => byId.get(id)).filter((r): r is RegisterRow => r !== undefined);
    if (ordered.length) await out.write(csvLines(ordered.map((r) => csvRecord(r, timeZone))));
    out.progress?.(Math.min(all.length, i + BATCH), all.length);
  }
}

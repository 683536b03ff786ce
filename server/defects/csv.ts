import type { Response } from "express";
import { BOM, csvLines, guardCell } from "../csv";
import type { Db } from "../db";
import { DEFECT_CATEGORY_LABELS, DEFECT_SEVERITY_LABELS, DEFECT_STATUS_LABELS } from "../../src/domain/vocab";
import { PARTS_STATE_LABELS, type ListQuery } from "../../src/schemas/defects";
import { readPage, runExport, type ExportWriter } from "../export-stream";
import { localDateTime, localHeader } from "../../src/domain/local-time";
import { applyFilters, applySort, registerBase, rowsInOrder, type RegisterRow } from "./list-repository";

/** Rows per page: each page is one short query (about 0.5 MB of CSV), so the export holds no connection long. */
const BATCH = 1000;
/**
 * Pages asked for ahead of the one being written (EXPORT_READ_AHEAD, default 1): each is its own short query on
 * its own connection, so a download holds at most this many of the pool's connections at once (and a person runs
 * two downloads). 2 or 3 let PostgreSQL read pages on more cores; not the default until measured on a quiet
 * machine (DEVELOPERS.md "Defect CSV against COPY").
 */
const READ_AHEAD = Math.max(1, Math.floor(Number(process.env.EXPORT_READ_AHEAD)) || 1);
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

/** The columns the CSV prints, and no others (ids, versions and people's ids stay in the database). */
export const CSV_COLUMNS = [
  "d.ref",
  "d.title",
  "b.name as boardName",
  "s.name as sectionName",
  "p.designation",
  "d.category",
  "d.severity",
  "d.status",
  "d.statusReason",
  "d.safetyCritical",
  "d.blocksEnergisation",
  "d.effortHours",
  "d.costEstimate",
  "d.partsNeeded",
  "d.partsState",
  "a.name as assigneeName",
  "d.dueOn",
  "d.priorityScore",
  "pin.direction as pinned",
  "d.createdAt",
  "d.updatedAt",
  "d.description",
] as const;
type CsvRow = Pick<
  RegisterRow,
  | "ref"
  | "title"
  | "boardName"
  | "sectionName"
  | "designation"
  | "category"
  | "severity"
  | "status"
  | "statusReason"
  | "safetyCritical"
  | "blocksEnergisation"
  | "effortHours"
  | "costEstimate"
  | "partsNeeded"
  | "partsState"
  | "assigneeName"
  | "dueOn"
  | "priorityScore"
  | "pinned"
  | "createdAt"
  | "updatedAt"
  | "description"
>;

export function csvRecord(r: CsvRow, timeZone: string): Array<string | number> {
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
 * `ids` are the ordered ids when the caller already read them; `out.progress` hears rows written of all;
 * `batch` is the rows per page (tests use small pages to cross page boundaries with few defects).
 * The order is fixed once (one sorted pass over the site's matching defects); each page is then read by
 * its ids alone (`rowsInOrder`: primary-key lookups in that order, the filters checked on those rows), so
 * the export's time grows with its rows (with `d.id IN (…)` each page scanned the whole site).
 */
export async function writeDefectsCsv(
  db: Db,
  siteId: string,
  timeZone: string,
  f: ListQuery,
  today: string,
  out: ExportWriter,
  ids?: string[],
  batch = BATCH,
  ahead = READ_AHEAD,
) {
  const all = ids ?? (await orderedIds(db, siteId, f, today));
  const read = (from: number) => {
    const page = all.slice(from, from + batch);
    const q = () => rowsInOrder(db, siteId, f, today, page).select(CSV_COLUMNS).execute();
    const p = readPage(q) as Promise<CsvRow[]>;
    p.catch(() => {}); // awaited below, unless the reader left first: then nobody waits for it
    return p;
  };
  out.progress?.(0, all.length);
  await out.write(BOM + csvLines([csvHeader(timeZone)]));
  // The next pages are asked for while this one is formatted and written, so PostgreSQL (on as many
  // connections) and Node work side by side; at most `ahead` queries are out, each ends on its own, so a
  // reader that stalls holds no connection.
  const pending: Array<Promise<CsvRow[]>> = [];
  let asked = 0;
  const askMore = () => {
    for (; pending.length < ahead && asked < all.length; asked += batch) pending.push(read(asked));
  };
  askMore();
  for (let i = 0; pending.length; i += batch) {
    const rows = await pending.shift()!;
    askMore();
    if (rows.length) await out.write(csvLines(rows.map((r) => csvRecord(r, timeZone))));
    out.progress?.(Math.min(all.length, i + batch), all.length);
  }
}

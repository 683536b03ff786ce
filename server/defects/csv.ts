import type { Response } from "express";
import { BOM, csvLines, guardCell } from "../csv";
import { DEFECT_CATEGORY_LABELS, DEFECT_SEVERITY_LABELS, DEFECT_STATUS_LABELS } from "../../src/domain/vocab";
import { PARTS_STATE_LABELS, type ListQuery } from "../../src/schemas/defects";
import Cursor from "pg-cursor";
import { poolOf, type Db } from "../db";
import { runSpooledExport, type ExportWriter } from "../export-stream";
import { localDateTime, localHeader } from "../../src/domain/local-time";
import { applyFilters, applySort, registerBase, registerCount, type RegisterRow } from "./list-repository";

/** Rows per cursor read: about 0.2 MB of CSV, so a batch in memory stays small whatever the site's size. */
const BATCH = 1000;
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
type R = RegisterRow;
/** One row as the cursor reads it: an array in CSV_COLUMNS' order (no object per row, no key mapping). */
type CsvRow = [
  ref: R["ref"],
  title: R["title"],
  boardName: R["boardName"],
  sectionName: R["sectionName"],
  designation: R["designation"],
  category: R["category"],
  severity: R["severity"],
  status: R["status"],
  statusReason: R["statusReason"],
  safetyCritical: R["safetyCritical"],
  blocksEnergisation: R["blocksEnergisation"],
  effortHours: R["effortHours"],
  costEstimate: R["costEstimate"],
  partsNeeded: R["partsNeeded"],
  partsState: R["partsState"],
  assigneeName: R["assigneeName"],
  dueOn: R["dueOn"],
  priorityScore: R["priorityScore"],
  pinned: R["pinned"],
  createdAt: R["createdAt"],
  updatedAt: R["updatedAt"],
  description: R["description"],
];

const t = (v: string | null) => guardCell(v ?? "");

function csvRecord(r: CsvRow, timeZone: string): Array<string | number> {
  const [
    ref,
    title,
    boardName,
    sectionName,
    designation,
    category,
    severity,
    status,
    statusReason,
    safetyCritical,
    blocksEnergisation,
    effortHours,
    costEstimate,
    partsNeeded,
    partsState,
    assigneeName,
    dueOn,
    priorityScore,
    pinned,
    createdAt,
    updatedAt,
    description,
  ] = r;
  return [
    `D-${ref}`,
    t(title),
    t(boardName),
    t(sectionName),
    t(designation),
    DEFECT_CATEGORY_LABELS[category],
    DEFECT_SEVERITY_LABELS[severity],
    DEFECT_STATUS_LABELS[status],
    t(statusReason),
    yn(safetyCritical),
    yn(blocksEnergisation),
    effortHours ?? "",
    costEstimate ?? "",
    t(partsNeeded),
    PARTS_STATE_LABELS[partsState],
    t(assigneeName),
    dueOn ?? "",
    priorityScore,
    pinned ?? "",
    localDateTime(createdAt, timeZone),
    localDateTime(updatedAt, timeZone),
    t(description),
  ];
}

/**
 * Streams the filtered register as RFC 4180 CSV (CRLF, quotes doubled; papaparse), UTF-8
 * with a BOM so spreadsheets pick the encoding. One sorted pass through a cursor writes the whole
 * file to a temporary file at the database's speed, the connection goes back to the pool, and only
 * then is the file sent, at the reader's pace (server/export-stream.ts `runSpooledExport`: write
 * timeout, per-person cap, the file deleted however the download ends), so a slow reader never holds
 * a connection. The rows are one snapshot: as the register read them at one moment. Times are the
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
  await runSpooledExport(
    res,
    { "Content-Type": "text/csv; charset=utf-8", "Content-Disposition": `attachment; filename="${filename}"` },
    (out) => writeDefectsCsv(db, siteId, timeZone, f, today, out),
  );
}

/**
 * The register's CSV into any export writer (a spool file, or a file made by a background job): one
 * statement, the register's filters and order over only the CSV's columns, read through a cursor
 * (pg-cursor) in batches of `batch` rows as arrays (tests use small batches to cross their boundaries
 * with few defects). The next batch is asked for before this one is formatted, so PostgreSQL and
 * Node work side by side. The statement holds one connection of `db`'s pool until its last row
 * (its deadline: the pool's statement timeout), so `out` must take rows as fast as they come (a
 * file, never a socket). A failure of the database fails the export and throws the connection
 * away; a writer that throws (the reader left) closes the cursor and gives the connection back.
 * `out.progress` hears rows written of all (counted first, only when someone listens).
 */
export async function writeDefectsCsv(
  db: Db,
  siteId: string,
  timeZone: string,
  f: ListQuery,
  today: string,
  out: ExportWriter,
  batch = BATCH,
) {
  const pool = poolOf(db);
  if (!pool) throw new Error("the defect CSV reads through a cursor: it needs a Db made by createDb");
  const total = out.progress ? await registerCount(db, siteId, f, today) : undefined;
  out.progress?.(0, total);
  const q = applySort(applyFilters(registerBase(db, siteId), f, today, siteId), f.sort, f.dir)
    .select(CSV_COLUMNS)
    .compile();
  const client = await pool.connect();
  const cursor = client.query(new Cursor<CsvRow>(q.sql, q.parameters.slice(), { rowMode: "array" }));
  let broken: Error | undefined; // the statement failed (database lost, timeout): the connection goes
  const read = () => {
    const p = cursor.read(batch);
    p.catch((e: Error) => (broken ??= e)); // awaited on the next turn; a failure meanwhile is not "unhandled"
    return p;
  };
  let next = read();
  try {
    await out.write(BOM + csvLines([csvHeader(timeZone)]));
    let done = 0;
    for (;;) {
      const rows = await next;
      if (!rows.length) break;
      next = read(); // on the wire before this batch is formatted
      await out.write(csvLines(rows.map((r) => csvRecord(r, timeZone))));
      done += rows.length;
      out.progress?.(done, Math.max(total ?? 0, done));
    }
  } finally {
    // Done, or the writer threw (the reader left): end the statement and give the connection back.
    await next.catch(() => {});
    if (broken) client.release(broken);
    else
      await cursor.close().then(
        () => client.release(),
        (e: Error) => client.release(e),
      );
  }
}

/**
 * GET /inventory.csv: the site's inventory as RFC 4180 CSV (CRLF, quoted where needed),
 * UTF-8 with a BOM so spreadsheets pick the encoding, formula-like cells guarded, text a
 * spreadsheet would turn into a number or date kept as text (server/csv.ts textCell), and
 * times in the site's local time with the zone in the header. The file is made to come back:
 * position_id and row_version let the import update each position instead of adding it again.
 * Streamed in keyset-paged batches: the pg driver here has no cursor package, so
 * Kysely's .stream() is not available; pages of 500 keep memory flat all the same.
 */
import type { Response } from "express";
import Papa from "papaparse";
import { localDate, localDateTime, localHeader } from "../../src/domain/local-time";
import { CSV_EXPORT_EXTRA_COLUMNS, CSV_IMPORT_COLUMNS } from "../../src/schemas/inventory";
import * as repo from "./csv-repository";
import type { Db } from "../db";
import { textCell } from "../csv";
import { readPage, runExport, type ExportWriter } from "../export-stream";
import { notFound } from "../errors";
import { findSite } from "../sites/reads";

const PAGE = 500;
export const EXPORT_COLUMNS = ["position_id", ...CSV_IMPORT_COLUMNS, "row_version", ...CSV_EXPORT_EXTRA_COLUMNS];
/** The header as written: the local-time column names its zone. */
export const exportHeader = (timeZone: string) =>
  EXPORT_COLUMNS.map((c) => (c === "latest_inspected_at" ? localHeader(c, timeZone) : c));

const page = (db: Db, siteId: string, after: repo.ExportKey | null) => repo.exportPage(db, siteId, after, PAGE);
type Key = repo.ExportKey;

type ExportRow = Awaited<ReturnType<typeof page>>[number];

/** Text cells go through textCell (CSV-injection guard, or ="007" for text a spreadsheet would convert); numbers stay numbers. */
const t = (v: string | null | undefined) => textCell(v ?? "");
const cells = (r: ExportRow, timeZone: string) => [
  r.id,
  t(r.boardName),
  t(r.section),
  t(r.designation),
  r.kind,
  r.gridRow,
  r.gridCol,
  r.rowSpan,
  r.colSpan,
  t(r.circuit),
  t(r.maker),
  t(r.model),
  t(r.frame),
  t(r.mounting),
  r.ratingAmps,
  r.poles,
  r.voltageRating,
  r.interruptingKa,
  t(r.serial),
  r.year,
  t(r.meterRange),
  r.lampWatts,
  r.heritage,
  t(r.tagNumber),
  t(r.notes),
  `p${r.version}${r.componentVersion === null ? "" : `c${r.componentVersion}`}`,
  r.custody,
  t(r.custodyLocation),
  r.disposition,
  r.dispositionOverridden === null ? "" : r.dispositionOverridden ? "yes" : "no",
  r.percentRusted,
  r.astmGrade,
  r.isoRi,
  localDateTime(r.inspectedAt, timeZone),
];

const unparse = (rows: unknown[][]) => Papa.unparse(rows, { newline: "\r\n" }) + "\r\n";

export async function streamInventoryCsv(db: Db, siteId: string, timeZone: string, fileName: string, res: Response) {
  res.setHeader("Content-Type", "text/csv; charset=utf-8");
  res.setHeader("Content-Disposition", `attachment; filename="${fileName}"`);
  await runExport(res, (out) => writeInventoryCsv(db, siteId, timeZone, out));
}

/** The inventory CSV into any export writer (a response, or a file made by a background job). */
export async function writeInventoryCsv(db: Db, siteId: string, timeZone: string, out: ExportWriter) {
  const total = out.progress ? await repo.positionCount(db, siteId) : undefined;
  out.progress?.(0, total);
  await out.write("\uFEFF" + unparse([exportHeader(timeZone)]));
  let after: Key | null = null;
  let done = 0;
  for (;;) {
    // Each page is its own short query: no connection is held while the socket drains.
    const rows = await readPage(() => page(db, siteId, after));
    if (rows.length) await out.write(unparse(rows.map((r) => cells(r, timeZone))));
    done += rows.length;
    out.progress?.(done, total);
    if (rows.length < PAGE) break;
    const last = rows[rows.length - 1];
    after = { boardName: last.boardName, boardId: last.boardId, sortOrder: last.sortOrder, id: last.id };
  }
}

const slug = (s: string) =>
  s
    .toLowerCase()
    .normalize("NFKD")
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-|-$/g, "") || "site";

/** The download: named after the site and its local day, times in the site's zone. */
export async function exportInventoryCsv(db: Db, siteId: string, res: Response) {
  const site = await findSite(db, siteId);
  if (!site) throw notFound("That site");
  const day = localDate(new Date(), site.timeZone);
  await streamInventoryCsv(db, siteId, site.timeZone, `${slug(site.name)}-inventory-${day}.csv`, res);
}

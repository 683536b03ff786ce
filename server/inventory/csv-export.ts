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
import { sql } from "kysely";
import Papa from "papaparse";
import { localDateTime, localHeader } from "../../src/domain/local-time";
import { CSV_EXPORT_EXTRA_COLUMNS, CSV_IMPORT_COLUMNS } from "../../src/schemas/inventory";
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

type Key = { boardName: string; boardId: string; sortOrder: number; id: string };

const page = (db: Db, siteId: string, after: Key | null) =>
  db
    .selectFrom("positions as p")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .leftJoin("sections as s", "s.id", "p.sectionId")
    .leftJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .leftJoinLateral(
      (eb) =>
        eb
          .selectFrom("inspections as i")
          .select(["i.percentRusted", "i.astmGrade", "i.isoRi", "i.inspectedAt"])
          .whereRef("i.componentId", "=", "c.id")
          .orderBy("i.inspectedAt", "desc")
          .orderBy("i.createdAt", "desc")
          .limit(1)
          .as("li"),
      (j) => j.onTrue(),
    )
    .select([
      "b.name as boardName",
      "b.id as boardId",
      "p.sortOrder",
      "p.id",
      "p.version",
      "c.version as componentVersion",
      "s.name as section",
      "p.designation",
      "p.kind",
      "p.gridRow",
      "p.gridCol",
      "p.rowSpan",
      "p.colSpan",
      "p.circuit",
      "c.maker",
      "c.model",
      "c.frame",
      "c.mounting",
      "c.ratingAmps",
      "c.poles",
      "c.voltageRating",
      "c.interruptingKa",
      "c.serial",
      "c.year",
      "c.meterRange",
      "c.lampWatts",
      "c.heritage",
      "c.tagNumber",
      "c.notes",
      "c.custody",
      "c.custodyLocation",
      "c.disposition",
      "c.dispositionOverridden",
      "li.percentRusted",
      "li.astmGrade",
      "li.isoRi",
      "li.inspectedAt",
    ])
    .where("p.siteId", "=", siteId)
    .$if(after !== null, (q) =>
      q.where(
        sql<boolean>`(b.name, b.id, p.sort_order, p.id) > (${after!.boardName}, ${after!.boardId}, ${after!.sortOrder}, ${after!.id})`,
      ),
    )
    .orderBy("b.name")
    .orderBy("b.id")
    .orderBy("p.sortOrder")
    .orderBy("p.id")
    .limit(PAGE)
    .execute();

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
  const total = out.progress
    ? Number(
        (
          await db
            .selectFrom("positions")
            .select((eb) => eb.fn.countAll<number>().as("n"))
            .where("siteId", "=", siteId)
            .executeTakeFirstOrThrow()
        ).n,
      )
    : undefined;
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
  const day = localDateTime(new Date(), site.timeZone).slice(0, 10);
  await streamInventoryCsv(db, siteId, site.timeZone, `${slug(site.name)}-inventory-${day}.csv`, res);
}

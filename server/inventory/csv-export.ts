/**
 * GET /inventory.csv: the site's inventory as RFC 4180 CSV (CRLF, quoted where needed),
 * UTF-8 with a BOM so spreadsheets pick the encoding, formula-like cells guarded.
 * Streamed in keyset-paged batches: the pg driver here has no cursor package, so
 * Kysely's .stream() is not available; pages of 500 keep memory flat all the same.
 */
import type { Response } from "express";
import { sql } from "kysely";
import Papa from "papaparse";
import { CSV_EXPORT_EXTRA_COLUMNS, CSV_IMPORT_COLUMNS } from "../../src/schemas/inventory";
import type { Db } from "../db";
import { RISKY } from "../csv";
import { readPage, runExport } from "../export-stream";

const PAGE = 500;
export const EXPORT_COLUMNS = [...CSV_IMPORT_COLUMNS, ...CSV_EXPORT_EXTRA_COLUMNS];

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

const cells = (r: ExportRow) => [
  r.boardName,
  r.section ?? "",
  r.designation,
  r.kind,
  r.gridRow,
  r.gridCol,
  r.rowSpan,
  r.colSpan,
  r.circuit,
  r.maker,
  r.model,
  r.frame,
  r.mounting,
  r.ratingAmps,
  r.poles,
  r.voltageRating,
  r.interruptingKa,
  r.serial,
  r.year,
  r.meterRange,
  r.lampWatts,
  r.heritage,
  r.tagNumber,
  r.notes,
  r.custody,
  r.custodyLocation,
  r.disposition,
  r.dispositionOverridden === null ? "" : r.dispositionOverridden ? "yes" : "no",
  r.percentRusted,
  r.astmGrade,
  r.isoRi,
  r.inspectedAt ? new Date(r.inspectedAt).toISOString() : "",
];

const unparse = (rows: unknown[][]) => Papa.unparse(rows, { newline: "\r\n", escapeFormulae: RISKY }) + "\r\n";

export async function streamInventoryCsv(db: Db, siteId: string, fileName: string, res: Response) {
  res.setHeader("Content-Type", "text/csv; charset=utf-8");
  res.setHeader("Content-Disposition", `attachment; filename="${fileName}"`);
  await runExport(res, async (out) => {
    await out.write("\uFEFF" + unparse([EXPORT_COLUMNS]));
    let after: Key | null = null;
    for (;;) {
      // Each page is its own short query: no connection is held while the socket drains.
      const rows = await readPage(() => page(db, siteId, after));
      if (rows.length) await out.write(unparse(rows.map(cells)));
      if (rows.length < PAGE) break;
      const last = rows[rows.length - 1];
      after = { boardName: last.boardName, boardId: last.boardId, sortOrder: last.sortOrder, id: last.id };
    }
  });
}

import type { Response } from "express";
import { CompiledQuery, sql } from "kysely";
import { BOM, csvLines, guardCell } from "../csv";
import type { Db } from "../db";
import { DEFECT_CATEGORY_LABELS, DEFECT_SEVERITY_LABELS, DEFECT_STATUS_LABELS } from "../../src/domain/vocab";
import { PARTS_STATE_LABELS, type ListQuery } from "../../src/schemas/defects";
import { registerQuery, type RegisterRow } from "./list-query";

const BATCH = 500;
const HEADER = [
  "Ref", "Title", "Board", "Section", "Position", "Category", "Severity", "Status", "Status reason", "Safety-critical",
  "Blocks energisation", "Effort (h)", "Cost estimate", "Parts needed", "Parts", "Assignee", "Due", "Priority points",
  "Pinned", "Raised", "Updated", "Description",
];

const yn = (b: boolean) => (b ? "yes" : "no");

export function csvRecord(r: RegisterRow): Array<string | number> {
  const t = (v: string | null) => guardCell(v ?? "");
  return [
    `D-${r.ref}`, t(r.title), t(r.boardName), t(r.sectionName), t(r.designation), DEFECT_CATEGORY_LABELS[r.category],
    DEFECT_SEVERITY_LABELS[r.severity], DEFECT_STATUS_LABELS[r.status], t(r.statusReason), yn(r.safetyCritical),
    yn(r.blocksEnergisation), r.effortHours ?? "", r.costEstimate ?? "", t(r.partsNeeded), PARTS_STATE_LABELS[r.partsState],
    t(r.assigneeName), r.dueOn ?? "", r.priorityScore, r.pinned ?? "", r.createdAt.toISOString(), r.updatedAt.toISOString(), t(r.description),
  ];
}

/**
 * Streams the filtered register as RFC 4180 CSV (CRLF, quotes doubled; papaparse), UTF-8
 * with a BOM so spreadsheets pick the encoding. Rows come through a PostgreSQL cursor
 * (DECLARE … FETCH) BATCH at a time, so memory stays flat whatever the size; Kysely's
 * .stream() needs the pg-cursor package, which Tideline does not ship.
 */
export async function streamCsv(db: Db, siteId: string, f: ListQuery, today: string, res: Response, filename: string) {
  const compiled = registerQuery(db, siteId, f, today).compile();
  res.setHeader("Content-Type", "text/csv; charset=utf-8");
  res.setHeader("Content-Disposition", `attachment; filename="${filename}"`);
  let closed = false;
  res.on("close", () => (closed = true));
  // Back-pressure: wait for the socket to drain (or the client to leave) before the next batch.
  const write = (chunk: string) =>
    res.write(chunk) || closed
      ? Promise.resolve()
      : new Promise<void>((resolve) => {
          const done = () => { res.off("drain", done); res.off("close", done); resolve(); };
          res.on("drain", done);
          res.on("close", done);
        });
  await db.transaction().setIsolationLevel("repeatable read").setAccessMode("read only").execute(async (trx) => {
    // Plan the cursor for all its rows, not for the first tenth (cursor_tuple_fraction).
    await sql`SET LOCAL cursor_tuple_fraction = 1.0`.execute(trx);
    await trx.executeQuery(CompiledQuery.raw(`DECLARE defects_csv NO SCROLL CURSOR FOR ${compiled.sql}`, [...compiled.parameters]));
    await write(BOM + csvLines([HEADER]));
    while (!closed) {
      const batch = await sql<RegisterRow>`FETCH ${sql.raw(String(BATCH))} FROM defects_csv`.execute(trx);
      if (!batch.rows.length) break;
      await write(csvLines(batch.rows.map(csvRecord)));
      if (batch.rows.length < BATCH) break;
    }
    await sql`CLOSE defects_csv`.execute(trx);
  });
  res.end();
}

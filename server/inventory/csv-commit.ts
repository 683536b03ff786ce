/** Writes a checked import in one transaction: any bad row (re-checked inside it) writes nothing. */
import type { Insertable } from "kysely";
import type { AuditLogTable } from "../../db/types";
import type { ImportResponse } from "../../src/schemas/inventory";
import type { Db } from "../db";
import { AppError } from "../errors";
import { UNIQUE, mapUnique } from "./common";
import { validateImport } from "./csv-import";
import type { ImportRecord } from "./csv-row";

/** 400 import_invalid with every row's errors, flattened to fields "<line>.<column>" too. */
export class ImportInvalid extends AppError {
  constructor(public result: ImportResponse) {
    const fields: Record<string, string> = {};
    for (const r of result.rows) for (const [col, msg] of Object.entries(r.errors)) fields[`${r.line}.${col}`] = msg;
    super(
      400,
      "import_invalid",
      `${result.summary.failed} of ${result.summary.rows} rows need fixing; nothing was imported.`,
      fields,
    );
  }
}

const key = (s: string) => s.trim().toLowerCase();

/** PostgreSQL takes at most 65 535 parameters per statement: insert in slices of 1000 rows. */
async function chunked<T, R>(items: T[], insert: (part: T[], offset: number) => Promise<R[]>): Promise<R[]> {
  const out: R[] = [];
  for (let i = 0; i < items.length; i += 1000) out.push(...(await insert(items.slice(i, i + 1000), i)));
  return out;
}

async function ensureBoards(
  trx: Db,
  siteId: string,
  records: ImportRecord[],
  boards: Map<string, { id: string }>,
  audit: Insertable<AuditLogTable>[],
  actorId: string,
) {
  const created = new Map<string, { id: string }>();
  for (const r of records) {
    const k = key(r.board);
    if (boards.has(k) || created.has(k)) continue;
    const mine = records.filter((x) => key(x.board) === k);
    const gridRows = Math.min(60, Math.max(6, ...mine.map((x) => x.gridRow + x.rowSpan - 1)));
    const gridCols = Math.min(60, Math.max(8, ...mine.map((x) => x.gridCol + x.colSpan - 1)));
    const b = await trx
      .insertInto("boards")
      .values({ siteId, name: r.board, gridRows, gridCols })
      .returning(["id", "name"])
      .executeTakeFirstOrThrow();
    audit.push({
      siteId,
      entityType: "board",
      entityId: b.id,
      boardId: b.id,
      action: "create",
      actorId,
      after: JSON.stringify({ name: b.name, source: "csv import" }),
    });
    created.set(k, b);
  }
  return new Map([...boards, ...created]);
}

export async function commitImport(db: Db, siteId: string, actorId: string, text: string): Promise<ImportResponse> {
  return db.transaction().execute(async (trx) => {
    const { response, records, state } = await validateImport(trx, siteId, text);
    if (response.summary.failed > 0) throw new ImportInvalid(response);
    if (records.length === 0)
      throw new AppError(400, "invalid_input", "The file has a header but no rows.", { csv: "No rows to import" });
    const audit: Insertable<AuditLogTable>[] = [];
    const boards = await ensureBoards(trx, siteId, records, state.boards, audit, actorId);
    const sectionIds = new Map(state.sectionIds);
    for (const r of records) {
      const boardId = boards.get(key(r.board))!.id;
      const sk = `${boardId}|${key(r.section ?? "")}`;
      if (!r.section || sectionIds.has(sk)) continue;
      const s = await trx
        .insertInto("sections")
        .values({ siteId, boardId, name: r.section, sortOrder: sectionIds.size })
        .returning("id")
        .executeTakeFirstOrThrow();
      sectionIds.set(sk, s.id);
    }
    const positions = await mapUnique(
      () =>
        chunked(records, (part, offset) =>
          trx
            .insertInto("positions")
            .values(
              part.map((r, j) => {
                const i = offset + j;
                const boardId = boards.get(key(r.board))!.id;
                return {
                  siteId,
                  boardId,
                  sectionId: r.section ? (sectionIds.get(`${boardId}|${key(r.section)}`) ?? null) : null,
                  designation: r.designation,
                  kind: r.kind,
                  gridRow: r.gridRow,
                  gridCol: r.gridCol,
                  rowSpan: r.rowSpan,
                  colSpan: r.colSpan,
                  circuit: r.circuit,
                  sortOrder: 10_000 + i,
                };
              }),
            )
            .returning(["id", "boardId", "designation"])
            .execute(),
        ),
      UNIQUE.designation,
    );
    await mapUnique(
      () =>
        chunked(records, (part, offset) =>
          trx
            .insertInto("components")
            .values(
              part.map((r, j) => {
                const i = offset + j;
                const {
                  board: _b,
                  section: _s,
                  designation: _d,
                  gridRow: _r,
                  gridCol: _c,
                  rowSpan: _rs,
                  colSpan: _cs,
                  circuit: _ci,
                  ...nameplate
                } = r;
                return { siteId, positionId: positions[i].id, ...nameplate };
              }),
            )
            .execute(),
        ),
      UNIQUE.tag,
    );
    positions.forEach((p, i) =>
      audit.push({
        siteId,
        entityType: "position",
        entityId: p.id,
        boardId: p.boardId,
        positionId: p.id,
        action: "create",
        actorId,
        after: JSON.stringify({ ...records[i], source: "csv import" }),
      }),
    );
    for (let i = 0; i < audit.length; i += 1000)
      await trx
        .insertInto("auditLog")
        .values(audit.slice(i, i + 1000))
        .execute();
    return { rows: response.rows, summary: { ...response.summary, committed: true } };
  });
}

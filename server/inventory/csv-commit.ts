/**
 * Writes a checked import in one transaction: the plan is made again inside it, any bad row
 * writes nothing, and a plan that differs from the preview the person saw (someone changed the
 * inventory in between) is refused with 409 and the fresh preview. Updates go through the
 * versioned UPDATE, so an edit made while the commit runs is never overwritten either.
 */
import { recordAuditMany, type AuditEntry } from "../audit";
import type { ImportResponse } from "../../src/schemas/inventory";
import * as csvRepo from "./csv-repository";
import type { Db } from "../db";
import { AppError } from "../errors";
import { demandChanged } from "../parts/service";
import { componentHeritageChanged, lockDefectsFor } from "../defects/service";
import type { DecodedText } from "../csv-read";
import { UNIQUE, mapUnique, updateVersioned } from "./common";
import { answerOf, type PlannedRow } from "./csv-import";
import { validateImport } from "./csv-plan-pool";
import type { ImportRecord } from "./csv-row";
import { refreshBoardSummaries } from "./board-summaries-repository";
import { lockComponentsFor } from "./survey-service";

/** 400 import_invalid with every row's errors, flattened to fields "<line>.<column>" too. */
export class ImportInvalid extends AppError {
  constructor(public result: ImportResponse) {
    const fields: Record<string, string> = {};
    for (const r of answerOf(result).rows)
      for (const [col, msg] of Object.entries(r.errors)) fields[`${r.line}.${col}`] = msg;
    super(
      400,
      "import_invalid",
      `${result.summary.failed} of ${result.summary.rows} rows need fixing; nothing was imported.`,
      fields,
    );
  }
}

/** 409 import_changed: the inventory moved since the preview; the body carries the fresh preview. */
export class ImportChanged extends AppError {
  constructor(public result: ImportResponse) {
    super(
      409,
      "import_changed",
      "The inventory changed since you checked this file (someone edited a position it touches). Nothing was imported: check the new preview and import again.",
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
  audit: AuditEntry[],
  actorId: string,
) {
  const created = new Map<string, { id: string }>();
  for (const r of records) {
    const k = key(r.board);
    if (boards.has(k) || created.has(k)) continue;
    const mine = records.filter((x) => key(x.board) === k);
    const gridRows = Math.min(60, Math.max(6, ...mine.map((x) => x.gridRow + x.rowSpan - 1)));
    const gridCols = Math.min(60, Math.max(8, ...mine.map((x) => x.gridCol + x.colSpan - 1)));
    const b = await csvRepo.insertBoard(trx, { siteId, name: r.board, gridRows, gridCols });
    audit.push({
      siteId,
      entityType: "board",
      entityId: b.id,
      boardId: b.id,
      action: "create",
      actorId,
      after: { name: b.name, source: "csv import" },
    });
    created.set(k, b);
  }
  return new Map([...boards, ...created]);
}

export async function commitImport(
  db: Db,
  siteId: string,
  actorId: string,
  decoded: DecodedText,
  expect?: string,
): Promise<ImportResponse> {
  return db.transaction().execute(async (trx) => {
    // One import at a time per site: two files planned against the same inventory would each pass alone.
    await csvRepo.lockSiteImport(trx, siteId);
    const { response, planned, state } = await validateImport(trx, siteId, decoded);
    // The person confirmed a plan they saw: if it is not the plan now, show them the new one first.
    if (expect && expect !== response.summary.planDigest) throw new ImportChanged(response);
    if (response.summary.failed > 0) throw new ImportInvalid(response);
    if (planned.length === 0)
      throw new AppError(400, "invalid_input", "The file has a header but no rows.", { csv: "No rows to import" });
    // Two rows may swap grid cells: the one-per-cell rule is checked at commit (the plan checked the end state).
    await csvRepo.deferOnePerCell(trx);
    const audit: AuditEntry[] = [];
    const creates = planned.filter((x) => x.row.action === "create");
    const updates = planned.filter((x) => x.row.action === "update");
    const records = planned.filter((x) => x.record && x.row.action !== "unchanged").map((x) => x.record!);
    const boards = await ensureBoards(
      trx,
      siteId,
      creates.map((x) => x.record!),
      state.boards,
      audit,
      actorId,
    );
    const sectionIds = new Map(state.sectionIds);
    for (const r of records) {
      const boardId = boards.get(key(r.board))!.id;
      const sk = `${boardId}|${key(r.section ?? "")}`;
      if (!r.section || sectionIds.has(sk)) continue;
      const s = await csvRepo.insertSection(trx, { siteId, boardId, name: r.section, sortOrder: sectionIds.size });
      sectionIds.set(sk, s.id);
    }
    const sectionOf = (boardId: string, name: string | null) =>
      name ? (sectionIds.get(`${boardId}|${key(name)}`) ?? null) : null;

    await writeCreates(trx, siteId, actorId, creates, boards, sectionOf, audit);
    // The components the file changes, locked in id order before any is written (rows come in the file's order):
    // every writer that takes several components takes them so, and a fitting crossing the import waits.
    await lockComponentsFor(
      trx,
      siteId,
      updates.flatMap((x) =>
        x.current?.componentId && Object.keys(x.componentPatch).length ? [x.current.componentId] : [],
      ),
    );
    const componentIds = await writeUpdates(trx, siteId, actorId, updates, sectionOf, audit);
    await recordAuditMany(trx, audit);
    // Their defects are re-ranked after the wanted list's sync: taken first, before the demand lock (the lock order).
    if (componentIds.length) await lockDefectsFor(trx, siteId, { componentIds });
    if (componentIds.length) await demandChanged(trx, siteId, { componentIds }, actorId); // nameplates move wanted-list demand
    if (componentIds.length) await componentHeritageChanged(trx, siteId, componentIds); // so does original fabric, for defects
    await refreshBoardSummaries(trx, [
      ...creates.map((x) => boards.get(key(x.record!.board))!.id),
      ...updates.map((x) => x.current!.boardId),
    ]);
    return { rows: response.rows, summary: { ...response.summary, committed: true } };
  });
}

async function writeCreates(
  trx: Db,
  siteId: string,
  actorId: string,
  creates: PlannedRow[],
  boards: Map<string, { id: string }>,
  sectionOf: (boardId: string, name: string | null) => string | null,
  audit: AuditEntry[],
) {
  const records = creates.map((x) => x.record!);
  if (!records.length) return;
  const positions = await mapUnique(
    () =>
      chunked(records, (part, offset) =>
        csvRepo.insertPositions(
          trx,
          part.map((r, j) => {
            const boardId = boards.get(key(r.board))!.id;
            return {
              siteId,
              boardId,
              sectionId: sectionOf(boardId, r.section),
              designation: r.designation,
              kind: r.kind,
              gridRow: r.gridRow,
              gridCol: r.gridCol,
              rowSpan: r.rowSpan,
              colSpan: r.colSpan,
              circuit: r.circuit,
              sortOrder: 10_000 + offset + j,
            };
          }),
        ),
      ),
    UNIQUE.designation,
  );
  await mapUnique(
    () =>
      chunked(records, (part, offset) =>
        csvRepo.insertComponents(
          trx,
          part.map((r, j) => {
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
            return { siteId, positionId: positions[offset + j].id, ...nameplate };
          }),
        ),
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
      after: { ...records[i], source: "csv import" },
    }),
  );
}

/** Each changed position and component through the versioned UPDATE (a concurrent edit → 409, nothing written). */
async function writeUpdates(
  trx: Db,
  siteId: string,
  actorId: string,
  updates: PlannedRow[],
  sectionOf: (boardId: string, name: string | null) => string | null,
  audit: AuditEntry[],
) {
  const componentIds: string[] = [];
  for (const x of updates) {
    const cur = x.current!;
    const { section, ...rest } = x.positionPatch;
    const positionPatch: Record<string, unknown> = { ...rest };
    if ("section" in x.positionPatch) positionPatch.sectionId = sectionOf(cur.boardId, (section as string) || null);
    const componentPatch: Record<string, unknown> = { ...x.componentPatch };
    if ("tagNumber" in componentPatch) componentPatch.tagNumber = componentPatch.tagNumber || null;
    // A slot set up with the wrong kind: its component follows, unless it already had a kind of its own.
    if (rest.kind && cur.componentId && cur.componentKind === cur.kind) componentPatch.kind = rest.kind;
    const base = { siteId, boardId: cur.boardId, positionId: cur.id, action: "update" as const, actorId };
    if (Object.keys(positionPatch).length) {
      await mapUnique(
        () => updateVersioned(trx, "positions", siteId, cur.id, cur.version, positionPatch, "position"),
        UNIQUE.designation,
      );
      audit.push({
        ...base,
        entityType: "position",
        entityId: cur.id,
        before: Object.fromEntries(Object.keys(x.positionPatch).map((k) => [k, before(cur, k)])),
        after: { ...x.positionPatch, source: "csv import" },
      });
    }
    if (Object.keys(componentPatch).length) {
      if (cur.componentId) {
        await mapUnique(
          () =>
            updateVersioned(
              trx,
              "components",
              siteId,
              cur.componentId!,
              cur.componentVersion!,
              componentPatch,
              "component",
            ),
          UNIQUE.tag,
        );
        componentIds.push(cur.componentId);
        audit.push({
          ...base,
          entityType: "component",
          entityId: cur.componentId,
          before: Object.fromEntries(
            Object.keys(componentPatch).map((k) => [k, k === "kind" ? cur.componentKind : before(cur, k)]),
          ),
          after: { ...componentPatch, source: "csv import" },
        });
      } else {
        const c = await mapUnique(
          () =>
            csvRepo.insertComponent(trx, {
              siteId,
              positionId: cur.id,
              kind: (rest.kind as never) ?? cur.kind,
              ...componentPatch,
            }),
          UNIQUE.tag,
        );
        componentIds.push(c.id);
        audit.push({
          ...base,
          entityType: "component",
          entityId: c.id,
          action: "create",
          after: { ...componentPatch, source: "csv import" },
        });
      }
    }
  }
  return componentIds;
}

const before = (cur: PlannedRow["current"], k: string) => (cur as unknown as Record<string, unknown>)[k];

/** Use cases for flood events, boards and sections: each change audited in its transaction. */
import type {
  CreateBoardBody,
  CreateFloodEventBody,
  CreateSectionBody,
  PatchBoardBody,
  PatchFloodEventBody,
  PatchSectionBody,
} from "../../src/schemas/inventory";
import { diff, recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError } from "../errors";
import * as repo from "./boards-repository";
import { defined, requireOwned, stale, updateVersioned } from "./common";

export async function createFloodEvent(db: Db, siteId: string, actorId: string, body: CreateFloodEventBody) {
  return db.transaction().execute(async (trx) => {
    const row = await repo.insertFloodEvent(trx, {
      siteId,
      ...defined(body),
      occurredOn: body.occurredOn,
      waterType: body.waterType,
    });
    await recordAudit(trx, {
      siteId,
      entityType: "flood_event",
      entityId: row.id,
      action: "create",
      actorId,
      after: row,
    });
    return row;
  });
}

export async function patchFloodEvent(db: Db, siteId: string, id: string, actorId: string, body: PatchFloodEventBody) {
  const { version, ...patch } = body;
  return db.transaction().execute(async (trx) => {
    const before = await requireOwned(trx, "floodEvents", siteId, id, "That flood event", true);
    if (before.version !== version) throw stale("flood event", before);
    const after = await updateVersioned(trx, "floodEvents", siteId, id, version, defined(patch), "flood event");
    const d = diff(before as never, defined(patch) as never);
    if (d.changed)
      await recordAudit(trx, {
        siteId,
        entityType: "flood_event",
        entityId: id,
        action: "update",
        actorId,
        before: d.before,
        after: d.after,
      });
    return after;
  });
}

/** Board names are unique per site (case-insensitively): the CSV import finds boards by name. */
async function requireFreeName(db: Db, siteId: string, name: string, exceptId?: string) {
  const taken = await repo.boardByName(db, siteId, name);
  if (taken && taken.id !== exceptId)
    throw new AppError(409, "duplicate", "This site already has a board of that name.", {
      name: "Already used on this site",
    });
}

export async function createBoard(db: Db, siteId: string, actorId: string, body: CreateBoardBody) {
  return db.transaction().execute(async (trx) => {
    await requireFreeName(trx, siteId, body.name);
    const row = await repo.insertBoard(trx, { siteId, ...defined(body), name: body.name });
    await recordAudit(trx, {
      siteId,
      entityType: "board",
      entityId: row.id,
      boardId: row.id,
      action: "create",
      actorId,
      after: row,
    });
    return row;
  });
}

export async function patchBoard(db: Db, siteId: string, id: string, actorId: string, body: PatchBoardBody) {
  const { version, ...rest } = body;
  const patch = defined(rest);
  return db.transaction().execute(async (trx) => {
    const before = await requireOwned(trx, "boards", siteId, id, "That board", true);
    if (before.version !== version) throw stale("board", before);
    if (patch.name !== undefined) await requireFreeName(trx, siteId, patch.name, id);
    // The grid may not shrink under a position: it would vanish from the elevation.
    const ext = await repo.boardExtent(trx, id);
    const fields: Record<string, string> = {};
    if (patch.gridRows !== undefined && patch.gridRows < Number(ext.rowEnd) - 1)
      fields.gridRows = `A position reaches row ${Number(ext.rowEnd) - 1}; move it first`;
    if (patch.gridCols !== undefined && patch.gridCols < Number(ext.colEnd) - 1)
      fields.gridCols = `A position reaches column ${Number(ext.colEnd) - 1}; move it first`;
    if (Object.keys(fields).length)
      throw new AppError(400, "invalid_input", "The grid would cut off positions.", fields);
    const after = await updateVersioned(trx, "boards", siteId, id, version, patch, "board");
    const d = diff(before as never, patch as never);
    if (d.changed)
      await recordAudit(trx, {
        siteId,
        entityType: "board",
        entityId: id,
        boardId: id,
        action: "update",
        actorId,
        before: d.before,
        after: d.after,
      });
    return after;
  });
}

export async function createSection(db: Db, siteId: string, boardId: string, actorId: string, body: CreateSectionBody) {
  return db.transaction().execute(async (trx) => {
    await requireOwned(trx, "boards", siteId, boardId, "That board");
    const sortOrder = body.sortOrder ?? (await repo.nextSectionOrder(trx, boardId));
    const row = await repo.insertSection(trx, { siteId, boardId, name: body.name, notes: body.notes, sortOrder });
    await recordAudit(trx, {
      siteId,
      entityType: "section",
      entityId: row.id,
      boardId,
      action: "create",
      actorId,
      after: row,
    });
    return row;
  });
}

export async function patchSection(db: Db, siteId: string, id: string, actorId: string, body: PatchSectionBody) {
  const { version, ...rest } = body;
  const patch = defined(rest);
  return db.transaction().execute(async (trx) => {
    const before = await requireOwned(trx, "sections", siteId, id, "That section", true);
    if (before.version !== version) throw stale("section", before);
    const after = await updateVersioned(trx, "sections", siteId, id, version, patch, "section");
    const d = diff(before as never, patch as never);
    if (d.changed)
      await recordAudit(trx, {
        siteId,
        entityType: "section",
        entityId: id,
        boardId: before.boardId,
        action: "update",
        actorId,
        before: d.before,
        after: d.after,
      });
    return after;
  });
}

/** Its positions stay on the board without a section (the foreign key sets it null). */
export async function deleteSection(db: Db, siteId: string, id: string, actorId: string, version?: number) {
  await db.transaction().execute(async (trx) => {
    const before = await requireOwned(trx, "sections", siteId, id, "That section", true);
    if (version !== undefined && before.version !== version) throw stale("section", before);
    await repo.deleteSection(trx, id);
    await recordAudit(trx, {
      siteId,
      entityType: "section",
      entityId: id,
      boardId: before.boardId,
      action: "delete",
      actorId,
      before,
    });
  });
}

import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, notFound } from "../errors";
import { listQuery } from "../../src/schemas/defects";
import * as repo from "./repository";

/** A saved view is the register's URL query under a name; it must parse as a register query. */
function checkQuery(query: string) {
  const params = new URLSearchParams(query);
  const obj: Record<string, string | string[]> = {};
  for (const k of new Set(params.keys())) obj[k] = params.getAll(k).length > 1 ? params.getAll(k) : params.get(k)!;
  const r = listQuery.passthrough().safeParse(obj);
  if (!r.success)
    throw new AppError(400, "invalid_input", "That view's filters are not valid.", {
      query: r.error.issues[0]?.message ?? "invalid",
    });
}

const taken = () =>
  new AppError(409, "name_taken", "You already have a view with that name.", { name: "Already used" });

export async function saveView(db: Db, siteId: string, userId: string, b: { name: string; query: string }) {
  checkQuery(b.query);
  try {
    return await db.transaction().execute(async (trx) => {
      const row = await repo.insertView(trx, { siteId, userId, name: b.name, query: b.query });
      await recordAudit(trx, {
        siteId,
        entityType: "defect_view",
        entityId: row.id,
        action: "create",
        actorId: userId,
        after: b,
      });
      return row;
    });
  } catch (e) {
    if ((e as { code?: string }).code === "23505") throw taken();
    throw e;
  }
}

export async function updateView(
  db: Db,
  siteId: string,
  userId: string,
  id: string,
  b: { name: string; query: string },
) {
  checkQuery(b.query);
  try {
    return await db.transaction().execute(async (trx) => {
      const row = await repo.updateViewRow(trx, siteId, userId, id, b);
      if (!row) throw notFound("That saved view");
      await recordAudit(trx, {
        siteId,
        entityType: "defect_view",
        entityId: id,
        action: "update",
        actorId: userId,
        after: b,
      });
      return row;
    });
  } catch (e) {
    if ((e as { code?: string }).code === "23505") throw taken();
    throw e;
  }
}

export async function deleteView(db: Db, siteId: string, userId: string, id: string) {
  await db.transaction().execute(async (trx) => {
    const r = await repo.deleteViewRow(trx, siteId, userId, id);
    if (!r.numDeletedRows) throw notFound("That saved view");
    await recordAudit(trx, { siteId, entityType: "defect_view", entityId: id, action: "delete", actorId: userId });
  });
}

export const listViews = repo.listViews;

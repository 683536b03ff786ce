/**
 * The inventory tables every inventory service edits the same way: one row of a site by id (optionally
 * locked), and the optimistic-version update (UPDATE … WHERE id AND version … RETURNING).
 */
import { sql } from "kysely";
import type { Db } from "../db";
import type { Editable, Row } from "./common";

export async function findOwned<T extends Editable>(
  db: Db,
  table: T,
  siteId: string,
  id: string,
  lock = false,
): Promise<Row<T> | undefined> {
  // The table name is a closed union, so the dynamic select stays type-safe at the call site.
  let q = (db as Db)
    .selectFrom(table as "boards")
    .selectAll()
    .where("id", "=", id)
    .where("siteId", "=", siteId);
  if (lock) q = q.forUpdate();
  return (await q.executeTakeFirst()) as Row<T> | undefined;
}

/** Applies `patch` only if the row is still at `version`, bumping version and updated_at; undefined otherwise. */
export async function updateIfVersion<T extends Editable>(
  db: Db,
  table: T,
  siteId: string,
  id: string,
  version: number,
  patch: Record<string, unknown>,
): Promise<Row<T> | undefined> {
  const updated = await db
    .updateTable(table as "boards")
    .set({ ...(patch as object), version: sql`version + 1`, updatedAt: new Date() })
    .where("id", "=", id)
    .where("siteId", "=", siteId)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();
  return updated as Row<T> | undefined;
}

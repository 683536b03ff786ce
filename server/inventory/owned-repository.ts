/**
 * The inventory tables every inventory service edits the same way: one row of a site by id (optionally
 * locked), and the optimistic-version update (UPDATE … WHERE id AND version … RETURNING).
 *
 * The lock is FOR NO KEY UPDATE, the one the UPDATE takes anyway (a DELETE takes the stronger one itself):
 * it serialises writers of the row, and a row of another table that only names it (a defect on a component, a
 * wanted-list link to a position) checks its foreign key without waiting for it. With FOR UPDATE such a check
 * waited for the lock holder, and a writer holding the site's demand lock waited for one waiting for that lock
 * (DEVELOPERS.md, "Lock order of the wanted list's writers").
 */
import { sql, type Selectable } from "kysely";
import type { Database } from "../../db/types";
import type { Db } from "../db";

/** The inventory tables edited this way, and one row of each. */
export type Editable = "floodEvents" | "boards" | "sections" | "positions" | "components";
export type Row<T extends Editable> = Selectable<Database[T]>;

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
  if (lock) q = q.forNoKeyUpdate();
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

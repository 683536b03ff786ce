/**
 * Pieces every inventory service shares: who is acting, the optimistic-version update
 * (server/inventory/owned-repository.ts; no row → 409 with the fresh record), and
 * turning PostgreSQL's unique violations into clear 409s.
 */
import type { Response } from "express";
import type { Db } from "../db";
import { AppError, conflict, notFound } from "../errors";
import { findOwned, updateIfVersion, type Editable, type Row } from "./owned-repository";

export const actorOf = (res: Response) => res.locals.user!.id;

export async function requireOwned<T extends Editable>(
  db: Db,
  table: T,
  siteId: string,
  id: string,
  what: string,
  lock = false,
) {
  const row = await findOwned(db, table, siteId, id, lock);
  if (!row) throw notFound(what);
  return row;
}

/** The stale-version 409: message for people, the current record for the form to show. */
export const stale = (what: string, current: unknown) =>
  conflict(
    `Someone else changed this ${what} since you opened it. Their version is shown; re-apply your change to it.`,
    current,
  );

/**
 * Applies `patch` only if the row is still at `version`; bumps version and updated_at.
 * Returns the new row, or throws 404 (gone) / 409 with the fresh record (stale).
 */
export async function updateVersioned<T extends Editable>(
  db: Db,
  table: T,
  siteId: string,
  id: string,
  version: number,
  patch: Record<string, unknown>,
  what: string,
): Promise<Row<T>> {
  const updated = await updateIfVersion(db, table, siteId, id, version, patch);
  if (updated) return updated as Row<T>;
  const fresh = await findOwned(db, table, siteId, id);
  if (!fresh) throw notFound(what);
  throw stale(what, fresh);
}

/** PostgreSQL unique_violation (23505) on the named index, as a 409 with a field message. */
export async function mapUnique<T>(
  work: () => Promise<T>,
  byIndex: Record<string, [field: string, message: string]>,
): Promise<T> {
  try {
    return await work();
  } catch (e) {
    const err = e as { code?: string; constraint?: string };
    if (err.code === "23505" && err.constraint && byIndex[err.constraint]) {
      const [field, message] = byIndex[err.constraint];
      throw new AppError(409, "duplicate", message, { [field]: message });
    }
    throw e;
  }
}

export const UNIQUE = {
  designation: {
    positions_board_designation_uq: ["designation", "That designation is already used on this board"] as [
      string,
      string,
    ],
  },
  tag: {
    components_tag_uq: ["tagNumber", "That tag number is already on another component of this site"] as [
      string,
      string,
    ],
  },
};

/** Drops undefined keys, so a PATCH only touches what it names. */
export function defined<T extends Record<string, unknown>>(o: T): Partial<T> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as Partial<T>;
}

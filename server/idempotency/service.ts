/**
 * Idempotency keys: the only writer of `idempotency_keys`. A create that carries an
 * `Idempotency-Key` first claims the key (one INSERT … ON CONFLICT DO NOTHING, so two racing
 * repeats cannot both run), then records its 2xx answer; a refused or failed attempt gives the key
 * back so the client may try again. Keys are kept for RETENTION_DAYS, then a repeat counts as new.
 */
import { sql } from "kysely";
import type { Db } from "../db";

export const RETENTION_DAYS = 30;
/** A claim still running after this long was cut off (the process stopped mid-request). */
export const ABANDONED_AFTER_MS = 5 * 60_000;

export interface Attempt {
  userId: string;
  key: string;
  method: string;
  path: string;
  fingerprint: string;
}

export type Claim =
  | { kind: "claimed" }
  | { kind: "replay"; status: number; body: unknown }
  | { kind: "mismatch" }
  | { kind: "running" }
  | { kind: "unknown" };

export async function claim(db: Db, a: Attempt, now = new Date()): Promise<Claim> {
  const inserted = await db
    .insertInto("idempotencyKeys")
    .values({ userId: a.userId, key: a.key, method: a.method, path: a.path, fingerprint: a.fingerprint })
    .onConflict((oc) => oc.columns(["userId", "key"]).doNothing())
    .returning("key")
    .executeTakeFirst();
  if (inserted) {
    // This person's expired keys go as new ones arrive (the (user_id, created_at) index serves it).
    await db
      .deleteFrom("idempotencyKeys")
      .where("userId", "=", a.userId)
      .where("createdAt", "<", sql<Date>`now() - make_interval(days => ${RETENTION_DAYS})`)
      .execute();
    return { kind: "claimed" };
  }
  const row = await db
    .selectFrom("idempotencyKeys")
    .selectAll()
    .where("userId", "=", a.userId)
    .where("key", "=", a.key)
    .executeTakeFirst();
  if (!row) return claim(db, a, now); // released between our insert and read: try once more
  const expired = now.getTime() - row.createdAt.getTime() > RETENTION_DAYS * 86_400_000;
  if (expired) {
    await db
      .deleteFrom("idempotencyKeys")
      .where("userId", "=", a.userId)
      .where("key", "=", a.key)
      .where("createdAt", "=", row.createdAt)
      .execute();
    return claim(db, a, now);
  }
  if (row.fingerprint !== a.fingerprint) return { kind: "mismatch" };
  if (row.state === "done") return { kind: "replay", status: row.responseStatus ?? 200, body: row.responseBody };
  return now.getTime() - row.createdAt.getTime() > ABANDONED_AFTER_MS ? { kind: "unknown" } : { kind: "running" };
}

/** Keeps the first successful answer for every later repeat. */
export async function complete(db: Db, userId: string, key: string, status: number, body: unknown): Promise<void> {
  await db
    .updateTable("idempotencyKeys")
    .set({ state: "done", responseStatus: status, responseBody: JSON.stringify(body ?? null), completedAt: new Date() })
    .where("userId", "=", userId)
    .where("key", "=", key)
    .where("state", "=", "running")
    .execute();
}

/** The attempt was refused or failed and wrote nothing: the key is free for a retry. */
export async function release(db: Db, userId: string, key: string): Promise<void> {
  await db
    .deleteFrom("idempotencyKeys")
    .where("userId", "=", userId)
    .where("key", "=", key)
    .where("state", "=", "running")
    .execute();
}

/**
 * Idempotency keys: the only writer of `idempotency_keys`. A create that carries an
 * `Idempotency-Key` first claims the key (one INSERT … ON CONFLICT DO NOTHING, so two racing
 * repeats cannot both run), then records its 2xx answer; a refused or failed attempt gives the key
 * back so the client may try again. Keys are kept for RETENTION_DAYS, then a repeat counts as new.
 */
import type { Db } from "../db";
import {
  completeRunningKey,
  deleteExpiredKeys,
  deleteKeyCreatedAt,
  deleteRunningKey,
  findKey,
  insertKey,
} from "./repository";

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
  const inserted = await insertKey(db, {
    userId: a.userId,
    key: a.key,
    method: a.method,
    path: a.path,
    fingerprint: a.fingerprint,
  });
  if (inserted) {
    // This person's expired keys go as new ones arrive.
    await deleteExpiredKeys(db, a.userId, RETENTION_DAYS);
    return { kind: "claimed" };
  }
  const row = await findKey(db, a.userId, a.key);
  if (!row) return claim(db, a, now); // released between our insert and read: try once more
  const expired = now.getTime() - row.createdAt.getTime() > RETENTION_DAYS * 86_400_000;
  if (expired) {
    await deleteKeyCreatedAt(db, a.userId, a.key, row.createdAt);
    return claim(db, a, now);
  }
  if (row.fingerprint !== a.fingerprint) return { kind: "mismatch" };
  if (row.state === "done") return { kind: "replay", status: row.responseStatus ?? 200, body: row.responseBody };
  return now.getTime() - row.createdAt.getTime() > ABANDONED_AFTER_MS ? { kind: "unknown" } : { kind: "running" };
}

/** Keeps the first successful answer for every later repeat. */
export async function complete(db: Db, userId: string, key: string, status: number, body: unknown): Promise<void> {
  await completeRunningKey(db, userId, key, status, body);
}

/** The attempt was refused or failed and wrote nothing: the key is free for a retry. */
export async function release(db: Db, userId: string, key: string): Promise<void> {
  await deleteRunningKey(db, userId, key);
}

import { sql } from "kysely";
import type { Db } from "../db";

export interface KeyRow {
  userId: string;
  key: string;
  method: string;
  path: string;
  fingerprint: string;
}

/** One INSERT … ON CONFLICT DO NOTHING: the key when this attempt claimed it, undefined when it was taken. */
export const insertKey = (db: Db, k: KeyRow) =>
  db
    .insertInto("idempotencyKeys")
    .values(k)
    .onConflict((oc) => oc.columns(["userId", "key"]).doNothing())
    .returning("key")
    .executeTakeFirst();

/** This person's keys older than `retentionDays` (the (user_id, created_at) index serves it). */
export const deleteExpiredKeys = (db: Db, userId: string, retentionDays: number) =>
  db
    .deleteFrom("idempotencyKeys")
    .where("userId", "=", userId)
    .where("createdAt", "<", sql<Date>`now() - make_interval(days => ${retentionDays})`)
    .execute();

export const findKey = (db: Db, userId: string, key: string) =>
  db.selectFrom("idempotencyKeys").selectAll().where("userId", "=", userId).where("key", "=", key).executeTakeFirst();

/** The key as it was read (same created_at): a newer claim of the same key is left alone. */
export const deleteKeyCreatedAt = (db: Db, userId: string, key: string, createdAt: Date) =>
  db
    .deleteFrom("idempotencyKeys")
    .where("userId", "=", userId)
    .where("key", "=", key)
    .where("createdAt", "=", createdAt)
    .execute();

export const completeRunningKey = (db: Db, userId: string, key: string, status: number, body: unknown) =>
  db
    .updateTable("idempotencyKeys")
    .set({ state: "done", responseStatus: status, responseBody: JSON.stringify(body ?? null), completedAt: new Date() })
    .where("userId", "=", userId)
    .where("key", "=", key)
    .where("state", "=", "running")
    .execute();

export const deleteRunningKey = (db: Db, userId: string, key: string) =>
  db
    .deleteFrom("idempotencyKeys")
    .where("userId", "=", userId)
    .where("key", "=", key)
    .where("state", "=", "running")
    .execute();

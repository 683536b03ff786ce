import { sql } from "kysely";
import type { Db } from "../db";

export const insertReset = (db: Db, v: { userId: string; tokenHash: string; expiresAt: Date }) =>
  db.insertInto("passwordResets").values(v).returning("id").executeTakeFirstOrThrow();

export const countRecent = async (db: Db, userId: string, since: Date) =>
  Number(
    (
      await db
        .selectFrom("passwordResets")
        .select((eb) => eb.fn.countAll<number>().as("n"))
        .where("userId", "=", userId)
        .where("createdAt", ">", since)
        .executeTakeFirstOrThrow()
    ).n,
  );

export const findByTokenHash = (db: Db, tokenHash: string, lock = false) => {
  const q = db
    .selectFrom("passwordResets")
    .innerJoin("users", "users.id", "passwordResets.userId")
    .select([
      "passwordResets.id",
      "passwordResets.userId",
      "passwordResets.expiresAt",
      "passwordResets.usedAt",
      "users.email",
      "users.suspendedAt",
    ])
    .where("passwordResets.tokenHash", "=", tokenHash);
  return (lock ? q.forUpdate("passwordResets") : q).executeTakeFirst();
};

/** Every outstanding link of the user stops working once one of them has been used. */
export const useAllFor = (db: Db, userId: string) =>
  db
    .updateTable("passwordResets")
    .set({ usedAt: new Date() })
    .where("userId", "=", userId)
    .where("usedAt", "is", null)
    .execute();

/** Holds the person's reset requests until the transaction ends: requests arriving together are counted one by one. */
export const lockResetsOf = (trx: Db, userId: string) =>
  sql`select pg_advisory_xact_lock(hashtext(${"password-reset:" + userId}))`.execute(trx);

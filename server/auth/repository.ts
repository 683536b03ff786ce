import { sql } from "kysely";
import type { Db } from "../db";

export const findUserByEmail = (db: Db, email: string) =>
  db
    .selectFrom("users")
    .selectAll()
    .where(sql`lower(email)`, "=", email.toLowerCase())
    .executeTakeFirst();

export async function insertUser(
  db: Db,
  u: { email: string; name: string; passwordHash: string | null; isAdmin: boolean },
) {
  return db.insertInto("users").values(u).returning(["id", "email", "name", "isAdmin"]).executeTakeFirstOrThrow();
}

/** The one writer of a password: sign-up paths insert, a reset (server/password-reset) sets it here, in its transaction. */
export const setPasswordHash = (db: Db, userId: string, passwordHash: string) =>
  db.updateTable("users").set({ passwordHash, updatedAt: new Date() }).where("id", "=", userId).execute();

/**
 * A signed-in change: replaces the hash only if it is still the one the current password was
 * checked against (0 rows when another change got there first: never a silent overwrite).
 */
export const replacePasswordHash = async (db: Db, userId: string, fromHash: string, passwordHash: string) =>
  Number(
    (
      await db
        .updateTable("users")
        .set({ passwordHash, updatedAt: new Date() })
        .where("id", "=", userId)
        .where("passwordHash", "=", fromHash)
        .executeTakeFirst()
    ).numUpdatedRows,
  );

export const findUserById = (db: Db, userId: string) =>
  db.selectFrom("users").selectAll().where("id", "=", userId).executeTakeFirst();

/** The account, its row locked until the transaction ends: a suspension racing a change of standing waits for it. */
export const lockUserById = (db: Db, userId: string) =>
  db.selectFrom("users").selectAll().where("id", "=", userId).forUpdate().executeTakeFirst();

/** Every account of the instance, for its admins: no password hash; who suspended one, by name. */
export const listUsers = (db: Db) =>
  db
    .selectFrom("users")
    .leftJoin("users as by", "by.id", "users.suspendedBy")
    .select([
      "users.id",
      "users.email",
      "users.name",
      "users.isAdmin",
      "users.createdAt",
      "users.suspendedAt",
      "users.suspendedReason",
      "by.name as suspendedByName",
    ])
    .orderBy(sql`lower(users.name)`)
    .orderBy("users.email")
    .execute();

/** Suspends an account: 0 when it was suspended already (the caller says so, never a silent overwrite). */
export const suspend = async (db: Db, userId: string, by: string, reason: string) =>
  Number(
    (
      await db
        .updateTable("users")
        .set({ suspendedAt: new Date(), suspendedBy: by, suspendedReason: reason, updatedAt: new Date() })
        .where("id", "=", userId)
        .where("suspendedAt", "is", null)
        .executeTakeFirst()
    ).numUpdatedRows,
  );

/** Reinstates a suspended account: 0 when it was not suspended. */
export const reinstate = async (db: Db, userId: string) =>
  Number(
    (
      await db
        .updateTable("users")
        .set({ suspendedAt: null, suspendedBy: null, suspendedReason: "", updatedAt: new Date() })
        .where("id", "=", userId)
        .where("suspendedAt", "is not", null)
        .executeTakeFirst()
    ).numUpdatedRows,
  );

/** Makes an account an instance admin or not: 0 when it already was as asked (the caller says so). */
export const setInstanceAdmin = async (db: Db, userId: string, isAdmin: boolean) =>
  Number(
    (
      await db
        .updateTable("users")
        .set({ isAdmin, updatedAt: new Date() })
        .where("id", "=", userId)
        .where("isAdmin", "=", !isAdmin)
        .executeTakeFirst()
    ).numUpdatedRows,
  );

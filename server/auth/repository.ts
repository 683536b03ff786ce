import { sql } from "kysely";
import type { Db } from "../db";

export const findUserByEmail = (db: Db, email: string) =>
  db
    .selectFrom("users")
    .selectAll()
    .where(sql`lower(email)`, "=", email.toLowerCase())
    .executeTakeFirst();

export const listMemberships = (db: Db, userId: string) =>
  db
    .selectFrom("memberships")
    .innerJoin("sites", "sites.id", "memberships.siteId")
    .select(["memberships.siteId", "sites.name as siteName", "memberships.role"])
    .where("memberships.userId", "=", userId)
    .orderBy("sites.name")
    .execute();

export async function insertUser(
  db: Db,
  u: { email: string; name: string; passwordHash: string | null; isAdmin: boolean },
) {
  return db.insertInto("users").values(u).returning(["id", "email", "name", "isAdmin"]).executeTakeFirstOrThrow();
}

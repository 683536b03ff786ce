/** Share links' queries (server/parts/share.ts says what a link shows). */
import { sql } from "kysely";
import type { Db } from "../db";

export const insertShareLink = (trx: Db, v: { siteId: string; tokenHash: string; label: string; createdBy: string }) =>
  trx
    .insertInto("partShareLinks")
    .values(v)
    .returning(["id", "label", "createdAt", "revokedAt"])
    .executeTakeFirstOrThrow();

export const shareLinksOf = (db: Db, siteId: string) =>
  db
    .selectFrom("partShareLinks as s")
    .leftJoin("users as u", "u.id", "s.createdBy")
    .select(["s.id", "s.label", "s.createdAt", "s.revokedAt", "u.name as createdByName"])
    .where("s.siteId", "=", siteId)
    .orderBy("s.createdAt", "desc")
    .execute();

/** Revoking twice keeps the first time; undefined when the site has no such link. */
export const revokeLink = (trx: Db, siteId: string, id: string, revokedBy: string) =>
  trx
    .updateTable("partShareLinks")
    .set({ revokedAt: sql`coalesce(revoked_at, now())`, revokedBy })
    .where("siteId", "=", siteId)
    .where("id", "=", id)
    .returning("id")
    .executeTakeFirst();

export const linkByTokenHash = (db: Db, tokenHash: string) =>
  db.selectFrom("partShareLinks").select(["siteId", "revokedAt"]).where("tokenHash", "=", tokenHash).executeTakeFirst();

export const siteName = async (db: Db, siteId: string) =>
  (await db.selectFrom("sites").select("name").where("id", "=", siteId).executeTakeFirstOrThrow()).name;

/** True when the photo is a nameplate photo of a component on a line still wanted on the site (one query). */
export const isSharedNameplate = async (db: Db, siteId: string, photoId: string) =>
  !!(await db
    .selectFrom("photos as ph")
    .innerJoin("partDemandLinks as l", "l.componentId", "ph.componentId")
    .innerJoin("partLines as pl", "pl.id", "l.lineId")
    .select("ph.id")
    .where("ph.id", "=", photoId)
    .where("ph.siteId", "=", siteId)
    .where("ph.kind", "=", "nameplate")
    .where("ph.deletedAt", "is", null)
    .where("pl.siteId", "=", siteId)
    .where("pl.status", "in", ["wanted", "lead_found"])
    .where((e) => e.or([e("l.active", "=", true), e("l.fitted", "=", true)]))
    .limit(1)
    .executeTakeFirst());

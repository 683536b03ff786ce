import { sql } from "kysely";
import type { Role } from "../../src/domain/vocab";
import type { Db } from "../db";
import type { SendStatus } from "../../db/types";

const cols = [
  "invitations.id",
  "invitations.siteId",
  "invitations.email",
  "invitations.role",
  "invitations.invitedBy",
  "invitations.expiresAt",
  "invitations.acceptedAt",
  "invitations.revokedAt",
  "invitations.sendStatus",
  "invitations.sendError",
  "invitations.lastSentAt",
  "invitations.createdAt",
] as const;

const withInviter = (db: Db) =>
  db
    .selectFrom("invitations")
    .leftJoin("users", "users.id", "invitations.invitedBy")
    .select([...cols, "users.name as invitedByName"]);

/** Live = neither accepted nor revoked (expired ones still show, so they can be resent). */
export const listLive = (db: Db, siteId: string) =>
  withInviter(db)
    .where("invitations.siteId", "=", siteId)
    .where("invitations.acceptedAt", "is", null)
    .where("invitations.revokedAt", "is", null)
    .orderBy("invitations.createdAt", "desc")
    .execute();

export const findInvitation = (db: Db, siteId: string, id: string) =>
  withInviter(db).where("invitations.siteId", "=", siteId).where("invitations.id", "=", id).executeTakeFirst();

export const findLiveByEmail = (db: Db, siteId: string, email: string) =>
  db
    .selectFrom("invitations")
    .select(["id"])
    .where("siteId", "=", siteId)
    .where(sql`lower(email)`, "=", email.toLowerCase())
    .where("acceptedAt", "is", null)
    .where("revokedAt", "is", null)
    .executeTakeFirst();

export const insertInvitation = (
  db: Db,
  v: { siteId: string; email: string; role: Role; tokenHash: string; invitedBy: string; expiresAt: Date },
) => db.insertInto("invitations").values(v).returning("id").executeTakeFirstOrThrow();

/** A new link: the old token stops working, the seven days start again. */
export const renewInvitation = (
  db: Db,
  id: string,
  v: { role?: Role; tokenHash: string; invitedBy: string; expiresAt: Date },
) =>
  db
    .updateTable("invitations")
    .set({ ...v, sendStatus: "pending", sendError: null })
    .where("id", "=", id)
    .execute();

export const markSent = (db: Db, id: string, status: SendStatus, error: string | null) =>
  db
    .updateTable("invitations")
    .set({ sendStatus: status, sendError: error, ...(status === "sent" ? { lastSentAt: new Date() } : {}) })
    .where("id", "=", id)
    .execute();

export const markRevoked = (db: Db, id: string) =>
  db.updateTable("invitations").set({ revokedAt: new Date() }).where("id", "=", id).execute();

/** The invitation behind a link, locked for the accepting transaction. */
export const findByTokenHash = (db: Db, tokenHash: string, lock = false) => {
  const q = db
    .selectFrom("invitations")
    .innerJoin("sites", "sites.id", "invitations.siteId")
    .leftJoin("users", "users.id", "invitations.invitedBy")
    .select([...cols, "sites.name as siteName", "users.name as invitedByName"])
    .where("invitations.tokenHash", "=", tokenHash);
  return (lock ? q.forUpdate("invitations") : q).executeTakeFirst();
};

export const markAccepted = (db: Db, id: string, userId: string) =>
  db.updateTable("invitations").set({ acceptedAt: new Date(), acceptedBy: userId }).where("id", "=", id).execute();

export const isMember = async (db: Db, siteId: string, userId: string) =>
  !!(await db
    .selectFrom("memberships")
    .select("userId")
    .where("siteId", "=", siteId)
    .where("userId", "=", userId)
    .executeTakeFirst());

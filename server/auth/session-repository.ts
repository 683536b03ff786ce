import { createHash } from "node:crypto";
import type { Adapter, DatabaseSession, DatabaseUser } from "lucia";
import type { Role } from "../../src/domain/vocab";
import type { Db } from "../db";
import { memberRolesOf } from "../sites/reads";
import { statementCache } from "../statement-cache";

/*
 * lucia's adapter is this domain's repository for sessions: lucia v3 stores sessions only through an
 * Adapter object, whose every method is one query, so the adapter is where the `sessions` queries live
 * (server/auth/lucia.ts configures lucia with it).
 */

/**
 * The database keeps the SHA-256 of each session id, never the id itself (the cookie's
 * value): a copy of the sessions table does not let anyone sign in as the crew.
 * Migration 2026_12_02_0230 ended the sessions stored before this.
 */
export const sessionKey = (sessionId: string) => createHash("sha256").update(sessionId).digest("hex");

/**
 * The session, its person and their role on each site, in one statement: every request reads it, and the route
 * guard takes the caller's standing from it (`standingOn`) instead of asking again. Compiled once (its shape never
 * changes; server/statement-cache.ts): it still runs against the database on every request.
 */
const sessionStatement = statementCache((db: Db, _shape: null, v: { key: string }) =>
  db
    .selectFrom("sessions")
    .innerJoin("users", "users.id", "sessions.userId")
    .select((eb) => [
      "sessions.id",
      "sessions.userId",
      "sessions.expiresAt",
      "users.email",
      "users.name",
      "users.isAdmin",
      memberRolesOf(eb).as("siteRoles"),
    ])
    .where("sessions.id", "=", v.key)
    // A suspended account's sessions end when it is suspended; this keeps one that raced the suspension from working.
    .where("users.suspendedAt", "is", null),
);

/** How many live sessions an account has (every place it is signed in). */
export const countSessionsOf = async (db: Db, userId: string) =>
  Number(
    (
      await db
        .selectFrom("sessions")
        .select((eb) => eb.fn.countAll<string>().as("n"))
        .where("userId", "=", userId)
        .where("expiresAt", ">", new Date())
        .executeTakeFirstOrThrow()
    ).n,
  );

/** Ends every session of an account but the one given (its cookie's id); how many ended. */
export const endOtherSessionsOf = async (db: Db, userId: string, keepSessionId: string) =>
  Number(
    (
      await db
        .deleteFrom("sessions")
        .where("userId", "=", userId)
        .where("id", "!=", sessionKey(keepSessionId))
        .executeTakeFirst()
    ).numDeletedRows,
  );

/** Ends every session of an account, in the caller's transaction (an account suspended). */
export const endSessionsOf = (db: Db, userId: string) =>
  db.deleteFrom("sessions").where("userId", "=", userId).execute();

/** lucia v3's storage contract over Kysely: sessions and users live in PostgreSQL. */
export function kyselyAdapter(db: Db): Adapter {
  const toUser = (u: {
    id: string;
    email: string;
    name: string;
    isAdmin: boolean;
    siteRoles: Record<string, Role> | null;
  }): DatabaseUser => ({
    id: u.id,
    attributes: { email: u.email, name: u.name, isAdmin: u.isAdmin, siteRoles: u.siteRoles ?? {} },
  });
  const toSession = (s: { id: string; userId: string; expiresAt: Date }): DatabaseSession => ({
    id: s.id,
    userId: s.userId,
    expiresAt: s.expiresAt,
    attributes: {},
  });
  return {
    /** The session, its person and their role on each site (`sessionStatement`). */
    async getSessionAndUser(sessionId) {
      const [row] = (await db.executeQuery(sessionStatement.compile(db, null, { key: sessionKey(sessionId) }))).rows;
      if (!row) return [null, null];
      return [
        toSession({ ...row, id: sessionId }),
        toUser({ id: row.userId, email: row.email, name: row.name, isAdmin: row.isAdmin, siteRoles: row.siteRoles }),
      ];
    },
    /** The ids here are the stored hashes: enough to count and expire sessions, useless as cookies. */
    async getUserSessions(userId) {
      const rows = await db.selectFrom("sessions").selectAll().where("userId", "=", userId).execute();
      return rows.map(toSession);
    },
    async setSession(s) {
      await db
        .insertInto("sessions")
        .values({ id: sessionKey(s.id), userId: s.userId, expiresAt: s.expiresAt })
        .execute();
    },
    async updateSessionExpiration(sessionId, expiresAt) {
      await db.updateTable("sessions").set({ expiresAt }).where("id", "=", sessionKey(sessionId)).execute();
    },
    async deleteSession(sessionId) {
      await db.deleteFrom("sessions").where("id", "=", sessionKey(sessionId)).execute();
    },
    async deleteUserSessions(userId) {
      await db.deleteFrom("sessions").where("userId", "=", userId).execute();
    },
    async deleteExpiredSessions() {
      await db.deleteFrom("sessions").where("expiresAt", "<=", new Date()).execute();
    },
  };
}

/** Prepared files' queries (server/prepared-files/service.ts says when each runs). */
import { sql, type Insertable, type UpdateObject } from "kysely";
import type { Database } from "../../db/types";
import type { Db } from "../db";

type Patch = UpdateObject<Database, "preparedFiles">;

/** One person's requests on one site, one at a time until the transaction ends. */
export const lockRequester = (trx: Db, actorId: string, siteId: string) =>
  sql`SELECT pg_advisory_xact_lock(hashtext('tideline.prepared-files'), hashtext(${actorId + siteId}))`.execute(trx);

/** The person's files still waiting or being made on the site. */
export const pendingCount = async (trx: Db, siteId: string, requestedBy: string) =>
  Number(
    (
      await trx
        .selectFrom("preparedFiles")
        .select((eb) => eb.fn.countAll<number>().as("n"))
        .where("siteId", "=", siteId)
        .where("requestedBy", "=", requestedBy)
        .where("state", "in", ["queued", "rendering"])
        .executeTakeFirstOrThrow()
    ).n,
  );

export const insertFile = (trx: Db, v: Insertable<Database["preparedFiles"]>) =>
  trx.insertInto("preparedFiles").values(v).returningAll().executeTakeFirstOrThrow();

export const findFile = (db: Db, siteId: string, fileId: string) =>
  db.selectFrom("preparedFiles").selectAll().where("id", "=", fileId).where("siteId", "=", siteId).executeTakeFirst();

/** The person's files on the site, newest first. */
export const filesOf = (db: Db, siteId: string, requestedBy: string, limit: number) =>
  db
    .selectFrom("preparedFiles")
    .selectAll()
    .where("siteId", "=", siteId)
    .where("requestedBy", "=", requestedBy)
    .orderBy("createdAt", "desc")
    .limit(limit)
    .execute();

/** Ready or failed files not yet seen, on the sites where the person is a member (any site for an admin). */
export const unseenFinished = (db: Db, user: { id: string; isAdmin: boolean }, limit: number) => {
  let q = db
    .selectFrom("preparedFiles as f")
    .innerJoin("sites as s", "s.id", "f.siteId")
    .selectAll("f")
    .select("s.name as siteName")
    .where("f.requestedBy", "=", user.id)
    .where("f.state", "in", ["ready", "failed"])
    .where("f.seenAt", "is", null);
  if (!user.isAdmin)
    q = q.where((eb) =>
      eb.exists(
        eb
          .selectFrom("memberships as m")
          .select("m.userId")
          .whereRef("m.siteId", "=", "f.siteId")
          .where("m.userId", "=", user.id),
      ),
    );
  return q.orderBy("f.finishedAt", "desc").limit(limit).execute();
};

/** Idempotent: the first time seen stays. */
export const setSeen = (db: Db, fileId: string) =>
  db
    .updateTable("preparedFiles")
    .set({ seenAt: sql<Date>`coalesce(seen_at, now())` })
    .where("id", "=", fileId)
    .returningAll()
    .executeTakeFirstOrThrow();

/** A failed or expired file back to waiting; undefined when it is in another state. */
export const requeueFailed = (trx: Db, fileId: string) =>
  trx
    .updateTable("preparedFiles")
    .set({
      state: "queued",
      error: null,
      progressDone: 0,
      progressTotal: null,
      seenAt: null,
      finishedAt: null,
      expiresAt: null,
      version: sql<number>`version + 1`,
    })
    .where("id", "=", fileId)
    .where("state", "in", ["failed", "expired"])
    .returningAll()
    .executeTakeFirst();

/** Claim: queued (or left "rendering" by an attempt cut off by a restart) → rendering, attempt n. */
export const claimForRender = (db: Db, fileId: string) =>
  db
    .updateTable("preparedFiles")
    .set({ state: "rendering", startedAt: new Date(), attempts: sql<number>`attempts + 1`, progressDone: 0 })
    .where("id", "=", fileId)
    .where("state", "in", ["queued", "rendering"])
    .returningAll()
    .executeTakeFirst();

/** The requester and their role on the site now (none when no longer a member). */
export const requesterOf = (db: Db, userId: string, siteId: string) =>
  db
    .selectFrom("users as u")
    .leftJoin("memberships as m", (j) => j.onRef("m.userId", "=", "u.id").on("m.siteId", "=", siteId))
    .select(["u.id", "u.name", "u.email", "u.isAdmin", "m.role"])
    .where("u.id", "=", userId)
    .executeTakeFirst();

/** A write by one attempt, only while it is still the current attempt and rendering. */
const ofAttempt = (db: Db, fileId: string, attempt: number, patch: Patch) =>
  db
    .updateTable("preparedFiles")
    .set(patch)
    .where("id", "=", fileId)
    .where("attempts", "=", attempt)
    .where("state", "=", "rendering");

export const updateAttempt = (db: Db, fileId: string, attempt: number, patch: Patch) =>
  ofAttempt(db, fileId, attempt, patch).execute();

/** The ready row, or undefined when the attempt was overtaken. */
export const finishAttempt = (trx: Db, fileId: string, attempt: number, patch: Patch, keepHours: number) =>
  ofAttempt(trx, fileId, attempt, { ...patch, expiresAt: sql<Date>`now() + ${keepHours} * interval '1 hour'` })
    .returningAll()
    .executeTakeFirst();

/** Ready or failed files whose keeping time ran out (up to `limit`). */
export const expiredFiles = (db: Db, now: Date, limit: number) =>
  db
    .selectFrom("preparedFiles")
    .select(["id", "storageKey"])
    .where("state", "in", ["ready", "failed"])
    .where("expiresAt", "<=", now)
    .limit(limit)
    .execute();

/** Rows changed (0 when someone else got there first). */
export const markExpired = async (db: Db, fileId: string) =>
  Number(
    (
      await db
        .updateTable("preparedFiles")
        .set({ state: "expired", storageKey: null })
        .where("id", "=", fileId)
        .where("state", "in", ["ready", "failed"])
        .executeTakeFirst()
    ).numUpdatedRows,
  );

/** Files still waiting or being made whose last start is before `before` (up to `limit`). */
export const staleWaiting = (db: Db, before: Date, limit: number) =>
  db
    .selectFrom("preparedFiles")
    .select(["id", "attempts"])
    .where("state", "in", ["queued", "rendering"])
    .where(sql<Date>`coalesce(started_at, created_at)`, "<", before)
    .limit(limit)
    .execute();

/** Fails one attempt left waiting; rows changed (0 when it moved on meanwhile). */
export const failStale = async (db: Db, fileId: string, attempt: number, error: string, now: Date) =>
  Number(
    (
      await db
        .updateTable("preparedFiles")
        .set({ state: "failed", error, finishedAt: now, seenAt: null })
        .where("id", "=", fileId)
        .where("attempts", "=", attempt)
        .where("state", "in", ["queued", "rendering"])
        .executeTakeFirst()
    ).numUpdatedRows,
  );

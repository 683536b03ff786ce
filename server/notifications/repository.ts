/** The reads behind defect notices and the weekly summary (this domain writes only notification_prefs). */
import { sql } from "kysely";
import type { Db } from "../db";
import { LIST_LIMIT } from "./weekly-text";

/** A defect with the names an e-mail about it shows. */
export const defectForNotice = (db: Db, defectId: string) =>
  db
    .selectFrom("defects")
    .innerJoin("sites", "sites.id", "defects.siteId")
    .innerJoin("boards", "boards.id", "defects.boardId")
    .leftJoin("positions", "positions.id", "defects.positionId")
    .select([
      "defects.id",
      "defects.siteId",
      "defects.title",
      "defects.severity",
      "defects.status",
      "defects.safetyCritical",
      "defects.blocksEnergisation",
      "defects.dueOn",
      "defects.assigneeId",
      "defects.repairedBy",
      "sites.name as siteName",
      "boards.name as boardName",
      "positions.designation",
    ])
    .where("defects.id", "=", defectId)
    .executeTakeFirst();

export const addressesOf = (db: Db, userIds: string[]) =>
  db.selectFrom("users").select(["id", "email", "name", "suspendedAt"]).where("id", "in", userIds).execute();

export const isMember = async (db: Db, siteId: string, userId: string) =>
  !!(await db
    .selectFrom("memberships")
    .select("userId")
    .where("siteId", "=", siteId)
    .where("userId", "=", userId)
    .executeTakeFirst());

export const curatorIds = async (db: Db, siteId: string) =>
  (
    await db
      .selectFrom("memberships")
      .select("userId")
      .where("siteId", "=", siteId)
      .where("role", "=", "curator")
      .execute()
  ).map((c) => c.userId);

export const allSites = (db: Db) => db.selectFrom("sites").select(["id", "name", "timeZone"]).orderBy("name").execute();

export const curatorAddresses = (db: Db, siteId: string) =>
  db
    .selectFrom("memberships")
    .innerJoin("users", "users.id", "memberships.userId")
    .select(["users.id", "users.email"])
    .where("memberships.siteId", "=", siteId)
    .where("memberships.role", "=", "curator")
    .where("users.suspendedAt", "is", null) // a suspended account gets no e-mail (server/auth/suspension.ts)
    .execute();

/** The first LIST_LIMIT defects by priority, each row also carrying the whole set's size. */
const defectLines = (db: Db, siteId: string) =>
  db
    .selectFrom("defects")
    .innerJoin("boards", "boards.id", "defects.boardId")
    .leftJoin("positions", "positions.id", "defects.positionId")
    .select([
      "defects.title",
      "boards.name as board",
      "positions.designation",
      "defects.status",
      "defects.safetyCritical",
      "defects.blocksEnergisation",
      // The whole set's size on every row, so one query gives the first ten and the count.
      sql<number>`(count(*) over ())::int`.as("total"),
    ])
    .where("defects.siteId", "=", siteId)
    .orderBy("defects.priorityScore", "desc")
    .orderBy("defects.createdAt")
    .limit(LIST_LIMIT);

export const defectsOpened = (db: Db, siteId: string, from: Date, to: Date) =>
  defectLines(db, siteId).where("defects.createdAt", ">", from).where("defects.createdAt", "<=", to).execute();

export const defectsClosed = (db: Db, siteId: string, from: Date, to: Date) =>
  defectLines(db, siteId)
    .where("defects.status", "=", "closed")
    .where("defects.closedAt", ">", from)
    .where("defects.closedAt", "<=", to)
    .execute();

/** The same rule as the return-to-service gate: closed or accepted as is no longer blocks; deferred still does. */
export const defectsBlocking = (db: Db, siteId: string) =>
  defectLines(db, siteId)
    .where("defects.status", "not in", ["closed", "accepted_as_is"])
    .where((eb) => eb.or([eb("defects.blocksEnergisation", "=", true), eb("defects.safetyCritical", "=", true)]))
    .execute();

/** Inspections in (from, to]: how many, of how many positions, and per board. */
export async function inspectionsBetween(db: Db, siteId: string, from: Date, to: Date) {
  const totals = await db
    .selectFrom("inspections")
    .where("siteId", "=", siteId)
    .where("inspectedAt", ">", from)
    .where("inspectedAt", "<=", to)
    .select([sql<number>`count(*)::int`.as("total"), sql<number>`count(distinct position_id)::int`.as("positions")])
    .executeTakeFirstOrThrow();
  const byBoard = await db
    .selectFrom("inspections")
    .innerJoin("positions", "positions.id", "inspections.positionId")
    .innerJoin("boards", "boards.id", "positions.boardId")
    .select(["boards.name as board", sql<number>`count(*)::int`.as("count")])
    .where("inspections.siteId", "=", siteId)
    .where("inspections.inspectedAt", ">", from)
    .where("inspections.inspectedAt", "<=", to)
    .groupBy("boards.name")
    .orderBy("boards.name")
    .execute();
  return { total: totals.total, positions: totals.positions, byBoard };
}

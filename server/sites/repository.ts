import type { ExpressionBuilder } from "kysely";
import type { Database } from "../../db/types";
import type { Db } from "../db";
import type { Role } from "../../src/domain/vocab";

const siteCols = [
  "sites.id",
  "sites.name",
  "sites.kind",
  "sites.location",
  "sites.description",
  "sites.timeZone",
  "sites.currency",
] as const;

export const listSitesForUser = (db: Db, userId: string) =>
  db
    .selectFrom("sites")
    .innerJoin("memberships", "memberships.siteId", "sites.id")
    .select([...siteCols, "memberships.role"])
    .where("memberships.userId", "=", userId)
    .orderBy("sites.name")
    .execute();

export const listMembershipsOfUser = (db: Db, userId: string) =>
  db
    .selectFrom("memberships")
    .innerJoin("sites", "sites.id", "memberships.siteId")
    .select(["memberships.siteId", "sites.name as siteName", "memberships.role"])
    .where("memberships.userId", "=", userId)
    .orderBy("sites.name")
    .execute();

/** The distinct time zones of the sites a person is a member of. */
export const timeZonesOfUser = async (db: Db, userId: string) =>
  (
    await db
      .selectFrom("memberships")
      .innerJoin("sites", "sites.id", "memberships.siteId")
      .select("sites.timeZone")
      .distinct()
      .where("memberships.userId", "=", userId)
      .orderBy("sites.timeZone")
      .execute()
  ).map((r) => r.timeZone);

/** Every membership of the instance with its site's name, by site name (the instance admin's list of accounts). */
export const listAllMemberships = (db: Db) =>
  db
    .selectFrom("memberships")
    .innerJoin("sites", "sites.id", "memberships.siteId")
    .select(["memberships.userId", "memberships.siteId", "sites.name as siteName", "memberships.role"])
    .orderBy("sites.name")
    .execute();

export const listAllSites = (db: Db) => db.selectFrom("sites").select(siteCols).orderBy("sites.name").execute();

export const findSite = (db: Db, siteId: string) =>
  db.selectFrom("sites").select(siteCols).where("id", "=", siteId).executeTakeFirst();

export const insertSite = (
  db: Db,
  s: { name: string; kind: "vessel" | "building" | "plant"; location: string; description: string; timeZone?: string },
) => db.insertInto("sites").values(s).returning(siteCols).executeTakeFirstOrThrow();

export const listMembers = (db: Db, siteId: string) =>
  db
    .selectFrom("memberships")
    .innerJoin("users", "users.id", "memberships.userId")
    .select([
      "users.id as userId",
      "users.email",
      "users.name",
      "memberships.role",
      (eb) => eb("users.suspendedAt", "is not", null).as("suspended"),
    ])
    .where("memberships.siteId", "=", siteId)
    .orderBy("users.name")
    .execute();

export const insertMembership = (db: Db, siteId: string, userId: string, role: Role) =>
  db.insertInto("memberships").values({ siteId, userId, role }).execute();

export const updateMembershipRole = (db: Db, siteId: string, userId: string, role: Role) =>
  db.updateTable("memberships").set({ role }).where("siteId", "=", siteId).where("userId", "=", userId).execute();

/**
 * A subquery for a statement over `users`: that person's role on each site they are a member of, as a JSON
 * object `{ siteId: role }` (null for no site). The sessions' read selects it beside the session, so the route
 * guard knows the caller's standing without a statement of its own (see `standingOn` in reads.ts).
 */
export const memberRolesOf = (eb: ExpressionBuilder<Database, "users">) =>
  eb
    .selectFrom("memberships")
    .select((m) =>
      m.fn<Record<string, Role> | null>("json_object_agg", ["memberships.siteId", "memberships.role"]).as("roles"),
    )
    .whereRef("memberships.userId", "=", "users.id");

export const findMembership = (db: Db, siteId: string, userId: string) =>
  db
    .selectFrom("memberships")
    .select(["role"])
    .where("siteId", "=", siteId)
    .where("userId", "=", userId)
    .executeTakeFirst();

/**
 * Locks the site's row for the rest of the transaction: every change of the site's crew
 * takes this lock first, so two of them (two curators demoting each other) run one after
 * the other and the second sees the first's result. false when the site does not exist.
 */
export const lockSite = async (db: Db, siteId: string) =>
  !!(await db.selectFrom("sites").select("id").where("id", "=", siteId).forUpdate().executeTakeFirst());

export const deleteMembership = (db: Db, siteId: string, userId: string) =>
  db.deleteFrom("memberships").where("siteId", "=", siteId).where("userId", "=", userId).executeTakeFirst();

export const countCurators = async (db: Db, siteId: string) =>
  (
    await db
      .selectFrom("memberships")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .where("siteId", "=", siteId)
      .where("role", "=", "curator")
      .executeTakeFirstOrThrow()
  ).n;

export const setTimeZone = (db: Db, siteId: string, timeZone: string) =>
  db.updateTable("sites").set({ timeZone }).where("id", "=", siteId).returning(siteCols).executeTakeFirst();

export const setCurrency = (db: Db, siteId: string, currency: string) =>
  db.updateTable("sites").set({ currency }).where("id", "=", siteId).returning(siteCols).executeTakeFirst();

/** The site's row, locked until the transaction ends (a setting's before-image, read then changed). */
export const findSiteForUpdate = (trx: Db, siteId: string) =>
  trx.selectFrom("sites").selectAll().where("id", "=", siteId).forUpdate().executeTakeFirst();

/** The site's name (invitation e-mails, report titles); throws when the site is gone. */
export const siteName = async (db: Db, siteId: string) =>
  (await db.selectFrom("sites").select("name").where("id", "=", siteId).executeTakeFirstOrThrow()).name;

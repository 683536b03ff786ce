/**
 * Kysely queries of the return-to-service domain. Only this file writes the rts_* tables;
 * it reads the inventory's boards, sections, positions and components and the register's
 * defects (read-only) to know what a stage covers and what blocks it.
 */
import { sql, type Insertable, type Updateable } from "kysely";
import type { Database } from "../../db/types";
import type { EvidenceItem } from "../../src/schemas/return-to-service";
import type { Db } from "../db";
import { currentComponentOfP } from "../inventory/current-component-reads";

type T = Database;

// ---- reads of other domains' tables (never written here) ----
export const findBoard = (db: Db, siteId: string, boardId: string) =>
  db
    .selectFrom("boards")
    .select(["id", "name", "nominalVolts", "siteId"])
    .where("siteId", "=", siteId)
    .where("id", "=", boardId)
    .executeTakeFirst();

export const listBoards = (db: Db, siteId: string) =>
  db.selectFrom("boards").select(["id", "name"]).where("siteId", "=", siteId).orderBy("name").execute();

export const listSections = (db: Db, boardId: string) =>
  db
    .selectFrom("sections")
    .select(["id", "name"])
    .where("boardId", "=", boardId)
    .orderBy("sortOrder")
    .orderBy("name")
    .execute();

/** Every position of the board with its current (not retired) component (read by key, never the site's). */
export const listPositions = (db: Db, boardId: string) =>
  db
    .selectFrom("positions as p")
    .leftJoinLateral(
      () => currentComponentOfP(["c.id", "c.kind", "c.year"]),
      (j) => j.onTrue(),
    )
    .select([
      "p.id",
      "p.designation",
      "p.circuit",
      "p.sectionId",
      "p.kind",
      "p.sortOrder",
      "c.id as componentId",
      "c.kind as componentKind",
      "c.year",
    ])
    .where("p.boardId", "=", boardId)
    .orderBy("p.gridRow")
    .orderBy("p.gridCol")
    .execute();

/** Defects still being worked (not closed, not accepted as is) on these positions. */
export const openDefectsOn = (db: Db, siteId: string, positionIds: string[]) =>
  positionIds.length
    ? db
        .selectFrom("defects as d")
        .leftJoin("positions as p", "p.id", "d.positionId")
        .select([
          "d.id",
          "d.ref",
          "d.title",
          "d.positionId",
          "p.designation",
          "d.safetyCritical",
          "d.blocksEnergisation",
        ])
        .where("d.siteId", "=", siteId)
        .where("d.positionId", "in", positionIds)
        .where("d.status", "not in", ["closed", "accepted_as_is"])
        .orderBy("d.ref")
        .execute()
    : Promise.resolve([]);

export const memberRole = (db: Db, siteId: string, userId: string) =>
  db
    .selectFrom("memberships")
    .select("role")
    .where("siteId", "=", siteId)
    .where("userId", "=", userId)
    .executeTakeFirst();

export const userName = async (db: Db, userId: string) =>
  (await db.selectFrom("users").select("name").where("id", "=", userId).executeTakeFirst())?.name ?? "Unknown";

export const listCrew = (db: Db, siteId: string) =>
  db
    .selectFrom("memberships as m")
    .innerJoin("users as u", "u.id", "m.userId")
    .leftJoin("rtsQualifiedPersons as q", (j) =>
      j.onRef("q.userId", "=", "m.userId").onRef("q.siteId", "=", "m.siteId"),
    )
    .select([
      "u.id as userId",
      "u.name",
      "u.email",
      "m.role",
      "q.qualification",
      "q.expiresOn",
      "q.version",
      "u.suspendedAt",
    ])
    .where("m.siteId", "=", siteId)
    .orderBy("u.name")
    .execute();

// ---- settings and qualified persons ----
export const getSettings = (db: Db, siteId: string) =>
  db.selectFrom("rtsSettings").selectAll().where("siteId", "=", siteId).executeTakeFirst();
export const insertSettings = (db: Db, v: Insertable<T["rtsSettings"]>) =>
  db
    .insertInto("rtsSettings")
    .values(v)
    .onConflict((oc) => oc.column("siteId").doNothing())
    .returningAll()
    .executeTakeFirst();
export const updateSettings = (db: Db, siteId: string, version: number, v: Updateable<T["rtsSettings"]>) =>
  db
    .updateTable("rtsSettings")
    .set({ ...v, version: sql`version + 1`, updatedAt: sql`now()` })
    .where("siteId", "=", siteId)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();

export const listQualified = (db: Db, siteId: string) =>
  db
    .selectFrom("rtsQualifiedPersons as q")
    .innerJoin("users as u", "u.id", "q.userId")
    .innerJoin("memberships as m", (j) => j.onRef("m.userId", "=", "q.userId").onRef("m.siteId", "=", "q.siteId"))
    .select(["q.userId", "u.name", "q.qualification", "q.expiresOn", "q.version", "u.suspendedAt"])
    .where("q.siteId", "=", siteId)
    .orderBy("u.name")
    .execute();
export const getQualified = (db: Db, siteId: string, userId: string) =>
  db
    .selectFrom("rtsQualifiedPersons")
    .selectAll()
    .where("siteId", "=", siteId)
    .where("userId", "=", userId)
    .executeTakeFirst();
export const insertQualified = (db: Db, v: Insertable<T["rtsQualifiedPersons"]>) =>
  db
    .insertInto("rtsQualifiedPersons")
    .values(v)
    .onConflict((oc) => oc.columns(["siteId", "userId"]).doNothing())
    .returningAll()
    .executeTakeFirst();
export const updateQualified = (
  db: Db,
  siteId: string,
  userId: string,
  version: number,
  v: Updateable<T["rtsQualifiedPersons"]>,
) =>
  db
    .updateTable("rtsQualifiedPersons")
    .set({ ...v, version: sql`version + 1`, updatedAt: sql`now()` })
    .where("siteId", "=", siteId)
    .where("userId", "=", userId)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();
export const deleteQualified = (db: Db, siteId: string, userId: string) =>
  db.deleteFrom("rtsQualifiedPersons").where("siteId", "=", siteId).where("userId", "=", userId).executeTakeFirst();

// ---- stages, items, steps ----
export const listStages = (db: Db, boardId: string) =>
  db
    .selectFrom("rtsStages")
    .selectAll()
    .where("boardId", "=", boardId)
    .orderBy("sortOrder")
    .orderBy("createdAt")
    .execute();
/** The boards of the site that have a return-to-service plan (at least one stage). */
export const listPlannedBoardIds = async (db: Db, siteId: string) =>
  (
    await db
      .selectFrom("rtsStages")
      .select("boardId")
      .distinct()
      .where("siteId", "=", siteId)
      .orderBy("boardId")
      .execute()
  ).map((r) => r.boardId);
export const findStage = (db: Db, siteId: string, stageId: string) =>
  db.selectFrom("rtsStages").selectAll().where("siteId", "=", siteId).where("id", "=", stageId).executeTakeFirst();
export const lockStage = (db: Db, siteId: string, stageId: string) =>
  db
    .selectFrom("rtsStages")
    .selectAll()
    .where("siteId", "=", siteId)
    .where("id", "=", stageId)
    .forUpdate()
    .executeTakeFirst();
export const insertStage = (db: Db, v: Insertable<T["rtsStages"]>) =>
  db.insertInto("rtsStages").values(v).returningAll().executeTakeFirstOrThrow();
export const updateStage = (db: Db, id: string, version: number, v: Updateable<T["rtsStages"]>) =>
  db
    .updateTable("rtsStages")
    .set({ ...v, version: sql`version + 1`, updatedAt: sql`now()` })
    .where("id", "=", id)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();
/** Writes the order without touching versions (a reorder is not an edit of each stage). */
export async function setStageOrder(db: Db, ids: string[]) {
  for (const [i, id] of ids.entries())
    await db
      .updateTable("rtsStages")
      .set({ sortOrder: i + 1 })
      .where("id", "=", id)
      .execute();
}
export const deleteStage = (db: Db, id: string) => db.deleteFrom("rtsStages").where("id", "=", id).execute();
export const maxStageOrder = async (db: Db, boardId: string) =>
  Number(
    (
      await db
        .selectFrom("rtsStages")
        .select((eb) => eb.fn.max("sortOrder").as("m"))
        .where("boardId", "=", boardId)
        .executeTakeFirst()
    )?.m ?? 0,
  );

export const listItems = (db: Db, stageIds: string[]) =>
  stageIds.length
    ? db.selectFrom("rtsStageItems").selectAll().where("stageId", "in", stageIds).execute()
    : Promise.resolve([]);
export const replaceItems = async (
  db: Db,
  siteId: string,
  stageId: string,
  sectionIds: string[],
  positionIds: string[],
) => {
  await db.deleteFrom("rtsStageItems").where("stageId", "=", stageId).execute();
  const rows = [
    ...sectionIds.map((sectionId) => ({ siteId, stageId, sectionId, positionId: null })),
    ...positionIds.map((positionId) => ({ siteId, stageId, sectionId: null, positionId })),
  ];
  if (rows.length) await db.insertInto("rtsStageItems").values(rows).execute();
};

export const listSteps = (db: Db, stageIds: string[]) =>
  stageIds.length
    ? db
        .selectFrom("rtsSteps")
        .selectAll()
        .where("stageId", "in", stageIds)
        .orderBy("stageId")
        .orderBy("sortOrder")
        .execute()
    : Promise.resolve([]);
export const findStep = (db: Db, siteId: string, stepId: string) =>
  db.selectFrom("rtsSteps").selectAll().where("siteId", "=", siteId).where("id", "=", stepId).executeTakeFirst();
export const insertSteps = (db: Db, rows: Insertable<T["rtsSteps"]>[]) =>
  rows.length ? db.insertInto("rtsSteps").values(rows).execute() : Promise.resolve([]);
export const updateStep = (db: Db, id: string, version: number, v: Updateable<T["rtsSteps"]>) =>
  db
    .updateTable("rtsSteps")
    .set({ ...v, version: sql`version + 1`, updatedAt: sql`now()` })
    .where("id", "=", id)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();
export async function setStepOrder(db: Db, ids: string[]) {
  for (const [i, id] of ids.entries())
    await db
      .updateTable("rtsSteps")
      .set({ sortOrder: i + 1 })
      .where("id", "=", id)
      .execute();
}
export const deleteStep = (db: Db, id: string) => db.deleteFrom("rtsSteps").where("id", "=", id).execute();

// ---- sign-offs (append-only) ----
export const listSignoffs = (db: Db, stageIds: string[]) =>
  stageIds.length
    ? db
        .selectFrom("rtsSignoffs")
        .selectAll()
        .where("stageId", "in", stageIds)
        .orderBy("signedAt")
        .orderBy("id")
        .execute()
    : Promise.resolve([]);
export const findSignoff = (db: Db, siteId: string, id: string) =>
  db.selectFrom("rtsSignoffs").selectAll().where("siteId", "=", siteId).where("id", "=", id).executeTakeFirst();
export const stepHasSignoffs = async (db: Db, stepId: string) =>
  !!(await db.selectFrom("rtsSignoffs").select("id").where("stepId", "=", stepId).limit(1).executeTakeFirst());
export const stageHasSignoffs = async (db: Db, stageId: string) =>
  !!(await db.selectFrom("rtsSignoffs").select("id").where("stageId", "=", stageId).limit(1).executeTakeFirst());
export const insertSignoff = (db: Db, v: Insertable<T["rtsSignoffs"]>) =>
  db.insertInto("rtsSignoffs").values(v).returningAll().executeTakeFirstOrThrow();

// ---- the log ----
export const insertEnergisation = (db: Db, v: Insertable<T["rtsEnergisations"]>) =>
  db.insertInto("rtsEnergisations").values(v).returningAll().executeTakeFirstOrThrow();
export const insertWatchCheck = (db: Db, v: Insertable<T["rtsWatchChecks"]>) =>
  db.insertInto("rtsWatchChecks").values(v).returningAll().executeTakeFirstOrThrow();
export const insertIncident = (db: Db, v: Insertable<T["rtsIncidents"]>) =>
  db.insertInto("rtsIncidents").values(v).returningAll().executeTakeFirstOrThrow();
export const insertOperation = (db: Db, v: Insertable<T["rtsBreakerOperations"]>) =>
  db.insertInto("rtsBreakerOperations").values(v).returningAll().executeTakeFirstOrThrow();

export const listEnergisations = (db: Db, boardId: string) =>
  db
    .selectFrom("rtsEnergisations as e")
    .innerJoin("rtsStages as s", "s.id", "e.stageId")
    .leftJoin("users as u", "u.id", "e.recordedBy")
    .selectAll("e")
    .select(["u.name as byName", "s.name as stageName"])
    .where("e.boardId", "=", boardId)
    .orderBy("e.at")
    .execute();
export const listWatchChecks = (db: Db, boardId: string) =>
  db
    .selectFrom("rtsWatchChecks as e")
    .innerJoin("rtsStages as s", "s.id", "e.stageId")
    .leftJoin("users as u", "u.id", "e.recordedBy")
    .leftJoin("positions as p", "p.id", "e.thermalPositionId")
    .selectAll("e")
    .select(["u.name as byName", "s.name as stageName", "p.designation as thermalDesignation"])
    .where("s.boardId", "=", boardId)
    .orderBy("e.at")
    .execute();
export const listIncidents = (db: Db, boardId: string) =>
  db
    .selectFrom("rtsIncidents as e")
    .innerJoin("rtsStages as s", "s.id", "e.stageId")
    .leftJoin("users as u", "u.id", "e.recordedBy")
    .leftJoin("defects as d", "d.id", "e.defectId")
    .selectAll("e")
    .select(["u.name as byName", "s.name as stageName", "d.ref as defectRef"])
    .where("s.boardId", "=", boardId)
    .orderBy("e.at")
    .execute();
export const listOperations = (db: Db, boardId: string) =>
  db
    .selectFrom("rtsBreakerOperations as o")
    .innerJoin("components as c", "c.id", "o.componentId")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .leftJoin("users as u", "u.id", "o.operatedBy")
    .leftJoin("rtsStages as s", "s.id", "o.stageId")
    .selectAll("o")
    .select(["u.name as byName", "s.name as stageName", "p.designation"])
    .where("o.boardId", "=", boardId)
    .orderBy("o.at")
    .execute();
export const listBudgets = (db: Db, siteId: string) =>
  db.selectFrom("rtsOperationBudgets").selectAll().where("siteId", "=", siteId).execute();
export const getBudget = (db: Db, componentId: string) =>
  db.selectFrom("rtsOperationBudgets").selectAll().where("componentId", "=", componentId).executeTakeFirst();
export const insertBudget = (db: Db, v: Insertable<T["rtsOperationBudgets"]>) =>
  db
    .insertInto("rtsOperationBudgets")
    .values(v)
    .onConflict((oc) => oc.column("componentId").doNothing())
    .returningAll()
    .executeTakeFirst();
export const updateBudget = (db: Db, componentId: string, version: number, v: Updateable<T["rtsOperationBudgets"]>) =>
  db
    .updateTable("rtsOperationBudgets")
    .set({ ...v, version: sql`version + 1`, updatedAt: sql`now()` })
    .where("componentId", "=", componentId)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();
export const findComponent = (db: Db, siteId: string, componentId: string) =>
  db
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .select(["c.id", "c.kind", "c.year", "c.positionId", "p.boardId", "p.designation"])
    .where("c.siteId", "=", siteId)
    .where("c.id", "=", componentId)
    .executeTakeFirst();

// ---- overdue notices ----
/** Energised stages across every site (the overdue sweep). */
export const energisedStages = (db: Db) =>
  db
    .selectFrom("rtsStages as s")
    .innerJoin("boards as b", "b.id", "s.boardId")
    .innerJoin("sites as t", "t.id", "s.siteId")
    .select([
      "s.id",
      "s.siteId",
      "s.boardId",
      "s.name",
      "s.attempt",
      "s.energisedAt",
      "s.watchHours",
      "s.checkEveryHours",
      "s.qualifiedPersonId",
      "b.name as boardName",
      "t.name as siteName",
      "t.timeZone as siteTimeZone",
    ])
    .where("s.status", "=", "energised")
    .execute();
export const checkTimes = async (db: Db, stageId: string, attempt: number) =>
  (
    await db
      .selectFrom("rtsWatchChecks")
      .select("at")
      .where("stageId", "=", stageId)
      .where("attempt", "=", attempt)
      .execute()
  ).map((r) => r.at);
/** Claims the notice for this due time; false when one was already recorded (idempotence). */
export const claimNotice = async (db: Db, v: Insertable<T["rtsOverdueNotices"]>) =>
  !!(await db
    .insertInto("rtsOverdueNotices")
    .values(v)
    .onConflict((oc) => oc.columns(["stageId", "attempt", "dueAt"]).doNothing())
    .returning("id")
    .executeTakeFirst());
export const setNoticeOutcome = (
  db: Db,
  stageId: string,
  attempt: number,
  dueAt: Date,
  outcome: T["rtsOverdueNotices"]["outcome"] extends infer O ? O : never,
  error: string | null,
) =>
  db
    .updateTable("rtsOverdueNotices")
    .set({ outcome, error })
    .where("stageId", "=", stageId)
    .where("attempt", "=", attempt)
    .where("dueAt", "=", dueAt)
    .execute();

/** Whether a sign-off's evidence (a reading, photo, defect or watch check) exists on this site. */
export async function evidenceOnSite(db: Db, siteId: string, type: EvidenceItem["type"], id: string) {
  const table = {
    insulation_reading: "insulationReadings",
    thermal_scan: "thermalScans",
    ground_check: "groundLampChecks",
    photo: "photos",
    defect: "defects",
    watch_check: "rtsWatchChecks",
  } as const;
  const row = await db
    .selectFrom(table[type])
    .select("id")
    .where("siteId", "=", siteId)
    .where("id", "=", id)
    .executeTakeFirst();
  return !!row;
}

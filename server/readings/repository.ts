import { sql, type Insertable } from "kysely";
import type {
  ComponentReadingOverridesTable,
  ContactReadingsTable,
  GroundHuntStepsTable,
  GroundLampChecksTable,
  InsulationReadingsTable,
  StepVoltageTestsTable,
  ThermalScansTable,
  TripTestsTable,
} from "../../db/types";
import type { Db } from "../db";
import { currentComponentOfP } from "../inventory/current-component-reads";

export const findBoard = (db: Db, siteId: string, boardId: string) =>
  db
    .selectFrom("boards")
    .select(["id", "name", "nominalVolts"])
    .where("siteId", "=", siteId)
    .where("id", "=", boardId)
    .executeTakeFirst();

/** A component with its home position and board: where its readings are filed. */
export const findComponent = (db: Db, siteId: string, componentId: string) =>
  db
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .select([
      "c.id",
      "c.kind",
      "c.voltageRating",
      "p.id as positionId",
      "p.designation",
      "p.circuit",
      "b.id as boardId",
      "b.name as boardName",
      "b.nominalVolts",
    ])
    .where("c.siteId", "=", siteId)
    .where("c.id", "=", componentId)
    .executeTakeFirst();

/**
 * The site's boards with how many positions each has: what the readings' first page lists. The positions
 * themselves come with one board's readings (`boardTargets`): a site of 200,000 positions sent whole was
 * megabytes to a phone to count them.
 */
export const listTargets = (db: Db, siteId: string) =>
  db
    .selectFrom("boards as b")
    .select(["b.id", "b.name", "b.nominalVolts"])
    .select((eb) =>
      eb
        .selectFrom("positions as p")
        .whereRef("p.boardId", "=", "b.id")
        .select(eb.fn.countAll<string>().as("n"))
        .as("positionCount"),
    )
    .where("b.siteId", "=", siteId)
    .orderBy("b.name")
    .execute();

/** One board's positions, each with its current component (read by key, never a join of the site's components). */
export const boardTargets = (db: Db, boardId: string) =>
  db
    .selectFrom("positions as p")
    .leftJoinLateral(
      () => currentComponentOfP(["c.id"]),
      (j) => j.onTrue(),
    )
    .select(["p.id as positionId", "p.designation", "p.circuit", "p.kind", "c.id as componentId"])
    .where("p.boardId", "=", boardId)
    .orderBy("p.sortOrder")
    .orderBy("p.designation")
    .execute();

export const site = (db: Db, siteId: string) =>
  db.selectFrom("sites").select(["id", "kind"]).where("id", "=", siteId).executeTakeFirstOrThrow();

// ---- criteria and manufacturer's values ---------------------------------------------------
export const getCriteria = (db: Db, siteId: string) =>
  db.selectFrom("readingCriteria").selectAll().where("siteId", "=", siteId).executeTakeFirst();

export const insertCriteria = (db: Db, row: { siteId: string; updatedBy: string } & Record<string, unknown>) =>
  db
    .insertInto("readingCriteria")
    .values(row as never)
    .returningAll()
    .executeTakeFirstOrThrow();

export const updateCriteria = (db: Db, siteId: string, version: number, patch: Record<string, unknown>) =>
  db
    .updateTable("readingCriteria")
    .set((eb) => ({ ...patch, version: eb("version", "+", 1), updatedAt: new Date() }))
    .where("siteId", "=", siteId)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();

export const listOverrides = (db: Db, siteId: string, componentIds: string[]) =>
  componentIds.length === 0
    ? Promise.resolve([])
    : db
        .selectFrom("componentReadingOverrides")
        .selectAll()
        .where("siteId", "=", siteId)
        .where("componentId", "in", componentIds)
        .execute();

export const getOverride = (db: Db, siteId: string, componentId: string) =>
  db
    .selectFrom("componentReadingOverrides")
    .selectAll()
    .where("siteId", "=", siteId)
    .where("componentId", "=", componentId)
    .executeTakeFirst();

export const insertOverride = (db: Db, row: Insertable<ComponentReadingOverridesTable>) =>
  db.insertInto("componentReadingOverrides").values(row).returningAll().executeTakeFirstOrThrow();

export const updateOverride = (
  db: Db,
  id: string,
  version: number,
  patch: Partial<Insertable<ComponentReadingOverridesTable>>,
) =>
  db
    .updateTable("componentReadingOverrides")
    .set((eb) => ({ ...patch, version: eb("version", "+", 1), updatedAt: new Date() }))
    .where("id", "=", id)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();

export const deleteOverride = (db: Db, siteId: string, componentId: string) =>
  db
    .deleteFrom("componentReadingOverrides")
    .where("siteId", "=", siteId)
    .where("componentId", "=", componentId)
    .executeTakeFirst();

// ---- readings ---------------------------------------------------------------------------
export interface ReadingFilter {
  siteId: string;
  boardId?: string;
  componentId?: string;
  circuit?: string;
  /** Only readings on a circuit named by hand (no component): one such circuit's series. */
  handNamed?: boolean;
  /** Only the newest this many of each series and conductor pair (phase comparisons and trends). */
  latestPer?: number;
  /**
   * With `latestPer`: the newest of each series and pair taken at or before each of these moments, together (the hold
   * points of return to service judge a stage's circuits as they stood when it was energised).
   */
  latestAsOf?: Date[];
  limit?: number;
}

export const insertInsulation = (db: Db, row: Insertable<InsulationReadingsTable>) =>
  db.insertInto("insulationReadings").values(row).returning("id").executeTakeFirstOrThrow();
export const insertContact = (db: Db, row: Insertable<ContactReadingsTable>) =>
  db.insertInto("contactReadings").values(row).returning("id").executeTakeFirstOrThrow();
export const insertThermal = (db: Db, row: Insertable<ThermalScansTable>) =>
  db.insertInto("thermalScans").values(row).returning("id").executeTakeFirstOrThrow();
export const insertGroundCheck = (db: Db, row: Insertable<GroundLampChecksTable>) =>
  db.insertInto("groundLampChecks").values(row).returning("id").executeTakeFirstOrThrow();

export async function listInsulation(db: Db, f: ReadingFilter & { id?: string }) {
  let q = db
    .selectFrom("insulationReadings as r")
    .innerJoin("boards as b", "b.id", "r.boardId")
    .leftJoin("components as c", "c.id", "r.componentId")
    .leftJoin("positions as p", "p.id", "c.positionId")
    .leftJoin("users as u", "u.id", "r.recordedBy")
    .selectAll("r")
    .select(["p.designation", "u.name as recordedByName", "c.voltageRating", "b.nominalVolts"])
    .where("r.siteId", "=", f.siteId);
  if (f.id) q = q.where("r.id", "=", f.id);
  if (f.boardId) q = q.where("r.boardId", "=", f.boardId);
  if (f.componentId) q = q.where("r.componentId", "=", f.componentId);
  if (f.circuit) q = q.where("r.circuit", "=", f.circuit);
  if (f.handNamed) q = q.where("r.componentId", "is", null);
  if (f.latestPer) {
    // Each reading ranked within its series and pair as of each moment (one moment, "infinity", when none is given).
    const moments = f.latestAsOf ? f.latestAsOf.map((d) => d.toISOString()) : ["infinity"];
    const ranked = db
      .selectFrom("insulationReadings as w")
      .innerJoin(sql<{ at: Date }>`(select unnest(${moments}::timestamptz[]) as at)`.as("t"), (j) =>
        j.onRef("w.measuredAt", "<=", "t.at"),
      )
      .select([
        "w.id",
        sql<number>`row_number() over (partition by t.at, w.component_id, case when w.component_id is null then w.circuit end, w.conductors order by w.measured_at desc, w.created_at desc)`.as(
          "n",
        ),
      ])
      .where("w.siteId", "=", f.siteId)
      .$if(!!f.boardId, (w) => w.where("w.boardId", "=", f.boardId!))
      .$if(!!f.componentId, (w) => w.where("w.componentId", "=", f.componentId!));
    const ids = db.selectFrom(ranked.as("ranked")).select("ranked.id").where("ranked.n", "<=", f.latestPer);
    // `= any(array(…))`: the ids are gathered once and fetched by key. As `in (…)` the plan rested on the table's
    // statistics; right after a day's readings arrived they said "one row" and the window was re-sorted for every
    // reading (1.7 s for a board of 2,560 instead of 0.02).
    q = q.where(sql<boolean>`r.id = any(array${ids})`);
  }
  return q
    .orderBy("r.measuredAt", "desc")
    .orderBy("r.createdAt", "desc")
    .limit(f.limit ?? 500)
    .execute();
}

export async function listContacts(db: Db, f: ReadingFilter & { id?: string }) {
  let q = db
    .selectFrom("contactReadings as r")
    .innerJoin("components as c", "c.id", "r.componentId")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .leftJoin("users as u", "u.id", "r.recordedBy")
    .selectAll("r")
    .select(["p.designation", "u.name as recordedByName"])
    .where("r.siteId", "=", f.siteId);
  if (f.id) q = q.where("r.id", "=", f.id);
  if (f.boardId) q = q.where("r.boardId", "=", f.boardId);
  if (f.componentId) q = q.where("r.componentId", "=", f.componentId);
  return q
    .orderBy("r.measuredAt", "desc")
    .orderBy("r.createdAt", "desc")
    .limit(f.limit ?? 500)
    .execute();
}

export async function listThermal(db: Db, f: ReadingFilter & { id?: string }) {
  let q = db
    .selectFrom("thermalScans as r")
    .innerJoin("components as c", "c.id", "r.componentId")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .leftJoin("users as u", "u.id", "r.recordedBy")
    .selectAll("r")
    .select(["p.designation", "u.name as recordedByName"])
    .where("r.siteId", "=", f.siteId);
  if (f.id) q = q.where("r.id", "=", f.id);
  if (f.boardId) q = q.where("r.boardId", "=", f.boardId);
  if (f.componentId) q = q.where("r.componentId", "=", f.componentId);
  return q
    .orderBy("r.measuredAt", "desc")
    .orderBy("r.createdAt", "desc")
    .limit(f.limit ?? 500)
    .execute();
}

export async function listGroundChecks(db: Db, f: ReadingFilter & { id?: string }) {
  let q = db
    .selectFrom("groundLampChecks as r")
    .innerJoin("boards as b", "b.id", "r.boardId")
    .leftJoin("users as u", "u.id", "r.recordedBy")
    .selectAll("r")
    .select(["u.name as recordedByName", "b.frequencyHz"])
    .where("r.siteId", "=", f.siteId);
  if (f.id) q = q.where("r.id", "=", f.id);
  if (f.boardId) q = q.where("r.boardId", "=", f.boardId);
  return q
    .orderBy("r.measuredAt", "desc")
    .orderBy("r.createdAt", "desc")
    .limit(f.limit ?? 500)
    .execute();
}

export const photoOnSite = (db: Db, siteId: string, photoId: string) =>
  db
    .selectFrom("photos")
    .select(["id", "kind"])
    .where("siteId", "=", siteId)
    .where("id", "=", photoId)
    .where("deletedAt", "is", null)
    .executeTakeFirst();

export const insertTripTest = (db: Db, row: Insertable<TripTestsTable>) =>
  db.insertInto("tripTests").values(row).returning("id").executeTakeFirstOrThrow();
export const insertStepTest = (db: Db, row: Insertable<StepVoltageTestsTable>) =>
  db.insertInto("stepVoltageTests").values(row).returning("id").executeTakeFirstOrThrow();
export const insertHuntStep = (db: Db, row: Insertable<GroundHuntStepsTable>) =>
  db.insertInto("groundHuntSteps").values(row).returning("id").executeTakeFirstOrThrow();

export async function listTripTests(db: Db, f: ReadingFilter & { id?: string }) {
  let q = db
    .selectFrom("tripTests as r")
    .innerJoin("components as c", "c.id", "r.componentId")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .leftJoin("users as u", "u.id", "r.recordedBy")
    .selectAll("r")
    .select(["p.designation", "u.name as recordedByName"])
    .where("r.siteId", "=", f.siteId);
  if (f.id) q = q.where("r.id", "=", f.id);
  if (f.boardId) q = q.where("r.boardId", "=", f.boardId);
  if (f.componentId) q = q.where("r.componentId", "=", f.componentId);
  return q
    .orderBy("r.measuredAt", "desc")
    .orderBy("r.createdAt", "desc")
    .limit(f.limit ?? 500)
    .execute();
}

export async function listStepTests(db: Db, f: ReadingFilter & { id?: string }) {
  let q = db
    .selectFrom("stepVoltageTests as r")
    .leftJoin("components as c", "c.id", "r.componentId")
    .leftJoin("positions as p", "p.id", "c.positionId")
    .leftJoin("users as u", "u.id", "r.recordedBy")
    .selectAll("r")
    .select(["p.designation", "u.name as recordedByName"])
    .where("r.siteId", "=", f.siteId);
  if (f.id) q = q.where("r.id", "=", f.id);
  if (f.boardId) q = q.where("r.boardId", "=", f.boardId);
  if (f.componentId) q = q.where("r.componentId", "=", f.componentId);
  return q
    .orderBy("r.measuredAt", "desc")
    .orderBy("r.createdAt", "desc")
    .limit(f.limit ?? 500)
    .execute();
}

export async function listHuntSteps(db: Db, f: ReadingFilter & { id?: string }) {
  let q = db
    .selectFrom("groundHuntSteps as r")
    .leftJoin("users as u", "u.id", "r.recordedBy")
    .selectAll("r")
    .select(["u.name as recordedByName"])
    .where("r.siteId", "=", f.siteId);
  if (f.id) q = q.where("r.id", "=", f.id);
  if (f.boardId) q = q.where("r.boardId", "=", f.boardId);
  // The newest steps when there are more than the limit (the oldest hunts go first), returned in time order.
  const rows = await q
    .orderBy("r.measuredAt", "desc")
    .orderBy("r.createdAt", "desc")
    .limit(f.limit ?? 1000)
    .execute();
  return rows.reverse();
}

export const findPosition = (db: Db, siteId: string, positionId: string) =>
  db
    .selectFrom("positions")
    .select(["id", "boardId", "designation"])
    .where("siteId", "=", siteId)
    .where("id", "=", positionId)
    .executeTakeFirst();

/**
 * How many readings of each kind the board (or the component) has in all: its page lists the newest
 * of each kind and says so when there are more. Ground-lamp checks belong to a board, not a component.
 */
export async function readingTotals(db: Db, siteId: string, where: { boardId: string } | { componentId: string }) {
  const on = "boardId" in where ? sql`board_id = ${where.boardId}` : sql`component_id = ${where.componentId}`;
  const count = (table: string) =>
    sql<number>`(select count(*)::int from ${sql.table(table)} where site_id = ${siteId} and ${on})`;
  const { rows } = await sql<{
    insulation: number;
    contacts: number;
    thermal: number;
    groundChecks: number;
    tripTests: number;
    stepTests: number;
  }>`select ${count("insulation_readings")} as insulation, ${count("contact_readings")} as contacts,
      ${count("thermal_scans")} as thermal,
      ${"boardId" in where ? count("ground_lamp_checks") : sql<number>`0`} as ground_checks,
      ${count("trip_tests")} as trip_tests, ${count("step_voltage_tests")} as step_tests`.execute(db);
  return rows[0];
}

/**
 * The board's insulation series over every reading, newest first: one per component, else one per
 * circuit named by hand. Each with its count, its newest reading's time and circuit, and the conductor
 * pairs measured (a dry-out chart draws one series and one pair at a time).
 */
export const insulationSeries = (db: Db, siteId: string, boardId: string) =>
  db
    .selectFrom("insulationReadings as r")
    .leftJoin("components as c", "c.id", "r.componentId")
    .leftJoin("positions as p", "p.id", "c.positionId")
    .where("r.siteId", "=", siteId)
    .where("r.boardId", "=", boardId)
    .groupBy(["r.componentId", sql`case when r.component_id is null then r.circuit end`, "p.designation"])
    .select([
      "r.componentId",
      "p.designation",
      sql<string>`(array_agg(r.circuit order by r.measured_at desc, r.created_at desc))[1]`.as("circuit"),
      sql<string[]>`array_agg(distinct r.conductors order by r.conductors)`.as("conductors"),
      sql<number>`count(*)::int`.as("count"),
      sql<Date>`max(r.measured_at)`.as("latestAt"),
    ])
    .orderBy(sql`max(r.measured_at)`, "desc")
    .execute();

/** Components on the board with a reading of any kind, in board order (the page's "per component" links). */
export const componentsWithReadings = (db: Db, siteId: string, boardId: string) =>
  db
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .select(["c.id as componentId", "p.designation"])
    .where((eb) =>
      eb(
        "c.id",
        "in",
        eb
          .selectFrom("insulationReadings")
          .select("componentId")
          .where("siteId", "=", siteId)
          .where("boardId", "=", boardId)
          .union((u) =>
            u
              .selectFrom("contactReadings")
              .select("componentId")
              .where("siteId", "=", siteId)
              .where("boardId", "=", boardId),
          )
          .union((u) =>
            u
              .selectFrom("thermalScans")
              .select("componentId")
              .where("siteId", "=", siteId)
              .where("boardId", "=", boardId),
          )
          .union((u) =>
            u.selectFrom("tripTests").select("componentId").where("siteId", "=", siteId).where("boardId", "=", boardId),
          )
          .union((u) =>
            u
              .selectFrom("stepVoltageTests")
              .select("componentId")
              .where("siteId", "=", siteId)
              .where("boardId", "=", boardId),
          ),
      ),
    )
    .orderBy("p.sortOrder")
    .orderBy("p.designation")
    .execute();

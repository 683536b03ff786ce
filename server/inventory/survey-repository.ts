import { sql, type Insertable } from "kysely";
import type { CustodyMovesTable, DispositionDecisionsTable, InspectionsTable } from "../../db/types";
import type { Db } from "../db";

/**
 * The newest inspection of the current component aliased `c` in the query that joins it (as `li`): newest by when it
 * was made, then by when it was recorded. For `.leftJoinLateral(() => newestInspection(db, [...]), (j) => j.onTrue())`
 * — the one definition the board's tiles, its thumbnail and the CSV export read (`board_summaries`' refresh writes
 * the same in SQL, with the id as a last tie-break).
 */
export const newestInspection = <C extends `i.${keyof InspectionsTable & string}`>(db: Db, cols: readonly C[]) =>
  db
    .selectFrom("inspections as i")
    .select(cols)
    .where("i.componentId", "=", sql.ref<string>("c.id"))
    .orderBy("i.inspectedAt", "desc")
    .orderBy("i.createdAt", "desc")
    .limit(1)
    .as("li");

/**
 * Locks these components of the site in id order (one order for every writer that takes several), FOR NO KEY
 * UPDATE as `findOwned` does (owned-repository.ts).
 */
export const lockComponents = (db: Db, siteId: string, ids: readonly string[]) =>
  ids.length
    ? db
        .selectFrom("components")
        .select("id")
        .where("siteId", "=", siteId)
        .where("id", "in", [...ids])
        .orderBy("id")
        .forNoKeyUpdate()
        .execute()
    : Promise.resolve([]);

export const latestInspection = (db: Db, componentId: string) =>
  db
    .selectFrom("inspections")
    .selectAll()
    .where("componentId", "=", componentId)
    .orderBy("inspectedAt", "desc")
    .orderBy("createdAt", "desc")
    .limit(1)
    .executeTakeFirst();

const inspectionCols = [
  "i.id",
  "i.componentId",
  "i.positionId",
  "i.inspectorId",
  "u.name as inspectorName",
  "i.inspectedAt",
  "i.percentRusted",
  "i.astmGrade",
  "i.isoRi",
  "i.belowWaterLine",
  "i.contaminants",
  "i.mechanism",
  "i.insulation",
  "i.notes",
  "i.createdAt",
] as const;

export const inspectionsOfPosition = (db: Db, positionId: string) =>
  db
    .selectFrom("inspections as i")
    .leftJoin("users as u", "u.id", "i.inspectorId")
    .select(inspectionCols)
    .where("i.positionId", "=", positionId)
    .orderBy("i.inspectedAt", "desc")
    .orderBy("i.createdAt", "desc")
    .execute();

export const insertInspection = async (db: Db, v: Insertable<InspectionsTable>) => {
  const { id } = await db.insertInto("inspections").values(v).returning("id").executeTakeFirstOrThrow();
  return db
    .selectFrom("inspections as i")
    .leftJoin("users as u", "u.id", "i.inspectorId")
    .select(inspectionCols)
    .where("i.id", "=", id)
    .executeTakeFirstOrThrow();
};

const moveCols = [
  "m.id",
  "m.componentId",
  "m.fromState",
  "m.toState",
  "m.location",
  "m.note",
  "m.movedBy",
  "u.name as movedByName",
  "m.movedAt",
  "m.madeAt",
  "m.releasedRules",
  "m.releaseReason",
] as const;

/** Tags of the form T-0042 on the site, highest number first (for the next generated tag). */
export const highestGeneratedTag = (db: Db, siteId: string) =>
  db
    .selectFrom("components")
    .select(sql<number | null>`max(substring(tag_number from ${TAG_PATTERN})::int)`.as("n"))
    .where("siteId", "=", siteId)
    .where("tagNumber", "~", TAG_PATTERN)
    .executeTakeFirst();
const TAG_PATTERN = "^T-(\\d{1,9})$";

export const movesOfComponent = (db: Db, componentId: string) =>
  db
    .selectFrom("custodyMoves as m")
    .leftJoin("users as u", "u.id", "m.movedBy")
    .select(moveCols)
    .where("m.componentId", "=", componentId)
    .orderBy("m.movedAt", "desc")
    .execute();

export const insertMove = async (db: Db, v: Insertable<CustodyMovesTable>) => {
  const { id } = await db.insertInto("custodyMoves").values(v).returning("id").executeTakeFirstOrThrow();
  return db
    .selectFrom("custodyMoves as m")
    .leftJoin("users as u", "u.id", "m.movedBy")
    .select(moveCols)
    .where("m.id", "=", id)
    .executeTakeFirstOrThrow();
};

const decisionCols = [
  "d.id",
  "d.componentId",
  "d.disposition",
  "d.recommended",
  "d.overridden",
  "d.reason",
  "d.decidedBy",
  "u.name as decidedByName",
  "d.decidedAt",
] as const;

export const decisionsOfComponent = (db: Db, componentId: string) =>
  db
    .selectFrom("dispositionDecisions as d")
    .leftJoin("users as u", "u.id", "d.decidedBy")
    .select(decisionCols)
    .where("d.componentId", "=", componentId)
    .orderBy("d.decidedAt", "desc")
    .execute();

export const insertDecision = async (db: Db, v: Insertable<DispositionDecisionsTable>) => {
  const { id } = await db.insertInto("dispositionDecisions").values(v).returning("id").executeTakeFirstOrThrow();
  return db
    .selectFrom("dispositionDecisions as d")
    .leftJoin("users as u", "u.id", "d.decidedBy")
    .select(decisionCols)
    .where("d.id", "=", id)
    .executeTakeFirstOrThrow();
};

/** The position's history: every audit row naming it, newest first, with the actor's name. */
export const historyOfPosition = (db: Db, positionId: string) =>
  db
    .selectFrom("auditLog as a")
    .leftJoin("users as u", "u.id", "a.actorId")
    .select([
      "a.id",
      "a.entityType",
      "a.entityId",
      "a.action",
      "a.actorId",
      "u.name as actorName",
      "a.at",
      "a.before",
      "a.after",
    ])
    .where("a.positionId", "=", positionId)
    .orderBy("a.at", "desc")
    .orderBy("a.id", "desc")
    .limit(500)
    .execute();

export const positionCounts = (db: Db, positionId: string) =>
  db
    .selectNoFrom((eb) => [
      eb
        .selectFrom("photos")
        .where("positionId", "=", positionId)
        .where("deletedAt", "is", null)
        .select(eb.fn.countAll<number>().as("n"))
        .as("photoCount"),
      eb
        .selectFrom("defects")
        .where("positionId", "=", positionId)
        .where("status", "not in", ["closed", "accepted_as_is"])
        .select(eb.fn.countAll<number>().as("n"))
        .as("openDefectCount"),
    ])
    .executeTakeFirstOrThrow();

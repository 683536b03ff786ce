import { sql } from "kysely";
import type { Insertable, UpdateObject } from "kysely";
import type { Database } from "../../db/types";
import type { Db } from "../db";
import { currentComponentOfP } from "../inventory/current-component-reads";
import { rankOrderSql, registerBase, ROW_SELECTION, type RegisterRow } from "./list-repository";

export const findRow = async (db: Db, siteId: string, id: string) =>
  (await registerBase(db, siteId).select(ROW_SELECTION).where("d.id", "=", id).executeTakeFirst()) as
    RegisterRow | undefined;

/**
 * Locks the defect row for the rest of the transaction (serialises concurrent moves). FOR NO KEY UPDATE, the
 * lock an UPDATE of it takes anyway: another writer's row that names this defect (a wanted-list link, a status
 * change, a reading link) checks its foreign key without waiting for this lock, so a writer that holds the
 * site's demand lock never waits for one that holds a defect and waits for the demand lock (DEVELOPERS.md,
 * "Lock order of the wanted list's writers").
 */
export const lockDefect = (db: Db, siteId: string, id: string) =>
  db
    .selectFrom("defects")
    .selectAll()
    .where("siteId", "=", siteId)
    .where("id", "=", id)
    .forNoKeyUpdate()
    .executeTakeFirst();

/**
 * Locks, in id order (one order for every writer that takes several), these defects of the site and those
 * on these positions or of these components (FOR NO KEY UPDATE, as `lockDefect`).
 */
export const lockDefects = (
  db: Db,
  siteId: string,
  of: { ids?: readonly string[]; componentIds?: readonly string[]; positionIds?: readonly string[] },
) => {
  const ids = [...(of.ids ?? [])];
  const componentIds = [...(of.componentIds ?? [])];
  const positionIds = [...(of.positionIds ?? [])];
  if (!ids.length && !componentIds.length && !positionIds.length) return Promise.resolve([]);
  return db
    .selectFrom("defects")
    .select("id")
    .where("siteId", "=", siteId)
    .where((eb) =>
      eb.or([
        ...(ids.length ? [eb("id", "in", ids)] : []),
        ...(componentIds.length ? [eb("componentId", "in", componentIds)] : []),
        ...(positionIds.length ? [eb("positionId", "in", positionIds)] : []),
      ]),
    )
    .orderBy("id")
    .forNoKeyUpdate()
    .execute();
};

export const insertDefect = (db: Db, v: Insertable<Database["defects"]>) =>
  db.insertInto("defects").values(v).returning("id").executeTakeFirstOrThrow();

/** Writes a patch and bumps the version; nothing is written unless `version` is current. */
export const updateDefect = (db: Db, id: string, version: number, patch: UpdateObject<Database, "defects">) =>
  db
    .updateTable("defects")
    .set({ ...patch, version: sql`version + 1`, updatedAt: sql`now()` })
    .where("id", "=", id)
    .where("version", "=", version)
    .returning("id")
    .executeTakeFirst();

export const insertStatusChange = (db: Db, v: Insertable<Database["defectStatusChanges"]>) =>
  db.insertInto("defectStatusChanges").values(v).execute();

/** The defects linked to these components, with what their priority score is made of. */
export const defectsOfComponents = (db: Db, siteId: string, componentIds: string[]) =>
  db
    .selectFrom("defects as d")
    .innerJoin("components as c", "c.id", "d.componentId")
    .where("d.siteId", "=", siteId)
    .where("d.componentId", "in", componentIds)
    .select([
      "d.id",
      "d.severity",
      "d.safetyCritical",
      "d.blocksEnergisation",
      "d.effortHours",
      "d.partsState",
      "d.priorityScore",
      "c.heritage",
    ])
    .execute();

/** The derived score only: not an edit by anyone, so the version stays (a save recomputes it anyway). */
export const setPriorityScore = (db: Db, id: string, score: number) =>
  db.updateTable("defects").set({ priorityScore: score }).where("id", "=", id).execute();

/** Heritage of the linked component (priority's "original fabric" term). */
export const componentHeritage = async (db: Db, siteId: string, componentId: string | null) =>
  componentId
    ? ((
        await db
          .selectFrom("components")
          .select("heritage")
          .where("siteId", "=", siteId)
          .where("id", "=", componentId)
          .executeTakeFirst()
      )?.heritage ?? null)
    : null;

export const findPosition = (db: Db, siteId: string, id: string) =>
  db
    .selectFrom("positions as p")
    .leftJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .select(["p.id", "p.boardId", "p.sectionId", "c.id as componentId"])
    .where("p.siteId", "=", siteId)
    .where("p.id", "=", id)
    .executeTakeFirst();

export const findComponent = (db: Db, siteId: string, id: string) =>
  db
    .selectFrom("components")
    .select(["id", "positionId"])
    .where("siteId", "=", siteId)
    .where("id", "=", id)
    .executeTakeFirst();
export const findInspection = (db: Db, siteId: string, id: string) =>
  db
    .selectFrom("inspections")
    .select(["id", "positionId", "componentId"])
    .where("siteId", "=", siteId)
    .where("id", "=", id)
    .executeTakeFirst();
export const findBoard = (db: Db, siteId: string, id: string) =>
  db.selectFrom("boards").select("id").where("siteId", "=", siteId).where("id", "=", id).executeTakeFirst();
export const findSection = (db: Db, siteId: string, id: string) =>
  db
    .selectFrom("sections")
    .select(["id", "boardId"])
    .where("siteId", "=", siteId)
    .where("id", "=", id)
    .executeTakeFirst();

export const memberRole = async (db: Db, siteId: string, userId: string) =>
  (
    await db
      .selectFrom("memberships")
      .select("role")
      .where("siteId", "=", siteId)
      .where("userId", "=", userId)
      .executeTakeFirst()
  )?.role ?? null;

export const listCrew = (db: Db, siteId: string) =>
  db
    .selectFrom("memberships as m")
    .innerJoin("users as u", "u.id", "m.userId")
    .select(["u.id", "u.name", "m.role"])
    .where("m.siteId", "=", siteId)
    .orderBy("u.name")
    .execute();

export const boardName = (db: Db, siteId: string, boardId: string) =>
  db.selectFrom("boards").select("name").where("siteId", "=", siteId).where("id", "=", boardId).executeTakeFirst();

export const listBoards = (db: Db, siteId: string) =>
  db.selectFrom("boards").select(["id", "name"]).where("siteId", "=", siteId).orderBy("name").execute();
export const listSections = (db: Db, siteId: string) =>
  db
    .selectFrom("sections")
    .select(["id", "boardId", "name"])
    .where("siteId", "=", siteId)
    .orderBy("boardId")
    .orderBy("sortOrder")
    .execute();
export const listPositions = (db: Db, siteId: string, boardId: string) =>
  db
    .selectFrom("positions as p")
    .leftJoinLateral(
      () => currentComponentOfP(["c.id"]),
      (j) => j.onTrue(),
    )
    .select(["p.id", "p.designation", "p.sectionId", "c.id as componentId"])
    .where("p.siteId", "=", siteId)
    .where("p.boardId", "=", boardId)
    .orderBy("p.sortOrder")
    .orderBy("p.designation")
    .limit(3600) // the most a board holds: a grid of at most 60 × 60 (src/schemas/inventory.ts)
    .execute();

export const pinsOf = (db: Db, siteId: string, defectId: string) =>
  db
    .selectFrom("defectPins as pn")
    .leftJoin("users as ua", "ua.id", "pn.pinnedBy")
    .leftJoin("users as ub", "ub.id", "pn.removedBy")
    .leftJoin("defects as t", "t.id", "pn.relativeTo")
    .select([
      "pn.id",
      "pn.direction",
      "pn.relativeTo",
      "t.ref as relativeRef",
      "pn.reason",
      "pn.pinnedBy",
      "ua.name as pinnedByName",
      "pn.pinnedAt",
      "pn.removedAt",
      "ub.name as removedByName",
      "pn.removedReason",
    ])
    .where("pn.siteId", "=", siteId)
    .where("pn.defectId", "=", defectId)
    .orderBy("pn.pinnedAt", "desc")
    .execute();

export const activePin = (db: Db, defectId: string) =>
  db
    .selectFrom("defectPins")
    .selectAll()
    .where("defectId", "=", defectId)
    .where("removedAt", "is", null)
    .executeTakeFirst();
export const isPinTarget = async (db: Db, defectId: string) =>
  !!(await db
    .selectFrom("defectPins")
    .select("id")
    .where("relativeTo", "=", defectId)
    .where("removedAt", "is", null)
    .executeTakeFirst());

export const statusHistory = (db: Db, defectId: string) =>
  db
    .selectFrom("defectStatusChanges as h")
    .leftJoin("users as u", "u.id", "h.actorId")
    .select(["h.id", "h.fromStatus", "h.toStatus", "h.reason", "u.name as actorName", "h.at"])
    .where("h.defectId", "=", defectId)
    .orderBy("h.at", "desc")
    .orderBy("h.id", "desc")
    .execute();

export const auditOf = (db: Db, siteId: string, defectId: string) =>
  db
    .selectFrom("auditLog as l")
    .leftJoin("users as u", "u.id", "l.actorId")
    .select(["l.id", "l.action", "u.name as actorName", "l.at", "l.after"])
    .where("l.siteId", "=", siteId)
    .where("l.entityType", "=", "defect")
    .where("l.entityId", "=", defectId)
    .orderBy("l.at", "desc")
    .orderBy("l.id", "desc")
    .limit(100)
    .execute();

export const userNames = async (db: Db, ids: Array<string | null>) => {
  const list = ids.filter((x): x is string => !!x);
  if (!list.length) return new Map<string, string>();
  const rows = await db.selectFrom("users").select(["id", "name"]).where("id", "in", list).execute();
  return new Map(rows.map((r) => [r.id, r.name]));
};

export const photoCount = async (db: Db, defectId: string) =>
  Number(
    (
      await db
        .selectFrom("photos")
        .select((eb) => eb.fn.countAll<number>().as("n"))
        .where("defectId", "=", defectId)
        .where("deletedAt", "is", null)
        .executeTakeFirstOrThrow()
    ).n,
  );

/** 1-based place of a defect in the site's ranked order (with pins), as the register shows it. */
export async function rankOf(db: Db, siteId: string, defectId: string) {
  const r = await sql<{ place: number }>`
    WITH placed AS (
      SELECT d.id, row_number() over (order by ${rankOrderSql(false)}) AS place
      FROM defects d LEFT JOIN defect_pins pin ON pin.defect_id = d.id AND pin.removed_at IS NULL
      LEFT JOIN defects t ON t.id = pin.relative_to
      WHERE d.site_id = ${siteId})
    SELECT place FROM placed WHERE id = ${defectId}`.execute(db);
  return r.rows[0] ? Number(r.rows[0].place) : null;
}

export const listViews = (db: Db, siteId: string, userId: string) =>
  db
    .selectFrom("defectViews")
    .select(["id", "name", "query", "version", "updatedAt"])
    .where("siteId", "=", siteId)
    .where("userId", "=", userId)
    .orderBy("name")
    .execute();

/** Where a survey finding sits, for the prefilled "raise a defect" form. */
export async function findingContext(
  db: Db,
  siteId: string,
  q: { positionId?: string; componentId?: string; inspectionId?: string },
) {
  let positionId = q.positionId ?? null;
  let componentId = q.componentId ?? null;
  if (q.inspectionId) {
    const i = await findInspection(db, siteId, q.inspectionId);
    if (i) {
      positionId ??= i.positionId;
      componentId ??= i.componentId;
    }
  }
  if (!positionId && componentId) positionId = (await findComponent(db, siteId, componentId))?.positionId ?? null;
  if (!positionId) return null;
  const p = await db
    .selectFrom("positions")
    .select(["id", "boardId", "sectionId", "designation"])
    .where("siteId", "=", siteId)
    .where("id", "=", positionId)
    .executeTakeFirst();
  if (!p) return null;
  componentId ??= (await findPosition(db, siteId, p.id))?.componentId ?? null;
  return {
    boardId: p.boardId,
    sectionId: p.sectionId,
    positionId: p.id,
    designation: p.designation,
    componentId,
    inspectionId: q.inspectionId ?? null,
  };
}

/** Ends a pin (replaced, or unpinned with a reason). */
export const removePin = (trx: Db, pinId: string, removedBy: string, removedReason: string) =>
  trx
    .updateTable("defectPins")
    .set({ removedAt: sql`now()`, removedBy, removedReason })
    .where("id", "=", pinId)
    .execute();

export const insertPin = (trx: Db, v: Insertable<Database["defectPins"]>) =>
  trx.insertInto("defectPins").values(v).returning("id").executeTakeFirstOrThrow();

/** A change beside the defect's own row (its pin): a new version, so open edits see it. */
export const bumpDefectVersion = (trx: Db, id: string) =>
  trx
    .updateTable("defects")
    .set({ updatedAt: sql`now()`, version: sql`version + 1` })
    .where("id", "=", id)
    .execute();

const VIEW_COLUMNS = ["id", "name", "query", "version", "updatedAt"] as const;

export const insertView = (trx: Db, v: { siteId: string; userId: string; name: string; query: string }) =>
  trx.insertInto("defectViews").values(v).returning(VIEW_COLUMNS).executeTakeFirstOrThrow();

/** One person's own view on the site; undefined when there is none. */
export const updateViewRow = (
  trx: Db,
  siteId: string,
  userId: string,
  id: string,
  b: { name: string; query: string },
) =>
  trx
    .updateTable("defectViews")
    .set({ name: b.name, query: b.query, version: sql`version + 1`, updatedAt: sql`now()` })
    .where("id", "=", id)
    .where("siteId", "=", siteId)
    .where("userId", "=", userId)
    .returning(VIEW_COLUMNS)
    .executeTakeFirst();

export const deleteViewRow = (trx: Db, siteId: string, userId: string, id: string) =>
  trx
    .deleteFrom("defectViews")
    .where("id", "=", id)
    .where("siteId", "=", siteId)
    .where("userId", "=", userId)
    .executeTakeFirst();

/** The readings linked to a defect, oldest link first. */
export const readingLinksOf = (db: Db, defectId: string) =>
  db
    .selectFrom("defectReadings")
    .select(["id", "readingKind", "readingId", "role", "linkedAt"])
    .where("defectId", "=", defectId)
    .orderBy("linkedAt")
    .execute();

/** The defect's "after work" photos still kept. */
export const afterWorkPhotoCount = async (db: Db, siteId: string, defectId: string) =>
  Number(
    (
      await db
        .selectFrom("photos")
        .select(sql<number>`count(*)::int`.as("n"))
        .where("siteId", "=", siteId)
        .where("defectId", "=", defectId)
        .where("kind", "=", "after_work")
        .where("deletedAt", "is", null)
        .executeTakeFirstOrThrow()
    ).n,
  );

/** Links a reading (a repeated link changes only its role). */
export const upsertReadingLink = (trx: Db, v: Insertable<Database["defectReadings"]>) =>
  trx
    .insertInto("defectReadings")
    .values(v)
    .onConflict((oc) => oc.columns(["defectId", "readingKind", "readingId"]).doUpdateSet({ role: v.role }))
    .returning("id")
    .executeTakeFirstOrThrow();

/** For the readings screens: the defects each reading of a board raised or proves. */
export const defectsOfBoardReadings = (db: Db, siteId: string, boardId: string) =>
  db
    .selectFrom("defectReadings as l")
    .innerJoin("defects as d", "d.id", "l.defectId")
    .select(["l.readingKind", "l.readingId", "l.role", "d.id as defectId", "d.ref", "d.status", "d.title"])
    .where("l.siteId", "=", siteId)
    .where("d.boardId", "=", boardId)
    .execute();

/**
 * The site's active defects, each with its place in the ranked order among them (row_number over the register's
 * rank keys; a pin counts only when its target is active too, as rankDefects ignores a pin to a defect outside
 * the list). Narrow rows: the window sorts ids and keys, never the register's whole rows.
 */
const rankedActive = (siteId: string, active: readonly string[]) => sql`
  SELECT d.id, d.board_id, d.section_id, d.effort_hours, d.cost_estimate,
         row_number() over (order by ${rankOrderSql(false)}) AS place
  FROM defects d
  LEFT JOIN defect_pins pin ON pin.defect_id = d.id AND pin.removed_at IS NULL
  LEFT JOIN defects t ON t.id = pin.relative_to AND t.status IN (${sql.join(active)})
  WHERE d.site_id = ${siteId} AND d.status IN (${sql.join(active)})`;

/** Per board and section: how many active defects, their effort and cost, and the best place among them. */
export async function planTotals(db: Db, siteId: string, active: readonly string[]) {
  const r = await sql<{
    boardId: string;
    boardName: string;
    sectionId: string | null;
    sectionName: string | null;
    n: string;
    effort: string | null;
    unestimated: string;
    cost: string | null;
    firstPlace: string;
  }>`
    SELECT r.board_id AS "boardId", b.name AS "boardName", r.section_id AS "sectionId", s.name AS "sectionName",
           count(*) AS n, sum(r.effort_hours) AS effort, count(*) FILTER (WHERE r.effort_hours IS NULL) AS unestimated,
           sum(r.cost_estimate) AS cost, min(r.place) AS "firstPlace"
    FROM (${rankedActive(siteId, active)}) r
    JOIN boards b ON b.id = r.board_id
    LEFT JOIN sections s ON s.id = r.section_id
    GROUP BY r.board_id, b.name, r.section_id, s.name
    ORDER BY min(r.place)`.execute(db);
  return r.rows;
}

/** The places of one board's active defects in the site's ranked order. */
export async function planPlacesOnBoard(db: Db, siteId: string, boardId: string, active: readonly string[]) {
  const r = await sql<{ id: string; place: string }>`
    SELECT r.id, r.place FROM (${rankedActive(siteId, active)}) r WHERE r.board_id = ${boardId}`.execute(db);
  return new Map(r.rows.map((x) => [x.id, Number(x.place)]));
}

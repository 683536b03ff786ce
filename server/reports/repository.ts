/** The reports' reads (this domain writes no table). */
import { sql } from "kysely";
import type { DefectStatus, PhotoKind } from "../../src/domain/vocab";
import type { LabelsQuery } from "../../src/schemas/reports";
import type { Db } from "../db";

export const boardOnSite = async (db: Db, siteId: string, boardId: string) =>
  !!(await db
    .selectFrom("boards")
    .select("id")
    .where("siteId", "=", siteId)
    .where("id", "=", boardId)
    .executeTakeFirst());

export const sectionOnSite = async (db: Db, siteId: string, sectionId: string) =>
  !!(await db
    .selectFrom("sections")
    .select("id")
    .where("siteId", "=", siteId)
    .where("id", "=", sectionId)
    .executeTakeFirst());

/** Current components at the chosen positions (tagged or not), in board, section and position order. */
export const labelRows = (db: Db, siteId: string, q: LabelsQuery) =>
  db
    .selectFrom("positions as p")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .innerJoin("sites as st", "st.id", "p.siteId")
    .leftJoin("sections as s", "s.id", "p.sectionId")
    .innerJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .select(["c.tagNumber", "b.name as boardName", "p.designation", "c.kind", "st.name as siteName"])
    .where("p.siteId", "=", siteId)
    .$if(!!q.boardId, (w) => w.where("p.boardId", "=", q.boardId!))
    .$if(!!q.sectionId, (w) => w.where("p.sectionId", "=", q.sectionId!))
    .$if(!!q.positionIds?.length, (w) => w.where("p.id", "in", q.positionIds!))
    .orderBy("b.name")
    .orderBy(sql`coalesce(s.sort_order, 1000000)`)
    .orderBy("p.sortOrder")
    .orderBy("p.designation")
    .execute();

// ── the condition survey report (server/reports/survey-data.ts) ──

/** The report's optional date range: calendar days, inclusive, as the site counts them (`zone`, its IANA time zone). */
type DateRange = { from?: string; to?: string; zone: string };

export const siteForReport = (db: Db, siteId: string) =>
  db
    .selectFrom("sites")
    .select(["id", "name", "kind", "location", "description", "timeZone"])
    .where("id", "=", siteId)
    .executeTakeFirstOrThrow();

export const boardsForReport = (db: Db, siteId: string, boardId?: string) => {
  let bq = db.selectFrom("boards").selectAll().where("siteId", "=", siteId).orderBy("name");
  if (boardId) bq = bq.where("id", "=", boardId);
  return bq.execute();
};

export const latestFlood = (db: Db, siteId: string) =>
  db
    .selectFrom("floodEvents")
    .selectAll()
    .where("siteId", "=", siteId)
    .orderBy("occurredOn", "desc")
    .orderBy("createdAt", "desc")
    .limit(1)
    .executeTakeFirst();

export const surveyorsOf = (db: Db, boardIds: string[], q: DateRange) =>
  db
    .selectFrom("inspections as i")
    .innerJoin("positions as p", "p.id", "i.positionId")
    .leftJoin("users as u", "u.id", "i.inspectorId")
    .select([
      sql<string>`coalesce(u.name, 'Unknown')`.as("name"),
      sql<number>`count(*)::int`.as("n"),
      sql<Date>`min(i.inspected_at)`.as("first"),
      sql<Date>`max(i.inspected_at)`.as("last"),
    ])
    .where("p.boardId", "in", boardIds)
    .$if(!!q.from, (w) => w.where(sql`(i.inspected_at at time zone ${q.zone})::date`, ">=", q.from!))
    .$if(!!q.to, (w) => w.where(sql`(i.inspected_at at time zone ${q.zone})::date`, "<=", q.to!))
    .groupBy("u.name")
    .orderBy(sql`count(*)`, "desc")
    .execute();

export const sectionsOfBoard = (db: Db, boardId: string) =>
  db
    .selectFrom("sections")
    .select(["id", "name", "sortOrder"])
    .where("boardId", "=", boardId)
    .orderBy("sortOrder")
    .orderBy("name")
    .execute();

export const positionsOfBoard = (db: Db, boardId: string) =>
  db
    .selectFrom("positions")
    .select([
      "id",
      "designation",
      "kind",
      "circuit",
      "sectionId",
      "gridRow",
      "gridCol",
      "rowSpan",
      "colSpan",
      "sortOrder",
    ])
    .where("boardId", "=", boardId)
    .orderBy("sortOrder")
    .orderBy("gridRow")
    .orderBy("gridCol")
    .execute();

export const componentsOfBoard = (db: Db, boardId: string) =>
  db
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .leftJoin("users as u", "u.id", "c.dispositionBy")
    .selectAll("c")
    .select("u.name as decidedByName")
    .where("p.boardId", "=", boardId)
    .where("c.retiredAt", "is", null)
    .execute();

export const latestInspectionsOfBoard = (db: Db, boardId: string, q: DateRange) =>
  db
    .selectFrom("inspections as i")
    .innerJoin("positions as p", "p.id", "i.positionId")
    .leftJoin("users as u", "u.id", "i.inspectorId")
    .innerJoin("components as c", (j) => j.onRef("c.id", "=", "i.componentId").on("c.retiredAt", "is", null))
    .select([
      "i.positionId",
      "i.inspectedAt",
      "u.name as inspectorName",
      "i.percentRusted",
      "i.astmGrade",
      "i.isoRi",
      "i.belowWaterLine",
      "i.contaminants",
      "i.mechanism",
      "i.insulation",
      "i.notes",
    ])
    .distinctOn("i.positionId")
    .where("p.boardId", "=", boardId)
    .$if(!!q.from, (w) => w.where(sql`(i.inspected_at at time zone ${q.zone})::date`, ">=", q.from!))
    .$if(!!q.to, (w) => w.where(sql`(i.inspected_at at time zone ${q.zone})::date`, "<=", q.to!))
    .orderBy("i.positionId")
    .orderBy("i.inspectedAt", "desc")
    .orderBy("i.createdAt", "desc")
    .execute();

export const reportPhotosOfBoard = (db: Db, boardId: string, kinds: PhotoKind[]) =>
  db
    .selectFrom("photos as ph")
    .innerJoin("positions as p", "p.id", "ph.positionId")
    .select([
      "ph.id",
      "ph.positionId",
      "ph.kind",
      "ph.displayKey",
      "ph.caption",
      sql<Date>`coalesce(ph.captured_at, ph.created_at)`.as("takenAt"),
    ])
    .where("p.boardId", "=", boardId)
    .where("ph.deletedAt", "is", null)
    .where("ph.kind", "in", kinds)
    .orderBy(sql`coalesce(ph.captured_at, ph.created_at)`, "desc")
    .execute();

export const defectsOfBoard = (db: Db, siteId: string, boardId: string, finished: DefectStatus[]) =>
  db
    .selectFrom("defects as d")
    .leftJoin("positions as p", "p.id", "d.positionId")
    .leftJoin("users as u", "u.id", "d.assigneeId")
    .select([
      "d.ref",
      "d.title",
      "p.designation",
      "d.category",
      "d.severity",
      "d.status",
      "d.safetyCritical",
      "d.blocksEnergisation",
      "u.name as assigneeName",
      "d.dueOn",
      "d.priorityScore",
    ])
    .where("d.siteId", "=", siteId)
    .where("d.boardId", "=", boardId)
    .orderBy(sql`case when d.status in (${sql.join(finished.map((x) => sql.lit(x)))}) then 1 else 0 end`)
    .orderBy("d.priorityScore", "desc")
    .orderBy("d.ref")
    .execute();

import { sql, type Insertable } from "kysely";
import type { ComponentsTable, PositionsTable } from "../../db/types";
import type { Db } from "../db";

/**
 * The whole board elevation in one query: each position with its current component, the
 * component's newest inspection (lateral join) and photo / open-defect counts (subqueries).
 */
export const boardTiles = (db: Db, boardId: string) =>
  db
    .selectFrom("positions as p")
    .leftJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .leftJoinLateral(
      (eb) =>
        eb
          .selectFrom("inspections as i")
          .select(["i.astmGrade", "i.isoRi", "i.percentRusted", "i.inspectedAt", "i.belowWaterLine"])
          .whereRef("i.componentId", "=", "c.id")
          .orderBy("i.inspectedAt", "desc")
          .orderBy("i.createdAt", "desc")
          .limit(1)
          .as("li"),
      (j) => j.onTrue(),
    )
    .select([
      "p.id",
      "p.designation",
      "p.kind",
      "p.gridRow",
      "p.gridCol",
      "p.rowSpan",
      "p.colSpan",
      "p.circuit",
      "p.sectionId",
      "p.sortOrder",
      "p.version",
      "c.id as cId",
      "c.kind as cKind",
      "c.tagNumber",
      "c.heritage",
      "c.custody",
      "c.disposition",
      "c.dispositionOverridden",
      "c.maker",
      "c.model",
      "c.ratingAmps",
      "c.poles",
      "c.version as cVersion",
      "li.astmGrade",
      "li.isoRi",
      "li.percentRusted",
      "li.inspectedAt",
      "li.belowWaterLine",
    ])
    .select((eb) => [
      eb
        .selectFrom("photos as ph")
        .whereRef("ph.positionId", "=", "p.id")
        .where("ph.deletedAt", "is", null)
        .select(eb.fn.countAll<number>().as("n"))
        .as("photoCount"),
      eb
        .selectFrom("defects as d")
        .whereRef("d.positionId", "=", "p.id")
        .where("d.status", "not in", ["closed", "accepted_as_is"])
        .select(eb.fn.countAll<number>().as("n"))
        .as("openDefectCount"),
    ])
    .where("p.boardId", "=", boardId)
    .orderBy("p.gridRow")
    .orderBy("p.gridCol")
    .orderBy("p.sortOrder")
    .execute();

export type TileQueryRow = Awaited<ReturnType<typeof boardTiles>>[number];

export function toTile(r: TileQueryRow) {
  return {
    id: r.id,
    designation: r.designation,
    kind: r.kind,
    gridRow: r.gridRow,
    gridCol: r.gridCol,
    rowSpan: r.rowSpan,
    colSpan: r.colSpan,
    circuit: r.circuit,
    sectionId: r.sectionId,
    sortOrder: r.sortOrder,
    version: r.version,
    component: r.cId
      ? {
          id: r.cId,
          kind: r.cKind!,
          tagNumber: r.tagNumber,
          heritage: r.heritage!,
          custody: r.custody!,
          disposition: r.disposition,
          dispositionOverridden: r.dispositionOverridden!,
          maker: r.maker!,
          model: r.model!,
          ratingAmps: r.ratingAmps,
          poles: r.poles,
          version: r.cVersion!,
        }
      : null,
    latest: r.inspectedAt
      ? {
          astmGrade: r.astmGrade,
          isoRi: r.isoRi,
          percentRusted: r.percentRusted,
          inspectedAt: r.inspectedAt,
          belowWaterLine: r.belowWaterLine,
        }
      : null,
    photoCount: Number(r.photoCount ?? 0),
    openDefectCount: Number(r.openDefectCount ?? 0),
  };
}

export const insertPositions = (db: Db, rows: Insertable<PositionsTable>[]) =>
  db.insertInto("positions").values(rows).returningAll().execute();
export const insertComponents = (db: Db, rows: Insertable<ComponentsTable>[]) =>
  db.insertInto("components").values(rows).returningAll().execute();

export const designationsTaken = async (db: Db, boardId: string, designations: string[]) =>
  designations.length === 0
    ? []
    : (
        await db
          .selectFrom("positions")
          .select("designation")
          .where("boardId", "=", boardId)
          .where(
            sql<string>`lower(designation)`,
            "in",
            designations.map((d) => d.toLowerCase()),
          )
          .execute()
      ).map((r) => r.designation);

export const boardPositions = (db: Db, boardId: string) =>
  db
    .selectFrom("positions")
    .selectAll()
    .where("boardId", "=", boardId)
    .orderBy("sortOrder")
    .orderBy("gridRow")
    .orderBy("gridCol")
    .execute();

export const setSortOrder = (db: Db, id: string, sortOrder: number) =>
  db
    .updateTable("positions")
    .set({ sortOrder, version: sql`version + 1`, updatedAt: new Date() })
    .where("id", "=", id)
    .execute();

export const deletePosition = (db: Db, id: string) => db.deleteFrom("positions").where("id", "=", id).execute();

export const currentComponent = (db: Db, positionId: string) =>
  db
    .selectFrom("components")
    .selectAll()
    .where("positionId", "=", positionId)
    .where("retiredAt", "is", null)
    .executeTakeFirst();

const likeEscape = (s: string) => s.replace(/[\\%_]/g, (m) => `\\${m}`);

/** Designation or tag number contains q (case-insensitive); exact matches first, then prefixes. */
export const lookup = (db: Db, siteId: string, q: string) => {
  const lower = q.toLowerCase();
  const contains = `%${likeEscape(lower)}%`;
  const prefix = `${likeEscape(lower)}%`;
  return db
    .selectFrom("positions as p")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .leftJoin("sections as s", "s.id", "p.sectionId")
    .leftJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .select([
      "p.id as positionId",
      "p.designation",
      "p.kind",
      "p.circuit",
      "b.id as boardId",
      "b.name as boardName",
      "s.name as sectionName",
      "c.id as componentId",
      "c.version as componentVersion",
      "c.tagNumber",
      "c.custody",
    ])
    .select(
      sql<number>`case when lower(p.designation) = ${lower} or lower(c.tag_number) = ${lower} then 0
      when lower(p.designation) like ${prefix} or lower(c.tag_number) like ${prefix} then 1 else 2 end`.as("rank"),
    )
    .where("p.siteId", "=", siteId)
    .where((eb) =>
      eb.or([eb(sql`lower(p.designation)`, "like", contains), eb(sql`lower(c.tag_number)`, "like", contains)]),
    )
    .orderBy("rank")
    .orderBy("b.name")
    .orderBy("p.sortOrder")
    .limit(20)
    .execute();
};

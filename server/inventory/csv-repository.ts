/** The inventory CSV's reads: the site as the import compares rows with it, and the export's pages. */
import { sql, type Insertable } from "kysely";
import type { Database } from "../../db/types";
import type { Db } from "../db";
import { newestInspection } from "./survey-repository";

/** Every position of the site with its current component, as the import compares them. */
export async function importPositions(db: Db, siteId: string) {
  return db
    .selectFrom("positions as p")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .leftJoin("sections as s", "s.id", "p.sectionId")
    .leftJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .select([
      "p.id",
      "p.version",
      "p.boardId",
      "b.name as boardName",
      "p.sectionId",
      "s.name as section",
      "p.designation",
      "p.kind",
      "p.gridRow",
      "p.gridCol",
      "p.rowSpan",
      "p.colSpan",
      "p.circuit",
      "c.id as componentId",
      "c.version as componentVersion",
      "c.kind as componentKind",
      "c.maker",
      "c.model",
      "c.frame",
      "c.mounting",
      "c.ratingAmps",
      "c.poles",
      "c.voltageRating",
      "c.interruptingKa",
      "c.serial",
      "c.year",
      "c.meterRange",
      "c.lampWatts",
      "c.heritage",
      "c.tagNumber",
      "c.notes",
      "c.custody",
      "c.custodyLocation",
      "c.disposition",
      "c.dispositionOverridden",
    ])
    .where("p.siteId", "=", siteId)
    .orderBy("p.id")
    .execute();
}

export const importBoards = (db: Db, siteId: string) =>
  db.selectFrom("boards").select(["id", "name", "gridRows", "gridCols"]).where("siteId", "=", siteId).execute();

export const importSections = (db: Db, siteId: string) =>
  db.selectFrom("sections").select(["id", "boardId", "name"]).where("siteId", "=", siteId).execute();

/** The site's tag numbers in use, with their component and position. */
export const importTags = (db: Db, siteId: string) =>
  db
    .selectFrom("components")
    .select(["id", "positionId", "tagNumber"])
    .where("siteId", "=", siteId)
    .where("tagNumber", "is not", null)
    .execute();

export const positionCount = async (db: Db, siteId: string) =>
  Number(
    (
      await db
        .selectFrom("positions")
        .select((eb) => eb.fn.countAll<number>().as("n"))
        .where("siteId", "=", siteId)
        .executeTakeFirstOrThrow()
    ).n,
  );

export type ExportKey = { boardName: string; boardId: string; sortOrder: number; id: string };

/** One keyset page of the export (board name, board, position order, id), each position with its latest inspection. */
export const exportPage = (db: Db, siteId: string, after: ExportKey | null, limit: number) =>
  db
    .selectFrom("positions as p")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .leftJoin("sections as s", "s.id", "p.sectionId")
    .leftJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .leftJoinLateral(
      () => newestInspection(db, ["i.percentRusted", "i.astmGrade", "i.isoRi", "i.inspectedAt"]),
      (j) => j.onTrue(),
    )
    .select([
      "b.name as boardName",
      "b.id as boardId",
      "p.sortOrder",
      "p.id",
      "p.version",
      "c.version as componentVersion",
      "s.name as section",
      "p.designation",
      "p.kind",
      "p.gridRow",
      "p.gridCol",
      "p.rowSpan",
      "p.colSpan",
      "p.circuit",
      "c.maker",
      "c.model",
      "c.frame",
      "c.mounting",
      "c.ratingAmps",
      "c.poles",
      "c.voltageRating",
      "c.interruptingKa",
      "c.serial",
      "c.year",
      "c.meterRange",
      "c.lampWatts",
      "c.heritage",
      "c.tagNumber",
      "c.notes",
      "c.custody",
      "c.custodyLocation",
      "c.disposition",
      "c.dispositionOverridden",
      "li.percentRusted",
      "li.astmGrade",
      "li.isoRi",
      "li.inspectedAt",
    ])
    .where("p.siteId", "=", siteId)
    .$if(after !== null, (q) =>
      q.where(
        sql<boolean>`(b.name, b.id, p.sort_order, p.id) > (${after!.boardName}, ${after!.boardId}, ${after!.sortOrder}, ${after!.id})`,
      ),
    )
    .orderBy("b.name")
    .orderBy("b.id")
    .orderBy("p.sortOrder")
    .orderBy("p.id")
    .limit(limit)
    .execute();

// ── the import's commit (server/inventory/csv-commit.ts), in its one transaction ──

/** One import at a time per site, until the transaction ends. */
export const lockSiteImport = (trx: Db, siteId: string) =>
  sql`SELECT pg_advisory_xact_lock(hashtext('inventory-import'), hashtext(${siteId}))`.execute(trx);

/** Two rows may swap grid cells: the one-per-cell rule is checked at commit. */
export const deferOnePerCell = (trx: Db) => sql`SET CONSTRAINTS positions_one_per_cell DEFERRED`.execute(trx);

export const insertBoard = (trx: Db, v: Insertable<Database["boards"]>) =>
  trx.insertInto("boards").values(v).returning(["id", "name"]).executeTakeFirstOrThrow();

export const insertSection = (trx: Db, v: Insertable<Database["sections"]>) =>
  trx.insertInto("sections").values(v).returning("id").executeTakeFirstOrThrow();

/** Many positions in one statement, returned in the order given. */
export const insertPositions = (trx: Db, rows: Insertable<Database["positions"]>[]) =>
  trx.insertInto("positions").values(rows).returning(["id", "boardId", "designation"]).execute();

export const insertComponents = (trx: Db, rows: Insertable<Database["components"]>[]) =>
  trx.insertInto("components").values(rows).execute();

export const insertComponent = (trx: Db, v: Insertable<Database["components"]>) =>
  trx.insertInto("components").values(v).returning("id").executeTakeFirstOrThrow();

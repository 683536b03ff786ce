import { sql, type Insertable } from "kysely";
import type { BoardsTable, FloodEventsTable, SectionsTable } from "../../db/types";
import type { Db } from "../db";
import { statementCache } from "../statement-cache";

export const listFloodEvents = (db: Db, siteId: string) =>
  db
    .selectFrom("floodEvents")
    .selectAll()
    .where("siteId", "=", siteId)
    .orderBy("occurredOn", "desc")
    .orderBy("createdAt", "desc")
    .execute();

/** The flood event recommendations use: the most recent one. */
export const latestFloodEvent = (db: Db, siteId: string) =>
  db
    .selectFrom("floodEvents")
    .selectAll()
    .where("siteId", "=", siteId)
    .orderBy("occurredOn", "desc")
    .orderBy("createdAt", "desc")
    .limit(1)
    .executeTakeFirst();

export const insertFloodEvent = (db: Db, v: Insertable<FloodEventsTable>) =>
  db.insertInto("floodEvents").values(v).returningAll().executeTakeFirstOrThrow();

/**
 * Boards with their position count and how many positions have at least one inspection, from the
 * per-board summaries the writes keep current (server/inventory/board-summaries-repository.ts): two rows per
 * board at most, never the site's positions.
 */
export const listBoards = async (db: Db, siteId: string) =>
  (await db.executeQuery(boardListStatement.compile(db, null, { siteId }))).rows;

/** `listBoards`' statement, compiled once (server/statement-cache.ts): the board list reads it on every request. */
const boardListStatement = statementCache((db: Db, _shape: null, v: { siteId: string }) =>
  db
    .with("counts", (w) =>
      w
        .selectFrom("boardSummaries as s")
        .select([
          "s.boardId",
          sql<number>`sum(s.n)`.as("n"),
          sql<number>`coalesce(sum(s.n) filter (where s.surveyed), 0)`.as("surveyed"),
        ])
        .where("s.siteId", "=", v.siteId)
        .where("s.facet", "=", "positions")
        .groupBy("s.boardId"),
    )
    .selectFrom("boards as b")
    .leftJoin("counts", "counts.boardId", "b.id")
    .selectAll("b")
    .select([
      sql<number>`coalesce(counts.n, 0)::int`.as("positionCount"),
      sql<number>`coalesce(counts.surveyed, 0)::int`.as("surveyedCount"),
    ])
    .where("b.siteId", "=", v.siteId)
    .orderBy("b.name"),
);

export const boardByName = (db: Db, siteId: string, name: string) =>
  db
    .selectFrom("boards")
    .select("id")
    .where("siteId", "=", siteId)
    .where(sql<string>`lower(name)`, "=", name.trim().toLowerCase())
    .executeTakeFirst();

export const insertBoard = (db: Db, v: Insertable<BoardsTable>) =>
  db.insertInto("boards").values(v).returningAll().executeTakeFirstOrThrow();

/** The furthest row and column any position of the board reaches (its span included). */
export const boardExtent = (db: Db, boardId: string) =>
  db
    .selectFrom("positions")
    .select((eb) => [
      eb.fn.coalesce(eb.fn.max(eb("gridRow", "+", eb.ref("rowSpan"))), eb.lit(1)).as("rowEnd"),
      eb.fn.coalesce(eb.fn.max(eb("gridCol", "+", eb.ref("colSpan"))), eb.lit(1)).as("colEnd"),
    ])
    .where("boardId", "=", boardId)
    .executeTakeFirstOrThrow();

/**
 * A board of the site with how many positions it has (the sum of its kept per-board summary's "positions" rows:
 * one index read, whatever the board's size), in one statement: the board page's head. Undefined when the site has
 * no such board.
 */
export const boardHead = (db: Db, siteId: string, boardId: string) =>
  db
    .selectFrom("boards as b")
    .selectAll("b")
    .select((eb) =>
      eb
        .selectFrom("boardSummaries as s")
        .select(sql<number>`coalesce(sum(s.n), 0)::int`.as("n"))
        .whereRef("s.boardId", "=", "b.id")
        .where("s.facet", "=", "positions")
        .as("positionTotal"),
    )
    .where("b.id", "=", boardId)
    .where("b.siteId", "=", siteId)
    .executeTakeFirst();

export const listSections = (db: Db, boardId: string) =>
  db.selectFrom("sections").selectAll().where("boardId", "=", boardId).orderBy("sortOrder").orderBy("name").execute();

export const nextSectionOrder = async (db: Db, boardId: string) =>
  Number(
    (
      await db
        .selectFrom("sections")
        .select((eb) => eb.fn.coalesce(eb.fn.max("sortOrder"), eb.lit(-1)).as("m"))
        .where("boardId", "=", boardId)
        .executeTakeFirstOrThrow()
    ).m,
  ) + 1;

export const insertSection = (db: Db, v: Insertable<SectionsTable>) =>
  db.insertInto("sections").values(v).returningAll().executeTakeFirstOrThrow();

export const deleteSection = (db: Db, id: string) => db.deleteFrom("sections").where("id", "=", id).execute();

/** The site's boards, id and name, by name (the overview reads it on every request: compiled once). */
export const boardNames = async (db: Db, siteId: string) =>
  (await db.executeQuery(boardNamesStatement.compile(db, null, { siteId }))).rows;

const boardNamesStatement = statementCache((db: Db, _shape: null, v: { siteId: string }) =>
  db.selectFrom("boards").select(["id", "name"]).where("siteId", "=", v.siteId).orderBy("name"),
);

/** A section's id and name (the position panel's heading). */
export const sectionBrief = (db: Db, sectionId: string) =>
  db.selectFrom("sections").select(["id", "name"]).where("id", "=", sectionId).executeTakeFirst();

import { sql, type Insertable } from "kysely";
import type { ComponentsTable, PositionsTable } from "../../db/types";
import type { Db } from "../db";
import { newestInspection } from "./survey-repository";
import { statementCache } from "../statement-cache";
import { currentComponentOfP } from "./current-component-reads";
import { LOOSE_KEY_SQL, looseKey } from "../../src/domain/search-keys";
import { COMPONENT_KINDS, COMPONENT_KIND_LABELS, COMPONENT_KIND_SHORT } from "../../src/domain/vocab";
import type { TilePageKey } from "../../src/schemas/inventory";

/**
 * One page of the board elevation in board order: each position with its current component, the component's
 * newest inspection and photo / open-defect counts (subqueries), the `limit` positions after `after` (keyset, never
 * OFFSET: positions_board_order_idx serves it as an ordered index scan, so a page costs its own rows whatever the
 * board's size or the page's depth). The current component is a lateral read by key (components_current_uq), not a
 * join: joined, the planner hashed every component of the site for a board's page (a sequential scan of 20,000
 * rows, 5 of the statement's 12 ms at 20,000 positions; DEVELOPERS.md "One board's page, the rest measured").
 * Compiled once per shape (first page or after a key; server/statement-cache.ts).
 */
export const boardTilePage = async (db: Db, boardId: string, after: TilePageKey | null, limit: number) =>
  (
    await db.executeQuery(
      tilePageStatement.compile(db, null, {
        boardId,
        limit,
        afterRow: after?.gridRow,
        afterCol: after?.gridCol,
        afterOrder: after?.sortOrder,
        afterId: after?.id,
      }),
    )
  ).rows;

const tilePageStatement = statementCache(
  (
    db: Db,
    _shape: null,
    v: {
      boardId: string;
      limit: number;
      afterRow?: number;
      afterCol?: number;
      afterOrder?: number;
      afterId?: string;
    },
  ) =>
    db
      .selectFrom("positions as p")
      .leftJoinLateral(
        () =>
          currentComponentOfP([
            "c.id",
            "c.kind",
            "c.tagNumber",
            "c.heritage",
            "c.custody",
            "c.disposition",
            "c.dispositionOverridden",
            "c.maker",
            "c.model",
            "c.ratingAmps",
            "c.poles",
            "c.version",
          ]),
        (j) => j.onTrue(),
      )
      .leftJoinLateral(
        () => newestInspection(db, ["i.astmGrade", "i.isoRi", "i.percentRusted", "i.inspectedAt", "i.belowWaterLine"]),
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
      .where("p.boardId", "=", v.boardId)
      .$if(v.afterId != null, (q) =>
        q.where((eb) =>
          eb(
            eb.refTuple("p.gridRow", "p.gridCol", "p.sortOrder", "p.id"),
            ">",
            eb.tuple(v.afterRow!, v.afterCol!, v.afterOrder!, v.afterId!),
          ),
        ),
      )
      .orderBy("p.gridRow")
      .orderBy("p.gridCol")
      .orderBy("p.sortOrder")
      .orderBy("p.id")
      .limit(v.limit),
);

/**
 * What a board's thumbnail draws, every position in board order: its place on the grid, its current
 * component's custody and that component's newest ASTM grade (the same lateral reads as the tiles'), no counts.
 * Joined instead of read by key, the planner hashed every current component of the site for each thumbnail
 * (a sequential scan that grew with the site, not the board).
 */
export const thumbnailCellsQuery = (db: Db, boardId: string) =>
  db
    .selectFrom("positions as p")
    .leftJoinLateral(
      () => currentComponentOfP(["c.id", "c.custody"]),
      (j) => j.onTrue(),
    )
    .leftJoinLateral(
      () => newestInspection(db, ["i.astmGrade"]),
      (j) => j.onTrue(),
    )
    .select(["p.gridRow", "p.gridCol", "p.rowSpan", "p.colSpan", "li.astmGrade", "c.custody"])
    .where("p.boardId", "=", boardId)
    .orderBy("p.gridRow")
    .orderBy("p.gridCol")
    .orderBy("p.sortOrder")
    .orderBy("p.id");
export const boardThumbnailCells = (db: Db, boardId: string) => thumbnailCellsQuery(db, boardId).execute();

export type TileQueryRow = Awaited<ReturnType<typeof boardTilePage>>[number];

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

/** Locks every component of the position (retired ones too: they go with it), in id order; their ids. */
export const lockComponentsOfPosition = async (db: Db, positionId: string) =>
  (
    await db
      .selectFrom("components")
      .select("id")
      .where("positionId", "=", positionId)
      .orderBy("id")
      .forNoKeyUpdate()
      .execute()
  ).map((r) => r.id);

export const currentComponent = (db: Db, positionId: string) =>
  db
    .selectFrom("components")
    .selectAll()
    .where("positionId", "=", positionId)
    .where("retiredAt", "is", null)
    .executeTakeFirst();

const likeEscape = (s: string) => s.replace(/[\\%_]/g, (m) => `\\${m}`);

const looseKeySql = (col: string) =>
  sql<string>`regexp_replace(regexp_replace(lower(coalesce(${sql.ref(col)}, '')), ${LOOSE_KEY_SQL.strip}, '', 'g'), ${LOOSE_KEY_SQL.zeros}, ${LOOSE_KEY_SQL.replacement}, 'g')`;

/** The words a kind answers to: its label, its tile abbreviation and its key ("molded case breaker mccb"). */
const KIND_WORDS = COMPONENT_KINDS.map((k) => ({
  kind: k,
  words: `${COMPONENT_KIND_LABELS[k]} ${COMPONENT_KIND_SHORT[k]} ${k.replace(/_/g, " ")}`.toLowerCase(),
}));

/**
 * The quick log's search: designation, tag number, circuit name and kind, with
 * prefixes, loosely typed tags ("kl 42" finds KL-0042, see looseKey) and typing slips through
 * pg_trgm (similarity / word_similarity; the thresholds are pg_trgm's own defaults, 0.3 and 0.6,
 * written out so a server setting cannot change them). Rank: exact designation or tag, then the
 * same loosely, then prefixes, then contains or a circuit word, then slips and kinds by similarity.
 */
export const lookup = (db: Db, siteId: string, q: string) => {
  const lower = q.trim().toLowerCase();
  const loose = looseKey(q);
  const contains = `%${likeEscape(lower)}%`;
  const prefix = `${likeEscape(lower)}%`;
  const loosePrefix = `${likeEscape(loose)}%`;
  const desKey = looseKeySql("p.designation");
  const tagKey = looseKeySql("c.tagNumber");
  const kindRows = sql.join(KIND_WORDS.map((k) => sql`(${k.kind}, ${k.words})`));
  // Several words ("bilge pump 2", "steerng gear"): each must be in the circuit name, whole or with a slip.
  const words = lower.split(/\s+/).filter((w) => w.length >= 2);
  const circuitWords =
    words.length > 1
      ? sql<boolean>`(${sql.join(
          words.map(
            (w) =>
              sql`(lower(p.circuit) like ${`%${likeEscape(w)}%`} or word_similarity(${w}, lower(p.circuit)) >= 0.5)`,
          ),
          sql` and `,
        )})`
      : sql<boolean>`false`;
  const kindHit = sql<boolean>`p.kind in (select v.kind from (values ${kindRows}) as v(kind, words)
    where length(${lower}) >= 2 and (v.words like ${contains} or word_similarity(${lower}, v.words) >= 0.6))`;
  const rank = sql<number>`case
        when lower(p.designation) = ${lower} or lower(c.tag_number) = ${lower} then 0
        when ${loose} <> '' and (${desKey} = ${loose} or ${tagKey} = ${loose}) then 1
        when lower(p.designation) like ${prefix} or lower(c.tag_number) like ${prefix}
          or (${loose} <> '' and (${desKey} like ${loosePrefix} or ${tagKey} like ${loosePrefix})) then 2
        when lower(p.designation) like ${contains} or lower(c.tag_number) like ${contains}
          or lower(p.circuit) like ${contains} then 3
        else 4 end`;
  const score = sql<number>`greatest(similarity(lower(p.designation), ${lower}), similarity(lower(coalesce(c.tag_number, '')), ${lower}),
        word_similarity(${lower}, lower(p.circuit)), case when ${kindHit} then 0.5 else 0 end)::float8`;
  return (
    db
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
      .select(rank.as("rank"))
      .select(score.as("score"))
      .select(
        sql<"designation" | "tag" | "circuit" | "kind">`case
        when lower(p.designation) = ${lower} or lower(p.designation) like ${prefix} or (${loose} <> '' and ${desKey} like ${loosePrefix}) then 'designation'
        when lower(c.tag_number) like ${prefix} or (${loose} <> '' and ${tagKey} like ${loosePrefix}) then 'tag'
        when lower(p.designation) like ${contains} then 'designation'
        when lower(c.tag_number) like ${contains} then 'tag'
        when lower(p.circuit) like ${contains} or word_similarity(${lower}, lower(p.circuit)) >= 0.6 or ${circuitWords} then 'circuit'
        when ${kindHit} then 'kind'
        when similarity(lower(coalesce(c.tag_number, '')), ${lower}) > similarity(lower(p.designation), ${lower}) then 'tag'
        else 'designation' end`.as("matchedOn"),
      )
      .where("p.siteId", "=", siteId)
      .where((eb) =>
        eb.or([
          eb(sql`lower(p.designation)`, "like", contains),
          eb(sql`lower(c.tag_number)`, "like", contains),
          eb(sql`lower(p.circuit)`, "like", contains),
          sql<boolean>`(${loose} <> '' and (${desKey} like ${loosePrefix} or ${tagKey} like ${loosePrefix}))`,
          sql<boolean>`(length(${lower}) >= 3 and (similarity(lower(p.designation), ${lower}) >= 0.3
          or similarity(lower(coalesce(c.tag_number, '')), ${lower}) >= 0.3
          or word_similarity(${lower}, lower(p.circuit)) >= 0.6))`,
          circuitWords,
          kindHit,
        ]),
      )
      .orderBy("rank")
      // Slips and kinds by how close they are; the sure matches in board order.
      .orderBy(sql`case when ${rank} >= 3 then ${score} else 0 end`, "desc")
      .orderBy("b.name")
      .orderBy("p.sortOrder")
      .limit(20)
      .execute()
  );
};

/** The board a position is on; throws when the position is gone. */
export const boardIdOf = async (db: Db, positionId: string) =>
  (await db.selectFrom("positions").select("boardId").where("id", "=", positionId).executeTakeFirstOrThrow()).boardId;

/** A position's place on its board's grid with the board's face and water line (the recommendation's geometry). */
export const positionGeometry = (db: Db, positionId: string) =>
  db
    .selectFrom("positions as p")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .select(["p.gridRow", "p.rowSpan", "b.gridRows", "b.faceHeightMm", "b.waterLineMm"])
    .where("p.id", "=", positionId)
    .executeTakeFirst();

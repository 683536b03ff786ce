import { sql } from "kysely";
import type { Expression, Insertable, Updateable } from "kysely";
import type { Database, PartLinesTable } from "../../db/types";
import { OPEN_PART_STATUSES } from "../../src/domain/part-workflow";
import type { PartStatus } from "../../src/domain/vocab";
import type { Db } from "../db";
import { parseLineRef } from "../../src/domain/part-workflow";
import { statementCache } from "../statement-cache";

const lineCols = [
  "id",
  "number",
  "siteId",
  "version",
  "origin",
  "kind",
  "ratingAmps",
  "poles",
  "voltageRating",
  "frame",
  "mounting",
  "maker",
  "model",
  "need",
  "notes",
  "cancelReason",
  "mustMatch",
  "specKey",
  "heritageRule",
  "status",
  "autoCancelled",
  "manualQty",
  "estimatedUnitCost",
  "fittedAt",
  "createdAt",
  "updatedAt",
] as const;

/** One advisory lock per site serialises demand reconciliation, so two readers never create the same line twice. */
export const lockSiteParts = (db: Db, siteId: string) =>
  sql`select pg_advisory_xact_lock(hashtext(${"parts:" + siteId}))`.execute(db);

/** Current components whose disposition asks for a part, with their home position and board (all of the site, or these ids). */
export const wantedComponents = (db: Db, siteId: string, ids?: readonly string[]) => {
  if (ids && !ids.length) return Promise.resolve([]);
  let q = db
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .select([
      "c.id",
      "c.kind",
      "c.ratingAmps",
      "c.poles",
      "c.voltageRating",
      "c.frame",
      "c.mounting",
      "c.maker",
      "c.model",
      "c.positionId",
      "p.boardId",
    ])
    .where("c.siteId", "=", siteId)
    .where("c.retiredAt", "is", null)
    .where("c.disposition", "in", ["replace", "source"]);
  if (ids) q = q.where("c.id", "in", [...ids]);
  return q.orderBy("c.createdAt").orderBy("c.id").execute();
};

/**
 * Open defects that need a part, with the nameplate of their component when they have one and
 * whether that component is itself wanted (all of the site, or these defects and those of these components).
 */
export const wantedDefects = (
  db: Db,
  siteId: string,
  scope?: { ids: readonly string[]; componentIds: readonly string[] },
) => {
  if (scope && !scope.ids.length && !scope.componentIds.length) return Promise.resolve([]);
  let q = db
    .selectFrom("defects as d")
    .leftJoin("components as c", "c.id", "d.componentId")
    .select([
      "d.id",
      "d.partsNeeded",
      "d.positionId",
      "d.boardId",
      "d.componentId",
      "c.kind",
      "c.ratingAmps",
      "c.poles",
      "c.voltageRating",
      "c.frame",
      "c.mounting",
      "c.maker",
      "c.model",
      sql<boolean>`coalesce(c.retired_at is null and c.disposition in ('replace', 'source'), false)`.as(
        "componentWanted",
      ),
    ])
    .where("d.siteId", "=", siteId)
    .where("d.partsState", "=", "wanted")
    .where("d.status", "not in", ["closed", "accepted_as_is"]);
  if (scope)
    q = q.where((eb) =>
      eb.or([
        ...(scope.ids.length ? [eb("d.id", "in", [...scope.ids])] : []),
        ...(scope.componentIds.length ? [eb("d.componentId", "in", [...scope.componentIds])] : []),
      ]),
    );
  return q.orderBy("d.createdAt").orderBy("d.id").execute();
};

/** Active and fitted links of the site, or of these sources. */
export const linksOfSources = (
  db: Db,
  siteId: string,
  scope?: { componentIds: readonly string[]; defectIds: readonly string[] },
) => {
  let q = db
    .selectFrom("partDemandLinks")
    .selectAll()
    .where("siteId", "=", siteId)
    .where((eb) => eb.or([eb("active", "=", true), eb("fitted", "=", true)]));
  if (scope) {
    if (!scope.componentIds.length && !scope.defectIds.length) return Promise.resolve([]);
    q = q.where((eb) =>
      eb.or([
        ...(scope.componentIds.length ? [eb("componentId", "in", [...scope.componentIds])] : []),
        ...(scope.defectIds.length ? [eb("defectId", "in", [...scope.defectIds])] : []),
      ]),
    );
  }
  return q.execute();
};
export type LinkRecord = Awaited<ReturnType<typeof linksOfSources>>[number];

/** Lines demand may join: open ones, and the ones reconciliation itself closed (it may reopen them). */
export const joinableLines = (db: Db, siteId: string) =>
  db
    .selectFrom("partLines")
    .select(lineCols)
    .where("siteId", "=", siteId)
    .where((eb) =>
      eb.or([
        eb("status", "in", OPEN_PART_STATUSES),
        eb.and([eb("status", "=", "cancelled"), eb("autoCancelled", "=", true)]),
      ]),
    )
    .orderBy("createdAt")
    .execute();

export const linesByIds = (db: Db, siteId: string, ids: string[]) =>
  ids.length
    ? db.selectFrom("partLines").select(lineCols).where("siteId", "=", siteId).where("id", "in", ids).execute()
    : Promise.resolve([]);

export const findLine = (db: Db, siteId: string, id: string, forUpdate = false) => {
  const q = db.selectFrom("partLines").select(lineCols).where("siteId", "=", siteId).where("id", "=", id);
  return (forUpdate ? q.forUpdate() : q).executeTakeFirst();
};
export type LineRecord = NonNullable<Awaited<ReturnType<typeof findLine>>>;

export const insertLine = (db: Db, v: Insertable<PartLinesTable>) =>
  db.insertInto("partLines").values(v).returning(lineCols).executeTakeFirstOrThrow();

export const updateLine = (db: Db, id: string, v: Updateable<PartLinesTable>) =>
  db
    .updateTable("partLines")
    .set({ ...v, version: sql`version + 1`, updatedAt: sql`now()` })
    .where("id", "=", id)
    .returning(lineCols)
    .executeTakeFirstOrThrow();

export const addHistory = (db: Db, v: Insertable<Database["partLineHistory"]>) =>
  db.insertInto("partLineHistory").values(v).execute();

export interface LineFilter {
  status: PartStatus | "open" | "all";
  boardId?: string;
  kind?: string;
  heritageRule?: string;
  q?: string;
  sort?: "created" | "part" | "heritageRule" | "qty" | "positions" | "status" | "leadCount" | "estimated";
  dir?: "asc" | "desc";
}

/** Quantity a line stands for, in SQL (the same rule as lineQty in rows.ts). */
const qtySql = sql<number>`(pl.manual_qty + coalesce((select sum(l.qty) from part_demand_links l where l.line_id = pl.id
  and (case when pl.status = 'fitted' then l.fitted else l.active end)), 0))`;

/**
 * A filter's values, each reaching the SQL only as a parameter (statementCache's contract): the search text
 * as an ILIKE pattern and a line number when it reads as one ("W-12", "w12", "12").
 */
type FilterValues = {
  siteId: string;
  boardId?: string;
  kind?: string;
  heritageRule?: string;
  like?: string;
  number?: number | null;
};

function filterValues(siteId: string, f: LineFilter): FilterValues {
  const q = f.q?.trim();
  return {
    siteId,
    boardId: f.boardId,
    kind: f.kind,
    heritageRule: f.heritageRule,
    like: q ? `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%` : undefined,
    number: q ? parseLineRef(q) : undefined,
  };
}

function filtered(db: Db, siteId: string, f: LineFilter) {
  return filteredBy(db, f.status, filterValues(siteId, f));
}

function filteredBy(db: Db, status: LineFilter["status"], v: FilterValues) {
  let q = db.selectFrom("partLines as pl").where("pl.siteId", "=", v.siteId);
  if (status === "open") q = q.where("pl.status", "in", OPEN_PART_STATUSES);
  else if (status !== "all") q = q.where("pl.status", "=", status);
  if (v.kind != null) q = q.where("pl.kind", "=", v.kind as never);
  if (v.heritageRule != null) q = q.where("pl.heritageRule", "=", v.heritageRule as never);
  if (v.like != null) {
    const text = sql<boolean>`concat_ws(' ', pl.maker, pl.model, pl.frame, pl.mounting, pl.need, pl.notes) ilike ${v.like}`;
    q = q.where(v.number == null ? text : sql<boolean>`(pl.number = ${v.number} or ${text})`);
  }
  if (v.boardId != null) {
    const boardId = v.boardId;
    q = q.where((eb) =>
      eb.exists(
        eb
          .selectFrom("partDemandLinks as l")
          .select("l.id")
          .whereRef("l.lineId", "=", "pl.id")
          .where("l.boardId", "=", boardId)
          .where((e) => e.or([e("l.active", "=", true), e("l.fitted", "=", true)])),
      ),
    );
  }
  return q;
}

/**
 * Text whose numbers compare by value ("Q9" before "Q10", "F2.9" before "F2.10", "Aft 2" before "Aft 10"): the ICU
 * collation numbers_by_value (root order with numeric ordering, migration 2026_12_13_0200). Every list of positions
 * in the wanted list orders board names and designations by it, so the row, the line's page, its pages, the CSV and
 * the partners' sheet agree.
 */
const byValue = (e: Expression<unknown>) => sql<string | null>`${e} collate numbers_by_value`;
/** A line's links in board and designation order, ties in the order they were made: a total order. */
const LINK_ORDER = sql`${byValue(sql.ref("l.board_name"))}, ${byValue(sql.ref("l.designation"))}, l.created_at, l.id`;

const STATUS_ORDER = sql`array_position(array['wanted','lead_found','acquired','received','fitted','cancelled']::text[], pl.status)`;
const RULE_ORDER = sql`array_position(array['original_only','period_ok','modern_ok']::text[], pl.heritage_rule)`;
const SORT_SQL = {
  created: [sql`pl.created_at`],
  part: [sql`pl.kind`, sql`pl.rating_amps`, sql`lower(pl.maker)`, sql`lower(pl.model)`, sql`lower(pl.need)`],
  heritageRule: [RULE_ORDER],
  qty: [qtySql],
  positions: [
    sql`(select min(${byValue(sql.ref("p.designation"))}) from part_demand_links l join positions p on p.id = l.position_id where l.line_id = pl.id and l.active)`,
  ],
  status: [STATUS_ORDER],
  leadCount: [sql`(select count(*) from part_leads pd where pd.line_id = pl.id)`],
  estimated: [sql`pl.estimated_unit_cost * ${qtySql}`],
} as const;

/** One page of the filtered lines, sorted by the server; ties keep the order lines were created in. */
export function listLines(db: Db, siteId: string, f: LineFilter, page?: { limit: number; offset: number }) {
  const dir = f.dir === "desc" ? sql`desc nulls last` : sql`asc nulls last`;
  let q = filtered(db, siteId, f).select(lineCols.map((c) => `pl.${c}` as const));
  for (const expr of SORT_SQL[f.sort ?? "created"]) q = q.orderBy(sql`${expr} ${dir}`);
  q = q.orderBy("pl.createdAt").orderBy("pl.id");
  if (page) q = q.limit(page.limit).offset(page.offset);
  return q.execute();
}

/** A row of `pageOfLines`: the line, its counts and money, and its first links as JSON. */
export interface LinePreviewLink {
  linkId: string;
  positionId: string | null;
  boardId: string | null;
  componentId: string | null;
  defectId: string | null;
  qty: number;
  active: boolean;
  fitted: boolean;
  designation: string | null;
  boardName: string | null;
  defectTitle: string | null;
  photoId: string | null;
}
export type PagedLine = LineRecord & {
  qty: number;
  linkCount: number;
  leadCount: number;
  spent: number;
  preview: LinePreviewLink[];
};

/**
 * Lines by id, or one page of the filtered lines in the list's order, each with everything its row shows,
 * in one statement: quantity and link count (an index-only read of the line's live links,
 * part_demand_links_line_live_idx), lead count, spend, and the first `linksPerLine` live links to be made (listed
 * in `LINK_ORDER`, as the line's page lists them), each with its position's designation, board, defect title and its component's first
 * nameplate photo (looked up by key). The page is taken first (the index walk stops at it), then the 50
 * lines are put back in the page's order by the sort keys it was chosen by, so an offset page never pays for
 * the rows it skips.
 */
export async function pageOfLines(
  db: Db,
  siteId: string,
  pick: { filter: LineFilter; limit: number; offset: number } | { ids: readonly string[] },
  linksPerLine: number,
): Promise<PagedLine[]> {
  if ("ids" in pick && !pick.ids.length) return [];
  const f: LineFilter = "filter" in pick ? pick.filter : { status: "all" };
  const shape: PageShape = { status: f.status, sort: f.sort ?? "created", dir: f.dir ?? "asc", byIds: "ids" in pick };
  const values: PageValues = {
    ...filterValues(siteId, f),
    ids: "ids" in pick ? pick.ids : undefined,
    limit: "filter" in pick ? pick.limit : undefined,
    offset: "filter" in pick ? pick.offset : undefined,
    linksPerLine,
  };
  return (await db.executeQuery(pageStatement.compile(db, shape, values))).rows as PagedLine[];
}

interface PageShape {
  status: LineFilter["status"];
  sort: NonNullable<LineFilter["sort"]>;
  dir: "asc" | "desc";
  byIds: boolean;
}
type PageValues = FilterValues & {
  ids?: readonly string[];
  limit?: number;
  offset?: number;
  linksPerLine: number;
};

/** `pageOfLines`' statement, compiled once per shape (server/statement-cache.ts): the list reads it on every request. */
const pageStatement = statementCache((db: Db, s: PageShape, v: PageValues) => {
  const dir = s.dir === "desc" ? sql`desc nulls last` : sql`asc nulls last`;
  const keys = s.byIds ? [] : SORT_SQL[s.sort];
  let inner = filteredBy(db, s.status, v)
    .select(lineCols.map((c) => `pl.${c}` as const))
    .select(keys.map((k, i) => sql`${k}`.as(`sk${i}`)));
  if (s.byIds) inner = inner.where("pl.id", "in", [...v.ids!]);
  else {
    for (const expr of keys) inner = inner.orderBy(sql`${expr} ${dir}`);
    inner = inner.orderBy("pl.createdAt").orderBy("pl.id").limit(v.limit!).offset(v.offset!);
  }
  const live = sql`(l.active or l.fitted)`;
  let q = db
    .selectFrom(inner.as("p"))
    .select(lineCols.map((c) => `p.${c}` as const))
    .select([
      sql<number>`p.manual_qty + coalesce((select sum(l.qty) from part_demand_links l where l.line_id = p.id and ${live}
        and (case when p.status = 'fitted' then l.fitted else l.active end)), 0)::int`.as("qty"),
      sql<number>`(select count(*) from part_demand_links l where l.line_id = p.id and ${live})::int`.as("linkCount"),
      sql<number>`(select count(*) from part_leads pd where pd.line_id = p.id)::int`.as("leadCount"),
      sql<number>`(select coalesce(sum(a.cost), 0) from part_acquisitions a where a.line_id = p.id)::float8`.as(
        "spent",
      ),
      sql<LinePreviewLink[]>`coalesce((select json_agg(json_build_object(
          'linkId', l.id, 'positionId', l.position_id, 'boardId', l.board_id, 'componentId', l.component_id,
          'defectId', l.defect_id, 'qty', l.qty, 'active', l.active, 'fitted', l.fitted,
          'designation', l.designation, 'boardName', l.board_name,
          'defectTitle', (select d.title from defects d where d.id = l.defect_id),
          'photoId', (select ph.id from photos ph where ph.component_id = l.component_id and ph.kind = 'nameplate'
            and ph.deleted_at is null order by ph.created_at limit 1)
        ) order by ${LINK_ORDER})
        from (select l.*, (select ps.designation from positions ps where ps.id = l.position_id) designation,
            (select b.name from boards b where b.id = l.board_id) board_name
          from (select * from part_demand_links l where l.line_id = p.id and ${live}
            order by l.created_at, l.id limit ${v.linksPerLine}) l) l), '[]'::json)`.as("preview"),
    ]);
  for (const [i] of keys.entries()) q = q.orderBy(sql`${sql.ref(`p.sk${i}`)} ${dir}`);
  return q.orderBy("p.createdAt").orderBy("p.id");
});

/**
 * A page of one line's links (withdrawn ones too), in board and designation order (the line's own page: it
 * reads every link of that one line to sort them; a line has tens to a few hundred). Names and designations compare
 * `byValue`, ties by when the link was made and its id: a total order, so the pages neither repeat nor skip a link,
 * and the same as `LINK_ORDER` puts a row's first links in.
 */
export function linksOfLinePage(db: Db, siteId: string, lineId: string, page: { limit: number; offset: number }) {
  return db
    .selectFrom("partDemandLinks as l")
    .leftJoin("boards as b", "b.id", "l.boardId")
    .select([
      "l.id",
      "l.positionId",
      "l.boardId",
      "l.componentId",
      "l.defectId",
      "l.qty",
      "l.active",
      "l.fitted",
      (eb) =>
        byValue(eb.selectFrom("positions as p").select("p.designation").whereRef("p.id", "=", "l.positionId")).as(
          "designation",
        ),
      "b.name as boardName",
      (eb) => eb.selectFrom("defects as d").select("d.title").whereRef("d.id", "=", "l.defectId").as("defectTitle"),
    ])
    .where("l.lineId", "=", lineId)
    .where("l.siteId", "=", siteId)
    .orderBy(byValue(sql.ref("b.name")))
    .orderBy("designation")
    .orderBy("l.createdAt")
    .orderBy("l.id")
    .limit(page.limit)
    .offset(page.offset)
    .execute();
}

/** How many links the line has, or null when it is not a line of the site. */
export const countLinksOfLine = async (db: Db, siteId: string, lineId: string) => {
  const row = await db
    .selectFrom("partLines as pl")
    .select((eb) =>
      eb
        .selectFrom("partDemandLinks as l")
        .select((e) => e.fn.countAll<number>().as("n"))
        .whereRef("l.lineId", "=", "pl.id")
        .as("n"),
    )
    .where("pl.siteId", "=", siteId)
    .where("pl.id", "=", lineId)
    .executeTakeFirst();
  return row ? Number(row.n) : null;
};

export const countLines = async (db: Db, siteId: string, f: LineFilter) =>
  Number((await db.executeQuery(countStatement.compile(db, f.status, filterValues(siteId, f)))).rows[0]?.n ?? 0);

/** `countLines`' statement, compiled once per shape. */
const countStatement = statementCache((db: Db, status: LineFilter["status"], v: FilterValues) =>
  filteredBy(db, status, v).select((eb) => eb.fn.countAll<number>().as("n")),
);

/**
 * Every active and fitted link of the lines, with the position, board and defect they
 * point at. The position and defect are looked up per link (by primary key) rather than joined: a
 * page's few hundred links cost a few hundred index probes, where a join let the planner hash the
 * whole site's positions and defects.
 */
export function linksOfLines(db: Db, lineIds: string[]) {
  if (!lineIds.length) return Promise.resolve([]);
  return db
    .selectFrom("partDemandLinks as l")
    .leftJoin("boards as b", "b.id", "l.boardId")
    .select([
      "l.id",
      "l.lineId",
      "l.positionId",
      "l.boardId",
      "l.componentId",
      "l.defectId",
      "l.qty",
      "l.active",
      "l.fitted",
      "l.createdAt",
      (eb) =>
        byValue(eb.selectFrom("positions as p").select("p.designation").whereRef("p.id", "=", "l.positionId")).as(
          "designation",
        ),
      "b.name as boardName",
      (eb) => eb.selectFrom("defects as d").select("d.title").whereRef("d.id", "=", "l.defectId").as("defectTitle"),
    ])
    .where("l.lineId", "in", lineIds)
    .where((e) => e.or([e("l.active", "=", true), e("l.fitted", "=", true)]))
    .orderBy(byValue(sql.ref("b.name")))
    .orderBy("designation")
    .orderBy("l.createdAt")
    .orderBy("l.id")
    .execute();
}

export const leadCounts = (db: Db, lineIds: string[]) =>
  lineIds.length
    ? db
        .selectFrom("partLeads")
        .select(["lineId", (eb) => eb.fn.countAll<number>().as("n")])
        .where("lineId", "in", lineIds)
        .groupBy("lineId")
        .execute()
    : Promise.resolve([]);

export const spentByLine = (db: Db, lineIds: string[]) =>
  lineIds.length
    ? db
        .selectFrom("partAcquisitions")
        .select(["lineId", sql<number>`coalesce(sum(cost), 0)::float8`.as("spent")])
        .where("lineId", "in", lineIds)
        .groupBy("lineId")
        .execute()
    : Promise.resolve([]);

/** Nameplate photos of the components the lines are for (not deleted), oldest first. */
export const nameplatePhotos = (db: Db, componentIds: string[]) =>
  componentIds.length
    ? db
        .selectFrom("photos")
        .select(["id", "componentId"])
        .where("componentId", "in", componentIds)
        .where("kind", "=", "nameplate")
        .where("deletedAt", "is", null)
        .orderBy("createdAt")
        .execute()
    : Promise.resolve([]);

/** The site's boards for the list's board filter, names compared `byValue` ("Deck 9" before "Deck 10"). */
export const boardsOfSite = (db: Db, siteId: string) =>
  db
    .selectFrom("boards")
    .select(["id", "name"])
    .where("siteId", "=", siteId)
    .orderBy(byValue(sql.ref("name")))
    .execute();

/** Every demand link on a position (active, withdrawn or fitted), with its line. */
export const demandLinksOfPosition = (trx: Db, siteId: string, positionId: string) =>
  trx
    .selectFrom("partDemandLinks")
    .select(["componentId", "defectId", "lineId", "active"])
    .where("siteId", "=", siteId)
    .where("positionId", "=", positionId)
    .execute();

export const activeLinksOfLine = (trx: Db, lineId: string) =>
  trx.selectFrom("partDemandLinks").selectAll().where("lineId", "=", lineId).where("active", "=", true).execute();

/** The links' parts are fitted: they no longer ask for anything. */
export const markLinksFitted = (trx: Db, linkIds: string[]) =>
  trx
    .updateTable("partDemandLinks")
    .set({ fitted: true, active: false, fittedAt: sql`now()` })
    .where("id", "in", linkIds)
    .execute();

export const leadsOfLine = (db: Db, lineId: string) =>
  db.selectFrom("partLeads").selectAll().where("lineId", "=", lineId).orderBy("createdAt").execute();

export const acquisitionsOfLine = (db: Db, lineId: string) =>
  db
    .selectFrom("partAcquisitions")
    .select(["id", "leadId", "qty", "cost", "acquiredOn", "notes"])
    .where("lineId", "=", lineId)
    .orderBy("acquiredOn")
    .execute();

/** The line's history, newest first, with who did each. */
export const historyOfLine = (db: Db, lineId: string) =>
  db
    .selectFrom("partLineHistory as h")
    .leftJoin("users as u", "u.id", "h.actorId")
    .select(["h.id", "h.at", "h.action", "h.summary", "h.fromStatus", "h.toStatus", "u.name as actorName"])
    .where("h.lineId", "=", lineId)
    .orderBy("h.at", "desc")
    .orderBy("h.id", "desc")
    .execute();

export const insertLead = (trx: Db, v: Insertable<Database["partLeads"]>) =>
  trx.insertInto("partLeads").values(v).returningAll().executeTakeFirstOrThrow();

/** Locks the lead for the rest of the transaction. */
export const lockLead = (trx: Db, siteId: string, leadId: string) =>
  trx
    .selectFrom("partLeads")
    .selectAll()
    .where("siteId", "=", siteId)
    .where("id", "=", leadId)
    .forUpdate()
    .executeTakeFirst();

/** Writes a patch and bumps the version (the caller checked it under lockLead). */
export const updateLeadRow = (trx: Db, leadId: string, patch: Updateable<Database["partLeads"]>) =>
  trx
    .updateTable("partLeads")
    .set({ ...patch, version: sql`version + 1`, updatedAt: sql`now()` })
    .where("id", "=", leadId)
    .returningAll()
    .executeTakeFirstOrThrow();

export const leadOfLine = (trx: Db, leadId: string, lineId: string) =>
  trx
    .selectFrom("partLeads")
    .select(["id", "status"])
    .where("id", "=", leadId)
    .where("lineId", "=", lineId)
    .executeTakeFirst();

export const secureLead = (trx: Db, leadId: string) =>
  trx
    .updateTable("partLeads")
    .set({ status: "secured", version: sql`version + 1`, updatedAt: sql`now()` })
    .where("id", "=", leadId)
    .execute();

export const hasAcquisition = async (trx: Db, lineId: string) =>
  !!(await trx.selectFrom("partAcquisitions").select("id").where("lineId", "=", lineId).executeTakeFirst());

export const insertAcquisitionRow = (trx: Db, v: Insertable<Database["partAcquisitions"]>) =>
  trx.insertInto("partAcquisitions").values(v).returningAll().executeTakeFirstOrThrow();

// ── the demand sync's set-based writes (server/parts/demand.ts chunks them at 1,000 rows) ──

export const withdrawLinks = (trx: Db, linkIds: string[]) =>
  trx
    .updateTable("partDemandLinks")
    .set({ active: false, withdrawnAt: sql`now()` })
    .where("id", "in", linkIds)
    .execute();

export const insertLines = (trx: Db, rows: Insertable<PartLinesTable>[]) =>
  trx.insertInto("partLines").values(rows).execute();

export const insertLinks = (trx: Db, rows: Insertable<Database["partDemandLinks"]>[]) =>
  trx.insertInto("partDemandLinks").values(rows).execute();

/** Lines the sync closed come back when demand returns: to "lead found" when a live lead exists. */
export const reopenAutoCancelled = (trx: Db, lineIds: string[]) =>
  trx
    .updateTable("partLines as pl")
    .set({
      status: sql`case when exists (select 1 from part_leads pd where pd.line_id = pl.id and pd.status <> 'dead') then 'lead_found' else 'wanted' end`,
      autoCancelled: false,
      cancelReason: "",
      version: sql`pl.version + 1`,
      updatedAt: sql`now()`,
    })
    .where("pl.id", "in", lineIds)
    .where("pl.status", "=", "cancelled")
    .where("pl.autoCancelled", "=", true)
    .returning(["pl.id", "pl.status"])
    .execute();

/**
 * Register lines still at wanted / lead found with no demand left close themselves; bought parts stay (as
 * spares). Only `lineIds` are looked at (the lines a sync took links from), or every line of the site when null.
 */
export const cancelEmptyRegisterLines = async (trx: Db, siteId: string, lineIds: readonly string[] | null) =>
  lineIds && !lineIds.length
    ? []
    : (
        await sql<{ id: string; fromStatus: PartStatus }>`
    with empty as (
      select pl.id, pl.status from part_lines pl
      where pl.site_id = ${siteId} ${lineIds ? sql`and pl.id = any(${[...new Set(lineIds)].sort()}::uuid[])` : sql``}
        and pl.origin = 'register' and pl.manual_qty = 0 and pl.status in ('wanted', 'lead_found')
        and not exists (select 1 from part_demand_links l where l.line_id = pl.id and l.active)
      for update
    )
    update part_lines pl set status = 'cancelled', auto_cancelled = true, cancel_reason = 'No longer wanted: nothing on the register asks for it.',
      version = pl.version + 1, updated_at = now()
    from empty where pl.id = empty.id
    returning pl.id, empty.status as "fromStatus"`.execute(trx)
      ).rows;

export const insertHistoryRows = (trx: Db, rows: Insertable<Database["partLineHistory"]>[]) =>
  trx.insertInto("partLineHistory").values(rows).execute();

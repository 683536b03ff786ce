import { sql, type Compilable, type Expression, type SelectQueryBuilder, type SqlBool } from "kysely";
import type { Database } from "../../db/types";
import { ACTIVE_STATUSES } from "../../src/domain/defect-workflow";
import type { Flag, ListQuery, SortKey } from "../../src/schemas/defects";
import type { Db } from "../db";
import { statementCache } from "../statement-cache";

/** The joins every register read uses: board, section, position, assignee, active pin and its target. */
export function registerBase(db: Db, siteId: string) {
  return db
    .selectFrom("defects as d")
    .innerJoin("boards as b", "b.id", "d.boardId")
    .leftJoin("sections as s", "s.id", "d.sectionId")
    .leftJoin("positions as p", "p.id", "d.positionId")
    .leftJoin("users as a", "a.id", "d.assigneeId")
    .leftJoin("defectPins as pin", (j) => j.onRef("pin.defectId", "=", "d.id").on("pin.removedAt", "is", null))
    .leftJoin("defects as t", "t.id", "pin.relativeTo")
    .where("d.siteId", "=", siteId);
}

/** The count needs no join but the pin, and that only when filtering on pinned defects. */
function countBase(db: Db, s: RegisterShape, v: RegisterValues) {
  const q = db.selectFrom("defects as d").where("d.siteId", "=", v.siteId);
  return s.flags.includes("pinned")
    ? q.leftJoin("defectPins as pin", (j) => j.onRef("pin.defectId", "=", "d.id").on("pin.removedAt", "is", null))
    : q;
}

/**
 * A sorted page's ids need only the joins its sort and filters name: the board for "board", the position
 * for "position", the assignee for "assignee", the pin for the "pinned" flag. Without the others the
 * planner can walk a (site_id, key) index in order and stop at the page (the board's inner join drops
 * no row: `defects.board_id` is NOT NULL and references boards), instead of joining every defect first
 * and sorting the lot.
 */
function sortedIdsBase(db: Db, s: RegisterShape, v: RegisterValues) {
  // The sort expressions name these aliases; each join is left out when its alias is not used.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- see DefectsQuery below
  let q: any = countBase(db, s, v);
  if (s.sort === "board") q = q.innerJoin("boards as b", "b.id", "d.boardId");
  if (s.sort === "position") q = q.leftJoin("positions as p", "p.id", "d.positionId");
  if (s.sort === "assignee") q = q.leftJoin("users as a", "a.id", "d.assigneeId");
  return q as DefectsQuery;
}

export const ROW_COLUMNS = [
  "d.id",
  "d.ref",
  "d.siteId",
  "d.boardId",
  "b.name as boardName",
  "d.sectionId",
  "s.name as sectionName",
  "d.positionId",
  "p.designation",
  "d.componentId",
  "d.inspectionId",
  "d.title",
  "d.description",
  "d.category",
  "d.severity",
  "d.status",
  "d.statusReason",
  "d.safetyCritical",
  "d.blocksEnergisation",
  "d.effortHours",
  "d.costEstimate",
  "d.partsNeeded",
  "d.partsState",
  "d.assigneeId",
  "a.name as assigneeName",
  "d.dueOn",
  "d.repairedBy",
  "d.verifiedBy",
  "d.createdBy",
  "d.priorityScore",
  "pin.direction as pinned",
  "d.version",
  "d.createdAt",
  "d.updatedAt",
  "d.closedAt",
] as const;
/** ROW_COLUMNS for a DefectsQuery (Kysely cannot check the names against an untyped query). */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- see DefectsQuery below
export const ROW_SELECTION = ROW_COLUMNS as any;

/**
 * Any select over `defects as d` (the register page, its count, its CSV cursor, the bench): their joins
 * differ, and Kysely has no one type for "a query with d in scope", so the helpers take and give it untyped.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- see above
type DefectsQuery = SelectQueryBuilder<any, any, any>;

/** LIKE pattern for a free-text search, with the user's % and _ taken literally. */
const likePattern = (q: string) => `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

/**
 * What chooses a register statement's SQL (its shape): sort, direction, flags, and (in `RegisterValues`) which
 * values are given and how many. Statements of one shape differ only in their parameters, so each shape is compiled
 * once (server/statement-cache.ts).
 */
export interface RegisterShape {
  sort: SortKey;
  dir: "asc" | "desc";
  flags: readonly Flag[];
}

/**
 * The values of a register statement, each only ever a parameter: the builders below never let one choose SQL
 * (whether one is null, and an array's length, do: both are part of the shape's key).
 */
export interface RegisterValues {
  [name: string]: string | number | null | readonly string[];
  siteId: string;
  today: string;
  /** The search as a LIKE pattern; null without a search. */
  pattern: string | null;
  /** The defect reference the search names ("D-12", "12"); null when it names none. */
  ref: number | null;
  board: readonly string[];
  category: readonly string[];
  severity: readonly string[];
  status: readonly string[];
  /** Assignees by id; "none" (unassigned) is `unassigned` below. */
  assigneeIds: readonly string[];
  /** The assignee filter asks for unassigned defects: non-null (its value unused) exactly when it does. */
  unassigned: string | null;
  /** Rows each branch of the ranked page reads: (page + 1) × size. */
  want: number;
  size: number;
  offset: number;
}

/** A register query's shape and values. */
export function registerArgs(
  siteId: string,
  f: ListQuery,
  today: string,
): { shape: RegisterShape; values: RegisterValues } {
  const refMatch = f.q ? /^d?-?(\d{1,12})$/i.exec(f.q) : null;
  return {
    shape: { sort: f.sort, dir: f.dir, flags: f.flag },
    values: {
      siteId,
      today,
      pattern: f.q ? likePattern(f.q) : null,
      ref: refMatch ? Number(refMatch[1]) : null,
      board: f.board,
      category: f.category,
      severity: f.severity,
      status: f.status,
      assigneeIds: f.assignee.filter((a) => a !== "none"),
      unassigned: f.assignee.includes("none") ? "none" : null,
      want: (f.page + 1) * f.size,
      size: f.size,
      offset: f.page * f.size,
    },
  };
}

/** The register's filters (`filterBy` for a query already split into shape and values). */
export function applyFilters<QB extends DefectsQuery>(qb: QB, f: ListQuery, today: string, siteId: string): QB {
  const { shape, values } = registerArgs(siteId, f, today);
  return filterBy(qb, shape, values);
}

function filterBy<QB extends DefectsQuery>(qb: QB, s: RegisterShape, v: RegisterValues): QB {
  let q = qb as DefectsQuery;
  if (v.pattern !== null) {
    const pat = v.pattern;
    const ref = v.ref;
    // Every branch is index-served, so PostgreSQL ORs bitmap index scans instead of testing each
    // defect joined to its position: the defect text by its trigram index, the designation as the
    // matching positions' ids (trigram index on positions, computed once as an array) against
    // defects_position_id_idx, the reference by its own index.
    q = q.where((eb) => {
      const ors: Expression<SqlBool>[] = [
        sql<SqlBool>`(d.title || ' ' || d.description) ILIKE ${pat}`,
        sql<SqlBool>`d.position_id = ANY(ARRAY(SELECT sp.id FROM positions sp WHERE sp.site_id = ${v.siteId} AND sp.designation ILIKE ${pat}))`,
      ];
      if (ref !== null) ors.push(eb("d.ref", "=", ref));
      return eb.or(ors);
    });
  }
  if (v.board.length) q = q.where("d.boardId", "in", v.board);
  if (v.category.length) q = q.where("d.category", "in", v.category);
  if (v.severity.length) q = q.where("d.severity", "in", v.severity);
  if (v.status.length) q = q.where("d.status", "in", v.status);
  if (v.assigneeIds.length || v.unassigned !== null) {
    const ids = v.assigneeIds;
    const none = v.unassigned !== null;
    q = q.where((eb) =>
      eb.or([
        ...(ids.length ? [eb("d.assigneeId", "in", ids)] : []),
        ...(none ? [eb("d.assigneeId", "is", null)] : []),
      ]),
    );
  }
  for (const flag of s.flags) {
    if (flag === "safety") q = q.where("d.safetyCritical", "=", true);
    if (flag === "blocking") q = q.where("d.blocksEnergisation", "=", true);
    if (flag === "pinned") q = q.where("pin.id", "is not", null);
    if (flag === "unassigned") q = q.where("d.assigneeId", "is", null);
    if (flag === "overdue")
      q = q.where("d.dueOn", "<", v.today).where("d.status", "not in", ["closed", "deferred", "accepted_as_is"]);
  }
  return q as QB;
}

const SEVERITY_ORDER = sql`array_position(ARRAY['cosmetic','degraded','impaired','disabling']::text[], d.severity)`;
const STATUS_ORDER = sql`array_position(ARRAY['raised','scheduled','under_repair','awaiting_retest','closed','deferred','accepted_as_is']::text[], d.status)`;
/**
 * The ranked order as ORDER BY keys (for "priority desc"), equal to rankDefects() of
 * src/domain/priority.ts for non-chained pins: a pinned defect takes its target's key
 * (open work first, safety-critical first, score desc, created asc, id asc) and sits just before (above) or after (below) it;
 * several "above" pins keep their own order, several "below" pins the reverse of it.
 * No window over the whole site: only the page's rows are sorted by keys, not ranks.
 */
const BELOW = sql`(t.id IS NOT NULL AND pin.direction = 'below')`;
/**
 * Settled — not open work (`ACTIVE_STATUSES`): false for open work, which ranks first (Rankable's `settled`). The
 * statuses are written into the SQL as constants, in the words of the index `defects_site_open_rank_idx`
 * (migration 2026_12_14_0100), so PostgreSQL matches the index's expression; tests/server/defects-register.api.test.ts
 * checks that the ranked page is read from that index in order.
 */
const settled = (alias: "d" | "t") =>
  sql<boolean>`(${sql.ref(`${alias}.status`)} NOT IN (${sql.join(ACTIVE_STATUSES.map((x) => sql.lit(x)))}))`;
export const RANK_KEYS: Array<[ReturnType<typeof sql>, "ASC" | "DESC"]> = [
  // Open work first, then safety-critical first: compareByPriority's first two terms.
  [sql`coalesce(${settled("t")}, ${settled("d")})`, "ASC"],
  [sql`coalesce(t.safety_critical, d.safety_critical)`, "DESC"],
  [sql`coalesce(t.priority_score, d.priority_score)`, "DESC"],
  [sql`coalesce(t.created_at, d.created_at)`, "ASC"],
  [sql`coalesce(t.id, d.id)`, "ASC"],
  [sql`CASE WHEN t.id IS NULL THEN 0 WHEN pin.direction = 'above' THEN -1 ELSE 1 END`, "ASC"],
  [sql`CASE WHEN ${BELOW} THEN NOT ${settled("d")} ELSE ${settled("d")} END`, "ASC"],
  [sql`CASE WHEN ${BELOW} THEN NOT d.safety_critical ELSE d.safety_critical END`, "DESC"],
  [sql`CASE WHEN ${BELOW} THEN -d.priority_score ELSE d.priority_score END`, "DESC"],
  [sql`CASE WHEN ${BELOW} THEN NULL ELSE d.created_at END`, "ASC"],
  [sql`CASE WHEN ${BELOW} THEN d.created_at END`, "DESC"],
  [sql`CASE WHEN ${BELOW} THEN NULL ELSE d.id END`, "ASC"],
  [sql`CASE WHEN ${BELOW} THEN d.id END`, "DESC"],
];
const flip = (d: "ASC" | "DESC") => (d === "ASC" ? "DESC" : "ASC");
/** "k1 DIR, k2 DIR, …" for the ranked order, reversed when `reverse`. */
export const rankOrderSql = (reverse: boolean) =>
  sql.join(RANK_KEYS.map(([e, d]) => sql`${e} ${sql.raw(reverse ? flip(d) : d)}`));

const SORT_EXPR: Record<Exclude<SortKey, "priority">, ReturnType<typeof sql>> = {
  ref: sql`d.ref`,
  title: sql`lower(d.title)`,
  board: sql`lower(b.name)`,
  position: sql`lower(p.designation)`,
  category: sql`d.category`,
  severity: SEVERITY_ORDER,
  status: STATUS_ORDER,
  assignee: sql`lower(a.name)`,
  dueOn: sql`d.due_on`,
  effortHours: sql`d.effort_hours`,
  costEstimate: sql`d.cost_estimate`,
  createdAt: sql`d.created_at`,
  updatedAt: sql`d.updated_at`,
};

/** Sort keys whose expression is never NULL (NOT NULL columns; severity and status are checked against the lists). */
const NEVER_NULL = new Set<SortKey>([
  "ref",
  "title",
  "board",
  "category",
  "severity",
  "status",
  "createdAt",
  "updatedAt",
]);

/**
 * ORDER BY for a register sort. "priority desc" is the ranked order (highest first);
 * every other key sorts its column with blanks last, then by reference for a stable page.
 */
export function applySort<QB extends DefectsQuery>(qb: QB, sort: SortKey, dir: "asc" | "desc"): QB {
  const q = qb as DefectsQuery;
  if (sort === "priority") {
    let out = q;
    for (const [e, d] of RANK_KEYS) out = out.orderBy(sql`${e} ${sql.raw(dir === "desc" ? d : flip(d))}`);
    return out as QB;
  }
  // A key that is never NULL sorts the same with or without NULLS LAST; left out, a plain (site_id, key, ref)
  // index serves both directions (forward for ASC, backward for DESC), a page then being an index walk.
  const nulls = NEVER_NULL.has(sort) ? sql`` : sql` NULLS LAST`;
  const d = dir === "asc" ? sql`ASC${nulls}` : sql`DESC${nulls}`;
  return q.orderBy(sql`${SORT_EXPR[sort]} ${d}`).orderBy(sql`d.ref ${dir === "asc" ? sql`ASC` : sql`DESC`}`) as QB;
}

/** True when the query filters by nothing but board, status and severity: the keys `defect_tallies` keeps. */
const tallied = (s: RegisterShape, v: RegisterValues) =>
  v.pattern === null && !v.category.length && !v.assigneeIds.length && v.unassigned === null && !s.flags.length;

/**
 * How many defects match `f`. Filtered by nothing but board, status and severity (the default view,
 * a board's or a status's view), it is the sum of `defect_tallies`' rows — kept by triggers on every
 * write of `defects`, so exact — at most boards × 7 × 4 rows a site however many defects it holds.
 * Any other filter counts the matching defects.
 */
function countQuery(db: Db, s: RegisterShape, v: RegisterValues) {
  if (tallied(s, v)) {
    let q = db
      .selectFrom("defectTallies as dt")
      .where("dt.siteId", "=", v.siteId)
      .select(sql<number>`coalesce(sum(dt.n), 0)::int`.as("n"));
    if (v.board.length) q = q.where("dt.boardId", "in", v.board);
    if (v.status.length) q = q.where("dt.status", "in", v.status);
    if (v.severity.length) q = q.where("dt.severity", "in", v.severity);
    return q;
  }
  return filterBy(countBase(db, s, v), s, v).select((eb) => eb.fn.countAll<number>().as("n"));
}

/** How many defects match `f` (a CSV's progress). */
export const registerCount = async (db: Db, siteId: string, f: ListQuery, today: string) => {
  const { shape, values } = registerArgs(siteId, f, today);
  return Number((await countQuery(db, shape, values).executeTakeFirstOrThrow()).n);
};

/**
 * The ids of one page in the ranked order, index-served. Defects no pin moves rank by
 * their own keys — settled, safety-critical, score, created, id — which the index
 * `defects_site_open_rank_idx` (migration 2026_12_14_0100) returns in order, so that branch
 * stops after the page's last row instead of sorting the whole site; the few pinned defects take
 * their target's keys (RANK_KEYS) in a second branch. Both branches compute the same thirteen keys
 * the single query ordered by, so the merged order — and every tie — is exactly the ranked order
 * of `rankDefects()` (tests/server/defects*.api.test.ts check it on pinned data).
 */
function rankedPageIds(db: Db, s: RegisterShape, v: RegisterValues) {
  const reverse = s.dir !== "desc";
  const want = v.want;
  const dir = (d: "ASC" | "DESC") => sql.raw(reverse ? flip(d) : d);
  const keyNames = RANK_KEYS.map((_, i) => `k${i + 1}`);
  // Unpinned: every rank key reduces to the defect's own (t is NULL; see RANK_KEYS).
  const ownKeys = [
    settled("d"),
    sql`d.safety_critical`,
    sql`d.priority_score`,
    sql`d.created_at`,
    sql`d.id`,
    sql`0`,
    settled("d"),
    sql`d.safety_critical`,
    sql`d.priority_score`,
    sql`d.created_at`,
    sql`NULL::timestamptz`,
    sql`d.id`,
    sql`NULL::uuid`,
  ];
  // "No active pin" as NOT EXISTS: an anti join by nested loop keeps the index's order, so the LIMIT stops
  // the walk after the page. (As a left join filtered on pin.id IS NULL the planner hashed it, which loses
  // the order, and sorted every defect of the site.) The "pinned" flag needs pin in scope: no row here.
  const own = filterBy(
    s.flags.includes("pinned")
      ? db
          .selectFrom("defects as d")
          .leftJoin("defectPins as pin", (j) => j.onRef("pin.defectId", "=", "d.id").on("pin.removedAt", "is", null))
          .where("d.siteId", "=", v.siteId)
          .where("pin.id", "is", null)
      : db
          .selectFrom("defects as d")
          .where("d.siteId", "=", v.siteId)
          .where(({ not, exists, selectFrom }) =>
            not(
              exists(
                selectFrom("defectPins as np")
                  .select("np.id")
                  .whereRef("np.defectId", "=", "d.id")
                  .where("np.removedAt", "is", null),
              ),
            ),
          ),
    s,
    v,
  )
    .select((eb) => [eb.ref("d.id").as("id"), ...ownKeys.map((k, i) => k.as(keyNames[i]))])
    .orderBy(
      sql`${settled("d")} ${dir("ASC")}, d.safety_critical ${dir("DESC")}, d.priority_score ${dir("DESC")}, d.created_at ${dir("ASC")}, d.id ${dir("ASC")}`,
    )
    .limit(want);
  const pinned = filterBy(registerBase(db, v.siteId).where("pin.id", "is not", null), s, v)
    .select((eb) => [eb.ref("d.id").as("id"), ...RANK_KEYS.map(([k], i) => k.as(keyNames[i]))])
    .orderBy(rankOrderSql(reverse))
    .limit(want);
  return db
    .selectFrom(
      db
        .selectFrom(own.as("o"))
        .selectAll()
        .unionAll(db.selectFrom(pinned.as("p")).selectAll())
        .as("u"),
    )
    .select("u.id")
    .orderBy(sql.join(RANK_KEYS.map(([, d], i) => sql`${sql.ref(`u.${keyNames[i]}`)} ${dir(d)}`)))
    .limit(v.size)
    .offset(v.offset);
}

/**
 * The register's page plus the total under the same filters, as one statement: the page is found
 * first as ids only (narrow sort, often an index scan; `ARRAY(…)` keeps that order), the rows are
 * then read by primary key in that order (`unnest … WITH ORDINALITY`), and the total is a scalar
 * subquery computed once beside them. It was three statements (ids and count side by side, then the
 * rows by `d.id IN (…)`, ordered again in Node): each statement costs the server a pool checkout, a
 * query sent and an answer parsed, about a third of the register's CPU per request (DEVELOPERS.md,
 * "CPU per register request"). A page past the end has no row to carry the total: only then is the
 * count asked on its own.
 */
export async function listPage(db: Db, siteId: string, f: ListQuery, today: string) {
  const { shape, values } = registerArgs(siteId, f, today);
  const { rows } = await db.executeQuery(registerPageStatement.compile(db, shape, values));
  if (!rows.length) {
    // Page 0 empty: nothing matches. A page past the end: the count alone.
    const total = f.page === 0 ? 0 : Number((await countQuery(db, shape, values).executeTakeFirstOrThrow()).n);
    return { rows: [] as RegisterRow[], total };
  }
  return { rows: rows.map(({ total: _, ...r }) => r as RegisterRow), total: Number(rows[0].total) };
}

/** The page's statement (`listPage`), compiled once per shape (exported for its test). */
export const registerPageStatement = statementCache((db: Db, s: RegisterShape, v: RegisterValues) => {
  const idsQ =
    s.sort === "priority"
      ? rankedPageIds(db, s, v)
      : applySort(filterBy(sortedIdsBase(db, s, v), s, v), s.sort, s.dir)
          .select("d.id")
          .limit(v.size)
          .offset(v.offset);
  return registerBase(db, v.siteId)
    .innerJoin(
      sql<{ id: string; n: number }>`(SELECT x.id, x.n FROM unnest(ARRAY${idsQ}) WITH ORDINALITY AS x(id, n))`.as("o"),
      (j) => j.onRef("o.id", "=", "d.id"),
    )
    .select(ROW_SELECTION)
    .select(countQuery(db, s, v).as("total"))
    .orderBy(sql`o.n`) as unknown as Compilable<RegisterRow & { total: number }>;
});

/** The filtered, sorted register without paging (CSV export runs it through a cursor). */
export const registerQuery = (db: Db, siteId: string, f: ListQuery, today: string) =>
  applySort(applyFilters(registerBase(db, siteId), f, today, siteId), f.sort, f.dir).select(ROW_SELECTION);

export type RegisterRow = {
  id: string;
  ref: number;
  siteId: string;
  boardId: string;
  boardName: string;
  sectionId: string | null;
  sectionName: string | null;
  positionId: string | null;
  designation: string | null;
  componentId: string | null;
  inspectionId: string | null;
  title: string;
  description: string;
  category: Database["defects"]["category"];
  severity: Database["defects"]["severity"];
  status: import("../../src/domain/vocab").DefectStatus;
  statusReason: string;
  safetyCritical: boolean;
  blocksEnergisation: boolean;
  effortHours: number | null;
  costEstimate: number | null;
  partsNeeded: string;
  partsState: "none_needed" | "in_hand" | "wanted" | "unobtainable";
  assigneeId: string | null;
  assigneeName: string | null;
  dueOn: string | null;
  repairedBy: string | null;
  verifiedBy: string | null;
  createdBy: string | null;
  priorityScore: number;
  pinned: "above" | "below" | null;
  version: number;
  createdAt: Date;
  updatedAt: Date;
  closedAt: Date | null;
};

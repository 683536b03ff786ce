import { sql, type Expression, type SelectQueryBuilder, type SqlBool } from "kysely";
import type { Database } from "../../db/types";
import type { ListQuery, SortKey } from "../../src/schemas/defects";
import type { Db } from "../db";

/** The joins every register read uses: board, section, position, assignee, active pin. */
export function registerBase(db: Db, siteId: string, withRank: boolean) {
  const start = withRank
    ? db.with("ranked", (qb) =>
        qb
          .selectFrom("defects")
          .select(["id", sql<number>`row_number() over (order by priority_score desc, created_at, id)`.as("rn")])
          .where("siteId", "=", siteId),
      )
    : db;
  let q = (start as Db)
    .selectFrom("defects as d")
    .innerJoin("boards as b", "b.id", "d.boardId")
    .leftJoin("sections as s", "s.id", "d.sectionId")
    .leftJoin("positions as p", "p.id", "d.positionId")
    .leftJoin("users as a", "a.id", "d.assigneeId")
    .leftJoin("defectPins as pin", (j) => j.onRef("pin.defectId", "=", "d.id").on("pin.removedAt", "is", null))
    .where("d.siteId", "=", siteId);
  if (withRank)
    q = (q as any).leftJoin("ranked as r", "r.id", "d.id").leftJoin("ranked as tr", "tr.id", "pin.relativeTo");
  return q;
}
type Base = ReturnType<typeof registerBase>;

export const ROW_COLUMNS = [
  "d.id", "d.ref", "d.siteId", "d.boardId", "b.name as boardName", "d.sectionId", "s.name as sectionName",
  "d.positionId", "p.designation", "d.componentId", "d.inspectionId", "d.title", "d.description",
  "d.category", "d.severity", "d.status", "d.statusReason", "d.safetyCritical", "d.blocksEnergisation",
  "d.effortHours", "d.costEstimate", "d.partsNeeded", "d.partsState", "d.assigneeId", "a.name as assigneeName",
  "d.dueOn", "d.repairedBy", "d.verifiedBy", "d.createdBy", "d.priorityScore", "pin.direction as pinned",
  "d.version", "d.createdAt", "d.updatedAt", "d.closedAt",
] as const;

/** LIKE pattern for a free-text search, with the user's % and _ taken literally. */
const likePattern = (q: string) => `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

export function applyFilters<QB extends SelectQueryBuilder<any, any, any>>(qb: QB, f: ListQuery, today: string): QB {
  let q = qb as SelectQueryBuilder<any, any, any>;
  if (f.q) {
    const pat = likePattern(f.q);
    const refMatch = /^d?-?(\d{1,12})$/i.exec(f.q);
    q = q.where((eb) => {
      const ors: Expression<SqlBool>[] = [
        sql<SqlBool>`(d.title || ' ' || d.description) ILIKE ${pat}`,
        sql<SqlBool>`p.designation ILIKE ${pat}`,
      ];
      if (refMatch) ors.push(eb("d.ref", "=", Number(refMatch[1])));
      return eb.or(ors);
    });
  }
  if (f.board.length) q = q.where("d.boardId", "in", f.board);
  if (f.category.length) q = q.where("d.category", "in", f.category);
  if (f.severity.length) q = q.where("d.severity", "in", f.severity);
  if (f.status.length) q = q.where("d.status", "in", f.status);
  if (f.assignee.length) {
    const ids = f.assignee.filter((a) => a !== "none");
    const none = f.assignee.includes("none");
    q = q.where((eb) => eb.or([...(ids.length ? [eb("d.assigneeId", "in", ids)] : []), ...(none ? [eb("d.assigneeId", "is", null)] : [])]));
  }
  for (const flag of f.flag) {
    if (flag === "safety") q = q.where("d.safetyCritical", "=", true);
    if (flag === "blocking") q = q.where("d.blocksEnergisation", "=", true);
    if (flag === "pinned") q = q.where("pin.id", "is not", null);
    if (flag === "unassigned") q = q.where("d.assigneeId", "is", null);
    if (flag === "overdue")
      q = q.where("d.dueOn", "<", today).where("d.status", "not in", ["closed", "deferred", "wont_fix"]);
  }
  return q as QB;
}

const SEVERITY_ORDER = sql`array_position(ARRAY['cosmetic','degraded','impaired','disabling']::text[], d.severity)`;
const STATUS_ORDER = sql`array_position(ARRAY['open','triaged','in_repair','awaiting_verification','closed','deferred','wont_fix']::text[], d.status)`;
/** Effective rank with pins: a pinned defect takes its target's place, half a step above or below. */
export const RANK_KEY = sql<number>`CASE WHEN tr.rn IS NULL THEN r.rn::numeric ELSE tr.rn + CASE pin.direction WHEN 'above' THEN -0.5 ELSE 0.5 END END`;
/** Among several pinned to one target, "below" pins land nearest the target last-in-first (as rankDefects). */
export const RANK_TIE = sql<number>`CASE WHEN tr.rn IS NOT NULL AND pin.direction = 'below' THEN -r.rn ELSE r.rn END`;

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

/**
 * ORDER BY for a register sort. "priority desc" is the ranked order (highest first);
 * every other key sorts its column with blanks last, then by reference for a stable page.
 */
export function applySort<QB extends SelectQueryBuilder<any, any, any>>(qb: QB, sort: SortKey, dir: "asc" | "desc"): QB {
  const q = qb as SelectQueryBuilder<any, any, any>;
  if (sort === "priority") {
    const d = dir === "desc" ? sql`ASC` : sql`DESC`;
    return q.orderBy(sql`${RANK_KEY} ${d}`).orderBy(sql`${RANK_TIE} ${d}`).orderBy("d.id") as QB;
  }
  const d = dir === "asc" ? sql`ASC NULLS LAST` : sql`DESC NULLS LAST`;
  return q.orderBy(sql`${SORT_EXPR[sort]} ${d}`).orderBy(sql`d.ref ${dir === "asc" ? sql`ASC` : sql`DESC`}`) as QB;
}

/** The register's page plus the total under the same filters. */
export async function listPage(db: Db, siteId: string, f: ListQuery, today: string) {
  const rowsQ = applySort(applyFilters(registerBase(db, siteId, f.sort === "priority") as Base, f, today), f.sort, f.dir)
    .select(ROW_COLUMNS as any)
    .limit(f.size)
    .offset(f.page * f.size);
  const countQ = applyFilters(registerBase(db, siteId, false), f, today).select((eb) => eb.fn.countAll<number>().as("n"));
  const [rows, count] = await Promise.all([rowsQ.execute(), countQ.executeTakeFirstOrThrow()]);
  return { rows: rows as RegisterRow[], total: Number(count.n) };
}

/** The filtered, sorted register without paging (CSV export runs it through a cursor). */
export const registerQuery = (db: Db, siteId: string, f: ListQuery, today: string) =>
  applySort(applyFilters(registerBase(db, siteId, f.sort === "priority") as Base, f, today), f.sort, f.dir).select(ROW_COLUMNS as any);

export type RegisterRow = {
  id: string; ref: number; siteId: string; boardId: string; boardName: string; sectionId: string | null; sectionName: string | null;
  positionId: string | null; designation: string | null; componentId: string | null; inspectionId: string | null;
  title: string; description: string; category: Database["defects"]["category"]; severity: Database["defects"]["severity"];
  status: import("../../src/domain/vocab").DefectStatus; statusReason: string; safetyCritical: boolean; blocksEnergisation: boolean;
  effortHours: number | null; costEstimate: number | null; partsNeeded: string; partsState: "none_needed" | "in_hand" | "wanted" | "unobtainable";
  assigneeId: string | null; assigneeName: string | null; dueOn: string | null; repairedBy: string | null; verifiedBy: string | null;
  createdBy: string | null; priorityScore: number; pinned: "above" | "below" | null; version: number;
  createdAt: Date; updatedAt: Date; closedAt: Date | null;
};

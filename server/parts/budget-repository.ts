/**
 * The wanted list's budget, kept by the writes (tables made by migration 2026_12_09_0400): each line's
 * share of each board's estimated and spent (`part_budget_shares`) and their sums per board
 * (`part_budget_boards`). The list reads the sums (one row per board, whatever the site's size);
 * every parts write that changes a line's quantity, links, status, unit cost or acquisitions calls
 * `refreshBudget` for those lines last in its transaction.
 *
 * The rule is the one the list always had (see siteBudget in rows.ts): estimated = unit cost ×
 * quantity on the board; spent = the line's acquisitions shared in proportion to each board's
 * quantity (proportional allocation, common practice); a fitted line counts its fitted links, any
 * other its active ones; a cancelled line counts nothing. Shares are exact numerics, so taking a
 * line's old share off a board's sum and adding its new one gives the very sum a count from
 * scratch gives; rounding to cents happens on the read, as before.
 *
 * Refreshes are serialised per site by an advisory lock of their own (`holdBudget`), taken before the
 * shares are read and held to the commit: a refresh sees every change committed by earlier
 * refreshes, so the last refresh of a line sees its latest state. It is not the demand sync's lock:
 * a line edit holds its line's row while it waits for this one, and the sync takes line rows (to
 * close or reopen lines) before it refreshes, so the two never wait on each other in a circle.
 */
import { sql, type RawBuilder } from "kysely";
import type { Db } from "../db";

/**
 * The site's budget lock, held to the end of the transaction. A status move takes it right after its
 * line and before the custody moves and board summaries it causes, so it never waits for this lock
 * while holding a board's summary lock that a demand sync holding this lock would wait for next.
 */
export const holdBudget = (trx: Db, siteId: string) =>
  sql`select pg_advisory_xact_lock(hashtext(${"parts-budget:" + siteId}))`.execute(trx);

/** Each (line, board) share of the given lines (all the site's lines when `lineIds` is null). */
function sharesOf(siteId: string, lineIds: readonly string[] | null): RawBuilder<unknown> {
  const only = lineIds ? sql`and id = any(${[...lineIds]}::uuid[])` : sql``;
  return sql`
    lines as (
      select id, manual_qty, estimated_unit_cost, status from part_lines where site_id = ${siteId} ${only} and status <> 'cancelled'
    ), q as (
      select l.id as line_id, coalesce(dl.board_id::text, '') as board, dl.qty
      from lines l join part_demand_links dl on dl.line_id = l.id and (case when l.status = 'fitted' then dl.fitted else dl.active end)
      union all
      select id, '', manual_qty from lines where manual_qty > 0
    ), qb as (
      select line_id, board, sum(qty) as qty from q group by line_id, board having sum(qty) > 0
    ), tot as (
      select line_id, sum(qty) as total from qb group by line_id
    ), spent as (
      select a.line_id, sum(a.cost) as spent from part_acquisitions a join lines l on l.id = a.line_id group by a.line_id
    ), per as (
      select qb.line_id, qb.board, coalesce(l.estimated_unit_cost * qb.qty, 0) as estimated,
        coalesce(s.spent, 0) * qb.qty / tot.total as spent, (l.estimated_unit_cost is null)::int as unestimated
      from qb join lines l on l.id = qb.line_id join tot on tot.line_id = qb.line_id left join spent s on s.line_id = qb.line_id
      union all
      select s.line_id, '', 0, s.spent, 0 from spent s where s.spent > 0 and not exists (select 1 from tot where tot.line_id = s.line_id)
    )`;
}

/** Adds the shares of these lines (or of every line of the site) to the kept rows: one statement. */
const addShares = (trx: Db, siteId: string, lineIds: readonly string[] | null) =>
  sql`with ${sharesOf(siteId, lineIds)}, ins as (
      insert into part_budget_shares (line_id, site_id, board, estimated, spent, unestimated)
      select line_id, ${siteId}, board, estimated, spent, unestimated from per
      returning board, estimated, spent, unestimated
    ), d as (
      select board, sum(estimated) as e, sum(spent) as s, sum(unestimated) as u, count(*) as n from ins group by board
    )
    insert into part_budget_boards (site_id, board, estimated, spent, unestimated_lines, shares)
    select ${siteId}, board, e, s, u, n from d
    on conflict (site_id, board) do update set
      estimated = part_budget_boards.estimated + excluded.estimated,
      spent = part_budget_boards.spent + excluded.spent,
      unestimated_lines = part_budget_boards.unestimated_lines + excluded.unestimated_lines,
      shares = part_budget_boards.shares + excluded.shares`.execute(trx);

/**
 * Brings the kept budget in line for these lines, inside the caller's transaction and after its
 * writes: their old shares come off the boards' sums, their current ones go on (two statements
 * and the lock, whatever the site's size; nothing when no line is named).
 */
export async function refreshBudget(trx: Db, siteId: string, lineIds: readonly string[]) {
  const ids = [...new Set(lineIds)];
  if (!ids.length) return;
  await holdBudget(trx, siteId);
  await sql`with old as (
      delete from part_budget_shares where site_id = ${siteId} and line_id = any(${ids}::uuid[])
      returning board, estimated, spent, unestimated
    ), d as (
      select board, sum(estimated) as e, sum(spent) as s, sum(unestimated) as u, count(*) as n from old group by board
    )
    update part_budget_boards b set estimated = b.estimated - d.e, spent = b.spent - d.s,
      unestimated_lines = b.unestimated_lines - d.u, shares = b.shares - d.n
    from d where b.site_id = ${siteId} and b.board = d.board`.execute(trx);
  await addShares(trx, siteId, ids);
}

/** Counts the whole site's budget again from its lines (after a seed or a bulk load wrote the parts tables directly). */
export async function rebuildBudget(trx: Db, siteId: string) {
  await holdBudget(trx, siteId);
  await sql`delete from part_budget_shares where site_id = ${siteId}`.execute(trx);
  await sql`delete from part_budget_boards where site_id = ${siteId}`.execute(trx);
  await addShares(trx, siteId, null);
}

/** Estimated and spent per board ('' = not tied to a board), rounded to cents: the kept sums, one row a board. */
export const keptBudget = (db: Db, siteId: string) =>
  sql<{ boardId: string; estimated: number; spent: number; unestimatedLines: number }>`
    select board as "boardId", round(estimated, 2)::float8 as estimated, round(spent, 2)::float8 as spent,
      unestimated_lines as "unestimatedLines"
    from part_budget_boards where site_id = ${siteId} and shares > 0
    order by board = '', board`.execute(db);

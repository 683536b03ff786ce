/**
 * Per-board counts for the site overview and the board list, in `board_summaries`:
 * one row per board × facet × key (see migration 2026_12_05_0300 for the facets). This module is
 * the table's only writer. Every inventory write that changes what the overview counts — a
 * position created or deleted, an inspection, a disposition, a custody move, a heritage change, a
 * CSV import — calls `refreshBoardSummaries` for the boards it touched, last in its transaction.
 *
 * A refresh recomputes those boards' rows with one grouped statement over their positions (cost ∝
 * the boards' positions, never the site's). It first takes a transaction-scoped advisory lock per
 * board (in id order), so two writers of one board refresh one after the other: the second one's
 * statements start after the first has committed and so count both changes (READ COMMITTED takes
 * a fresh snapshot per statement).
 */
import { sql } from "kysely";
import type { Db } from "../db";

export async function refreshBoardSummaries(trx: Db, boardIds: Iterable<string | null | undefined>) {
  const ids = [...new Set([...boardIds].filter((id): id is string => !!id))].sort();
  if (!ids.length) return;
  // unnest keeps the array's (sorted) order, so every writer takes the locks in the same order.
  await sql`SELECT pg_advisory_xact_lock(hashtext('tideline.board-summaries'), hashtext(id))
    FROM unnest(${ids}::text[]) AS id`.execute(trx);
  await trx.deleteFrom("boardSummaries").where("boardId", "in", ids).execute();
  // The same definitions as overviewResponse (src/schemas/inventory.ts): a position counts once, with
  // its one current component (components_current_uq) and that component's newest inspection.
  await sql`WITH pos AS MATERIALIZED (
      SELECT p.board_id, p.site_id, c.disposition, c.custody, l.astm_grade AS grade,
        EXISTS (SELECT 1 FROM inspections i WHERE i.position_id = p.id) AS surveyed,
        coalesce(c.heritage = 'original' AND c.custody NOT IN ('scrapped', 'missing'), false) AS retained
      FROM positions p
      LEFT JOIN components c ON c.position_id = p.id AND c.retired_at IS NULL
      LEFT JOIN LATERAL (
        SELECT i.astm_grade FROM inspections i WHERE i.component_id = c.id
        ORDER BY i.inspected_at DESC, i.created_at DESC, i.id DESC LIMIT 1
      ) l ON true
      WHERE p.board_id = ANY(${ids}::uuid[])
    )
    INSERT INTO board_summaries (board_id, site_id, facet, key, surveyed, n)
    SELECT board_id, site_id, 'positions', '', surveyed, count(*) FROM pos GROUP BY 1, 2, 5
    UNION ALL SELECT board_id, site_id, 'disposition', coalesce(disposition, 'undecided'), surveyed, count(*)
      FROM pos GROUP BY 1, 2, 4, 5
    UNION ALL SELECT board_id, site_id, 'custody', coalesce(custody, 'none'), false, count(*) FROM pos GROUP BY 1, 2, 4
    UNION ALL SELECT board_id, site_id, 'grade', coalesce(grade::text, 'ungraded'), false, count(*) FROM pos GROUP BY 1, 2, 4
    UNION ALL SELECT board_id, site_id, 'retained', CASE WHEN retained THEN 'yes' ELSE 'no' END, false, count(*)
      FROM pos GROUP BY 1, 2, 4`.execute(trx);
}

/** The boards of these positions (those still there). */
export async function refreshSummariesOfPositions(trx: Db, positionIds: string[]) {
  if (!positionIds.length) return;
  const rows = await trx.selectFrom("positions").select("boardId").distinct().where("id", "in", positionIds).execute();
  await refreshBoardSummaries(
    trx,
    rows.map((r) => r.boardId),
  );
}

/** Every board of the site: for writers that load a whole site at once (the bench's generated site). */
export async function refreshSiteSummaries(trx: Db, siteId: string) {
  const rows = await trx.selectFrom("boards").select("id").where("siteId", "=", siteId).execute();
  await refreshBoardSummaries(
    trx,
    rows.map((r) => r.id),
  );
}

export interface Tally {
  boardId: string | null;
  facet: "positions" | "disposition" | "custody" | "grade" | "retained";
  key: string;
  surveyed: boolean;
  n: number;
}

/** The site's summary rows summed over boards, except the per-board position counts (the overview). */
export const summaryTallies = (db: Db, siteId: string) =>
  sql<Tally>`select case when facet = 'positions' then board_id end as "boardId", facet, key, surveyed,
      sum(n)::int as n
    from board_summaries where site_id = ${siteId}
    group by 1, facet, key, surveyed`.execute(db);

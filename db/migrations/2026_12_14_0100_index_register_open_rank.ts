import { Kysely, sql } from "kysely";

// The register's ranked order now puts open work first: a defect closed, deferred or accepted as is ranks below
// every defect still to do (src/domain/priority.ts `settled`), so the curator's first rows are work, not history.
// The ranked page reads the defects no pin moves in exactly the index's order with a LIMIT
// (server/defects/list-repository.ts rankedPageIds); this index leads with the same "settled" expression, written
// as the query writes it (PostgreSQL matches an expression index by the expression), then the keys of the index it
// replaces. The statuses are those of open work on this date (ACTIVE_STATUSES in src/domain/defect-workflow.ts).
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX defects_site_open_rank_idx ON defects (site_id, (status NOT IN ('raised', 'scheduled', 'under_repair', 'awaiting_retest')), safety_critical DESC, priority_score DESC, created_at, id)`.execute(
    db,
  );
  await sql`DROP INDEX IF EXISTS defects_site_safety_rank_idx`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX IF NOT EXISTS defects_site_safety_rank_idx ON defects (site_id, safety_critical DESC, priority_score DESC, created_at, id)`.execute(
    db,
  );
  await sql`DROP INDEX IF EXISTS defects_site_open_rank_idx`.execute(db);
}

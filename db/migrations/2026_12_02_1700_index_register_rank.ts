import { Kysely, sql } from "kysely";

// The register's default (ranked) order puts safety-critical defects first, then the
// priority score (the rank keys put safety first). The ranked page now reads the defects that no
// curator's-order pin moves in exactly this order with a LIMIT (server/defects/list-repository.ts
// rankedPageIds), so this index serves it as an ordered index scan instead of a sort of every
// defect on the site. The older (site_id, priority_score DESC, …) index no longer matches any
// order the register asks for; it goes, so writes keep one index fewer to maintain.
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX defects_site_safety_rank_idx ON defects (site_id, safety_critical DESC, priority_score DESC, created_at, id)`.execute(
    db,
  );
  await sql`DROP INDEX IF EXISTS defects_site_rank_idx`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX IF NOT EXISTS defects_site_rank_idx ON defects (site_id, priority_score DESC, created_at, id)`.execute(
    db,
  );
  await sql`DROP INDEX IF EXISTS defects_site_safety_rank_idx`.execute(db);
}

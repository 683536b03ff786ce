import { Kysely, sql } from "kysely";

// The wanted list's rows carry each line's first few positions and a count of all of them (server/parts/
// repository.ts, pageOfLines). This index holds a line's live links (active or fitted) in the order they
// were made, with what the count and the quantity read: the first few are the index's first entries, and the
// count and quantity are an index-only read of one line's entries, never a visit to each link's row.
// Withdrawn links (history) stay out of it; the line's own page reads them through part_demand_links_line_id_idx.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX part_demand_links_line_live_idx ON part_demand_links (line_id, created_at, id)
    INCLUDE (qty, active, fitted) WHERE active OR fitted`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX IF EXISTS part_demand_links_line_live_idx`.execute(db);
}

import { Kysely, sql } from "kysely";

// The defect workflow speaks the trade's words. Stored status values
// are renamed old → new in the defects, their status history, the audit trail and the
// saved register views (query strings); the check constraint, default and the status
// sort index follow. Frozen in time: never import app code here.

const MAP: [string, string][] = [
  ["open", "raised"],
  ["triaged", "scheduled"],
  ["in_repair", "under_repair"],
  ["awaiting_verification", "awaiting_retest"],
  ["wont_fix", "accepted_as_is"],
];
const ORDER_NEW = ["raised", "scheduled", "under_repair", "awaiting_retest", "closed", "deferred", "accepted_as_is"];
const ORDER_OLD = ["open", "triaged", "in_repair", "awaiting_verification", "closed", "deferred", "wont_fix"];

const quoted = (xs: readonly string[]) => sql.raw(xs.map((v) => `'${v}'`).join(", "));
const caseOf = (col: string, pairs: [string, string][]) =>
  sql.raw(`CASE ${col} ${pairs.map(([a, b]) => `WHEN '${a}' THEN '${b}'`).join(" ")} ELSE ${col} END`);

async function rename(db: Kysely<any>, pairs: [string, string][], order: readonly string[]) {
  await sql`ALTER TABLE defects DROP CONSTRAINT IF EXISTS defects_status_check`.execute(db);
  await sql`DROP INDEX IF EXISTS defects_site_status_rank_idx`.execute(db);
  await sql`UPDATE defects SET status = ${caseOf("status", pairs)}`.execute(db);
  await sql`ALTER TABLE defects ALTER COLUMN status SET DEFAULT ${sql.lit(order[0])}`.execute(db);
  await sql`ALTER TABLE defects ADD CONSTRAINT defects_status_check CHECK (status IN (${quoted(order)}))`.execute(db);
  await sql`CREATE INDEX defects_site_status_rank_idx ON defects (site_id, (array_position(ARRAY[${quoted(order)}]::text[], status)))`.execute(
    db,
  );
  await sql`UPDATE defect_status_changes SET from_status = ${caseOf("from_status", pairs)}, to_status = ${caseOf("to_status", pairs)}`.execute(
    db,
  );
  for (const side of ["before", "after"]) {
    const col = `${side}->>'status'`;
    await sql`UPDATE audit_log SET ${sql.ref(side)} = jsonb_set(${sql.ref(side)}, '{status}', to_jsonb((${caseOf(col, pairs)})::text))
      WHERE entity_type = 'defect' AND ${sql.ref(side)} ? 'status'`.execute(db);
  }
  // Saved views keep the register's query string: rewrite each status=<old> parameter.
  for (const [a, b] of pairs)
    await sql`UPDATE defect_views SET query = regexp_replace(query, ${`(^|&)status=${a}(&|$)`}, ${`\\1status=${b}\\2`}, 'g')
      WHERE query ~ ${`(^|&)status=${a}(&|$)`}`.execute(db);
}

export async function up(db: Kysely<any>): Promise<void> {
  await rename(db, MAP, ORDER_NEW);
}

export async function down(db: Kysely<any>): Promise<void> {
  await rename(
    db,
    MAP.map(([a, b]) => [b, a]),
    ORDER_OLD,
  );
}

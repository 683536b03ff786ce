import { Kysely, sql } from "kysely";

// Filing a shoot by file name (server/photos, POST …/photo-targets/match): the server cuts each file name into
// the stretches a designation or tag number could be and looks them up here, so the whole site is matched
// without reading its positions. name_token() is normalizeToken() of src/domain/photo-matching.ts in SQL, as of
// today (trim, lower case, each run of white space, _ . / \ or - becomes one "-"); an immutable SQL function, so
// the planner reads the same expression in the index and in the query.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE FUNCTION name_token(t text) RETURNS text
    LANGUAGE sql IMMUTABLE STRICT PARALLEL SAFE
    AS $$ SELECT regexp_replace(regexp_replace(lower(t), '^[[:space:]]+|[[:space:]]+$', '', 'g'),
      '[[:space:]_./\\\\-]+', '-', 'g') $$`.execute(db);
  await sql`CREATE INDEX positions_site_name_token_idx ON positions (site_id, name_token(designation))`.execute(db);
  // Not partial (WHERE retired_at IS NULL): the planner reads no statistics from a partial index's expression and
  // would guess a hundred rows a token; retired components are few.
  await sql`CREATE INDEX components_tag_token_idx ON components (site_id, name_token(tag_number))`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX IF EXISTS components_tag_token_idx`.execute(db);
  await sql`DROP INDEX IF EXISTS positions_site_name_token_idx`.execute(db);
  await sql`DROP FUNCTION IF EXISTS name_token(text)`.execute(db);
}

import { Kysely, sql } from "kysely";

// The condition survey report and large CSV exports are made by a background
// job into object storage. One row per file asked for: what was asked (kind + the same query
// the direct download takes), by whom, where it is in its making (queued → rendering → ready |
// failed; ready and failed files become expired when their retention runs out and the stored
// object is deleted), its progress, the reason of a failure, and whether the person has seen
// the in-app notice. Owned by server/prepared-files (its only writer). Frozen: never import app code.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE TABLE prepared_files (
    id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
    site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
    requested_by uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
    kind text NOT NULL CHECK (kind IN ('survey_report', 'inventory_csv', 'defects_csv', 'parts_csv')),
    params jsonb NOT NULL DEFAULT '{}'::jsonb,
    state text NOT NULL DEFAULT 'queued' CHECK (state IN ('queued', 'rendering', 'ready', 'failed', 'expired')),
    progress_done integer NOT NULL DEFAULT 0 CHECK (progress_done >= 0),
    progress_total integer CHECK (progress_total >= 0),
    attempts integer NOT NULL DEFAULT 0,
    error text,
    file_name text NOT NULL,
    content_type text NOT NULL,
    storage_key text,
    size_bytes bigint,
    created_at timestamptz NOT NULL DEFAULT now(),
    started_at timestamptz,
    finished_at timestamptz,
    expires_at timestamptz,
    seen_at timestamptz,
    version integer NOT NULL DEFAULT 1
  )`.execute(db);
  await sql`CREATE INDEX prepared_files_person_idx ON prepared_files (requested_by, created_at DESC)`.execute(db);
  await sql`CREATE INDEX prepared_files_site_idx ON prepared_files (site_id, created_at DESC)`.execute(db);
  await sql`CREATE INDEX prepared_files_expiry_idx ON prepared_files (expires_at) WHERE state IN ('ready', 'failed')`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE prepared_files`.execute(db);
}

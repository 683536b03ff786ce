import { readdir } from "node:fs/promises";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { Migrator, NO_MIGRATIONS, type Kysely, type Migration, type MigrationProvider } from "kysely";

const folder = path.join(import.meta.dirname, "migrations");

/**
 * Kysely's FileMigrationProvider, except that the import() happens in this file: under
 * vitest that goes through Vite's loader (which knows .ts), under tsx through tsx's.
 */
const provider: MigrationProvider = {
  async getMigrations() {
    const out: Record<string, Migration> = {};
    for (const file of (await readdir(folder)).sort()) {
      if (!/^\d{4}_\d{2}_\d{2}_\d{4}_[a-z0-9_]+\.ts$/.test(file)) continue;
      out[file.replace(/\.ts$/, "")] = await import(pathToFileURL(path.join(folder, file)).href);
    }
    return out;
  },
};

/** Runs every migration in db/migrations not yet applied; throws on the first failure. */
export async function migrateToLatest(db: Kysely<any>): Promise<string[]> {
  // Engineers land migrations in parallel under their own timestamp prefixes: a database that already ran a
  // later-stamped one must still take an earlier-stamped one that arrives after it.
  const { error, results } = await new Migrator({ db, provider, allowUnorderedMigrations: true }).migrateToLatest();
  if (error) {
    const failed = results?.find((r) => r.status === "Error")?.migrationName ?? "unknown";
    throw new Error(`migration ${failed} failed: ${error instanceof Error ? error.message : String(error)}`);
  }
  return (results ?? []).map((r) => r.migrationName);
}

/** Runs every applied migration's `down`, newest first (tests prove each migration can be undone). */
export async function migrateAllDown(db: Kysely<any>): Promise<string[]> {
  const { error, results } = await new Migrator({ db, provider, allowUnorderedMigrations: true }).migrateTo(
    NO_MIGRATIONS,
  );
  if (error) {
    const failed = results?.find((r) => r.status === "Error")?.migrationName ?? "unknown";
    throw new Error(`down of ${failed} failed: ${error instanceof Error ? error.message : String(error)}`);
  }
  return (results ?? []).map((r) => r.migrationName);
}

/** Migrations in db/migrations that this database has not run (the readiness check: a new build before its migration). */
export async function pendingMigrations(db: Kysely<any>): Promise<string[]> {
  const all = await new Migrator({ db, provider, allowUnorderedMigrations: true }).getMigrations();
  return all.filter((m) => !m.executedAt).map((m) => m.name);
}

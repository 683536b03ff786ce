import type { TestProject } from "vitest/node";
import { createDb, MAINTENANCE_DB_OPTIONS } from "../../server/db";
import { ensureDatabase } from "../../db/pg";
import { openLocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";
import { createJobs } from "../../server/jobs";

export const TEMPLATE_DB = "tideline_template";

/**
 * Once per run: the throw-away test cluster, and a freshly migrated template database
 * that every API test file clones (CREATE DATABASE … TEMPLATE, about 100 ms).
 */
export default async function setup(project: TestProject) {
  const local = await openLocalDatabase("test", "postgres");
  // Migrated as the app's role, which owns it: a migration that needs a superuser fails here.
  await ensureDatabase(local.adminUrl, TEMPLATE_DB, { fresh: true, owner: local.appRole });
  const db = createDb(local.url.replace(/\/postgres$/, `/${TEMPLATE_DB}`), { ...MAINTENANCE_DB_OPTIONS, max: 1 });
  await migrateToLatest(db);
  // pg-boss creates its own schema (pgboss) on first start; do it once here so every clone has it.
  const jobs = createJobs({ db, work: false });
  await jobs.start();
  await jobs.stop(1000);
  await db.destroy();
  project.provide("adminUrl", local.adminUrl);
  project.provide("appUrl", local.url);
  project.provide("appRole", local.appRole);
  project.provide("templateDb", TEMPLATE_DB);
  return () => local.stop();
}

declare module "vitest" {
  export interface ProvidedContext {
    /** The superuser on the test cluster's postgres database: create/drop databases, watch other sessions. */
    adminUrl: string;
    /** The app's role on the test cluster's postgres database (swap the path for a test database). */
    appUrl: string;
    appRole: string;
    templateDb: string;
  }
}

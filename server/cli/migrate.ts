// `npm run db:migrate`: brings the database (DATABASE_URL or the embedded one) up to date.
import { createDb, MAINTENANCE_DB_OPTIONS } from "../db";
import { openLocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";

const local = await openLocalDatabase("dev");
const db = createDb(local.url, MAINTENANCE_DB_OPTIONS);
try {
  const applied = await migrateToLatest(db);
  console.log(applied.length ? `[tideline] applied: ${applied.join(", ")}` : "[tideline] database is up to date");
} finally {
  await db.destroy();
  local.stop();
}

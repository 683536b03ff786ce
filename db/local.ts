/**
 * Where the database is: DATABASE_URL when set (a managed PostgreSQL), otherwise the
 * embedded cluster under .data/, started here and stopped by the returned function.
 * On the embedded cluster `url` signs in as the app's own role (APP_ROLE in db/pg.ts: owns
 * the database, no superuser); `adminUrl` is the superuser, for creating scratch databases.
 */
import { APP_ROLE, ensureDatabase, startCluster } from "./pg";

export interface LocalDatabase {
  /** The app's database, as the app's role. */
  url: string;
  /** Admin URL of the same server (the postgres database), for creating scratch databases. */
  adminUrl: string;
  /** The role `url` signs in as: the owner to give a scratch database the app will use. */
  appRole: string;
  stop(): void;
}

export const DEFAULT_PG_PORT = 54329;
export const DEFAULT_TEST_PG_PORT = 54339;

export async function openLocalDatabase(
  mode: "dev" | "test",
  database = mode === "dev" ? "tideline" : "tideline_test",
): Promise<LocalDatabase> {
  if (process.env.DATABASE_URL && mode === "dev") {
    // A managed PostgreSQL: used exactly as given (its roles are the operator's business).
    const admin = new URL(process.env.DATABASE_URL);
    admin.pathname = "/postgres";
    const appRole = decodeURIComponent(admin.username);
    return { url: process.env.DATABASE_URL, adminUrl: admin.toString(), appRole, stop() {} };
  }
  const cluster = await startCluster(
    mode === "dev"
      ? { name: "pg", port: Number(process.env.TIDELINE_PG_PORT ?? DEFAULT_PG_PORT), durable: true }
      : { name: "pg-test", port: Number(process.env.TIDELINE_TEST_PG_PORT ?? DEFAULT_TEST_PG_PORT), durable: false },
  );
  const adminUrl = cluster.adminUrlFor("postgres");
  // The app's database belongs to the app's role (one made before it had a role of its own is handed over).
  await ensureDatabase(adminUrl, database, { owner: APP_ROLE });
  return { url: cluster.urlFor(database), adminUrl, appRole: APP_ROLE, stop: () => cluster.stop() };
}

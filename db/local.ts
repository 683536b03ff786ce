/**
 * Where the database is: DATABASE_URL when set (a managed PostgreSQL), otherwise the
 * embedded cluster under .data/, started here and stopped by the returned function.
 */
import { ensureDatabase, startCluster } from "./pg";

export interface LocalDatabase {
  url: string;
  /** Admin URL of the same server (the postgres database), for creating scratch databases. */
  adminUrl: string;
  stop(): void;
}

export const DEFAULT_PG_PORT = 54329;
export const DEFAULT_TEST_PG_PORT = 54339;

export async function openLocalDatabase(
  mode: "dev" | "test",
  database = mode === "dev" ? "tideline" : "tideline_test",
): Promise<LocalDatabase> {
  if (process.env.DATABASE_URL && mode === "dev") {
    const admin = new URL(process.env.DATABASE_URL);
    admin.pathname = "/postgres";
    return { url: process.env.DATABASE_URL, adminUrl: admin.toString(), stop() {} };
  }
  const cluster = await startCluster(
    mode === "dev"
      ? { name: "pg", port: Number(process.env.TIDELINE_PG_PORT ?? DEFAULT_PG_PORT), durable: true }
      : { name: "pg-test", port: Number(process.env.TIDELINE_TEST_PG_PORT ?? DEFAULT_TEST_PG_PORT), durable: false },
  );
  const adminUrl = cluster.urlFor("postgres");
  await ensureDatabase(adminUrl, database);
  return { url: cluster.urlFor(database), adminUrl, stop: () => cluster.stop() };
}

import { CamelCasePlugin, Kysely, PostgresDialect } from "kysely";
import pg from "pg";
import type { Database } from "../db/types";

// numeric and bigint come back as strings by default; counts and money fit in a JS number.
pg.types.setTypeParser(pg.types.builtins.INT8, (v) => Number(v));
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => Number(v));
// Calendar dates stay as 'YYYY-MM-DD' strings: no time zone shifts.
pg.types.setTypeParser(pg.types.builtins.DATE, (v) => v);

export type Db = Kysely<Database>;

const pools = new WeakMap<Db, pg.Pool>();
/** The pg Pool under a Db made by createDb, for libraries that take a pool (the rate limiter's store). */
export const poolOf = (db: Db): pg.Pool | undefined => pools.get(db);

export function createDb(connectionString: string, max = 10): Db {
  const pool = new pg.Pool({ connectionString, max, connectionTimeoutMillis: 5000 });
  // An idle client losing its connection must not crash the process; health reports it.
  pool.on("error", (err) => console.error("[db] idle client error:", err.message));
  const db = new Kysely<Database>({ dialect: new PostgresDialect({ pool }), plugins: [new CamelCasePlugin()] });
  pools.set(db, pool);
  return db;
}

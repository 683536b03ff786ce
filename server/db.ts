import { CamelCasePlugin, Kysely, PostgresDialect } from "kysely";
import pg from "pg";
import type { Database } from "../db/types";
import { log } from "./log";

// numeric and bigint come back as strings by default; counts and money fit in a JS number.
pg.types.setTypeParser(pg.types.builtins.INT8, (v) => Number(v));
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => Number(v));
// Calendar dates stay as 'YYYY-MM-DD' strings: no time zone shifts.
pg.types.setTypeParser(pg.types.builtins.DATE, (v) => v);

export type Db = Kysely<Database>;

const pools = new WeakMap<Db, pg.Pool>();
/** The pg Pool under a Db made by createDb, for libraries that take a pool (the rate limiter's store). */
export const poolOf = (db: Db): pg.Pool | undefined => pools.get(db);

export interface DbOptions {
  /** Connections in the pool (DATABASE_POOL_MAX, default 10: PostgreSQL allows 100, and several processes share it). */
  max?: number;
  /** A statement running longer is cancelled by the server (57014 → 503). 0 = none (migrations, seeds, bench). */
  statementTimeoutMs?: number;
  /** A connection left idle inside a transaction this long is closed by the server (a leaked transaction; photo uploads write files inside one, hence a minute). */
  idleInTransactionMs?: number;
  /** Waiting for a free connection, or for a new one to open, fails after this (→ 503 database busy/down). */
  connectionTimeoutMs?: number;
}

const envInt = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && v >= 0 && process.env[name] !== "" && process.env[name] !== undefined ? v : fallback;
};

/** The settings the app serves with; tools that run long statements pass their own. */
export const APP_DB_OPTIONS: Required<DbOptions> = {
  max: envInt("DATABASE_POOL_MAX", 10),
  statementTimeoutMs: envInt("DATABASE_STATEMENT_TIMEOUT_MS", 30_000),
  idleInTransactionMs: envInt("DATABASE_IDLE_IN_TRANSACTION_MS", 60_000),
  connectionTimeoutMs: envInt("DATABASE_CONNECT_TIMEOUT_MS", 5_000),
};

/** For migrations, seeds, the benchmark and backups: no statement or idle-in-transaction limit. */
export const MAINTENANCE_DB_OPTIONS: DbOptions = {
  max: 2,
  statementTimeoutMs: 0,
  idleInTransactionMs: 0,
  connectionTimeoutMs: 30_000,
};

/**
 * A Kysely over a pg Pool that survives losing the database: every client the pool
 * opens gets an 'error' listener for its whole life, so a backend terminated while the
 * client is checked out (pg_terminate_backend, `pg_ctl stop -m fast`, a killed
 * postmaster) fails the query that was using it instead of raising an unhandled 'error'
 * that ends the process. pg marks such a client not queryable and the pool discards it on
 * release; new clients are opened when the database is back.
 */
export function createDb(connectionString: string, options: number | DbOptions = {}): Db {
  const o = { ...APP_DB_OPTIONS, ...(typeof options === "number" ? { max: options } : options) };
  const pool = new pg.Pool({
    connectionString,
    max: o.max,
    connectionTimeoutMillis: o.connectionTimeoutMs,
    idleTimeoutMillis: 30_000,
    keepAlive: true,
    application_name: "tideline",
    ...(o.statementTimeoutMs ? { statement_timeout: o.statementTimeoutMs } : {}),
    ...(o.idleInTransactionMs ? { idle_in_transaction_session_timeout: o.idleInTransactionMs } : {}),
  });
  pool.on("connect", (client) => {
    client.on("error", (err) => logConnectionLoss(err));
  });
  // The pool re-emits an idle client's error; the client's own listener above has logged it.
  pool.on("error", () => {});
  const db = new Kysely<Database>({ dialect: new PostgresDialect({ pool }), plugins: [new CamelCasePlugin()] });
  pools.set(db, pool);
  // The health probe's own connection (probeDbFor) is closed with this pool.
  const end = pool.end.bind(pool);
  pool.end = (async () => {
    const probe = probes.get(db);
    probes.delete(db);
    await probe?.destroy().catch(() => {});
    return end();
  }) as typeof pool.end;
  return db;
}

const probes = new WeakMap<Db, Db>();

/**
 * The health and readiness probes' own connection to the same database (a pool of one,
 * `HEALTH_POOL_MAX`), so `/api/health` measures "does the database answer" and not "how long
 * is the queue for the app's pool": under load every app connection is busy and a probe
 * through that pool waited behind up to 40 statements. Made on first use, closed
 * when `db` is destroyed; the connection it holds is let go after 10 s idle. For a Db not made
 * by createDb (a test's logging wrapper) the probe shares `db`.
 */
export function probeDbFor(db: Db): Db {
  const pool = pools.get(db);
  const url = (pool?.options as { connectionString?: string } | undefined)?.connectionString;
  if (!pool || !url) return db;
  let probe = probes.get(db);
  if (!probe) {
    const probePool = new pg.Pool({
      connectionString: url,
      max: envInt("HEALTH_POOL_MAX", 1),
      connectionTimeoutMillis: 3000,
      idleTimeoutMillis: 10_000,
      allowExitOnIdle: true,
      keepAlive: true,
      application_name: "tideline-health",
      statement_timeout: 3000,
    });
    // As the app's pool: a dropped backend fails the probe (→ "down"), never the process.
    probePool.on("connect", (client) => client.on("error", () => {}));
    probePool.on("error", () => {});
    probe = new Kysely<Database>({
      dialect: new PostgresDialect({ pool: probePool }),
      plugins: [new CamelCasePlugin()],
    });
    probes.set(db, probe);
  }
  return probe;
}

/**
 * A second, small pool to the same database for the job queue and its handlers (JOB_POOL_MAX,
 * default 4; waits up to 30 s for a connection), so background work — pg-boss's polling, a
 * report reading a whole board — never takes the connections requests need. Returns undefined
 * for a Db not made by createDb (a test's logging wrapper): the caller then shares that one.
 */
export function queueDbFor(db: Db, options: DbOptions = {}): Db | undefined {
  const pool = pools.get(db);
  const url = (pool?.options as { connectionString?: string } | undefined)?.connectionString;
  if (!url) return undefined;
  return createDb(url, {
    max: envInt("JOB_POOL_MAX", 4),
    connectionTimeoutMs: 30_000,
    statementTimeoutMs: APP_DB_OPTIONS.statementTimeoutMs,
    idleInTransactionMs: APP_DB_OPTIONS.idleInTransactionMs,
    ...options,
  });
}

let lastLog = 0;
let suppressed = 0;
/** One line per second at most: a database restart drops every connection at once. */
function logConnectionLoss(err: Error & { code?: string }) {
  const now = Date.now();
  if (now - lastLog < 1000) {
    suppressed++;
    return;
  }
  lastLog = now;
  const more = suppressed ? ` (and ${suppressed} more)` : "";
  suppressed = 0;
  log.error({ code: err.code, reason: err.message }, `a database connection was lost${more}`);
}

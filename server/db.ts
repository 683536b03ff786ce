import { CamelCasePlugin, Kysely, PostgresDialect } from "kysely";
import { availableParallelism } from "node:os";
import pg from "pg";
import type { Database } from "../db/types";
import { PoolQueueFull } from "./db-errors";
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
  /** Connections in the pool (DATABASE_POOL_MAX; default `defaultPoolMax`: twice the cores for a database on this machine, 2–10; else 10). */
  max?: number;
  /** A statement running longer is cancelled by the server (57014 → 503). 0 = none (migrations, seeds, bench). */
  statementTimeoutMs?: number;
  /** A connection left idle inside a transaction this long is closed by the server (a leaked transaction; photo uploads write files inside one, hence a minute). */
  idleInTransactionMs?: number;
  /** Waiting for a free connection, or for a new one to open, fails after this (→ 503 database busy/down). */
  connectionTimeoutMs?: number;
  /**
   * Statements that may wait for a connection at once (DATABASE_POOL_MAX_WAITING); one more is refused at
   * once (PoolQueueFull → 503 `db_unavailable` with Retry-After) instead of queueing toward the timeout.
   * 0 = no bound. Default 10 × `max` and at least 100: see `defaultMaxWaiting`.
   */
  maxWaiting?: number;
  /**
   * Connections kept open while idle (DATABASE_POOL_MIN, default 2, at most `max`); those beyond close after 30 s idle.
   * A connection opened after a pause costs its opening (~17 ms here) and its first statements' planning on a cold
   * catalog (the register's page: ~20 ms against ~3.5): a lone crew's first read after each pause paid both
   * (DEVELOPERS.md "Connections kept open through a pause").
   */
  minIdle?: number;
}

const envInt = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && v >= 0 && process.env[name] !== "" && process.env[name] !== undefined ? v : fallback;
};

/**
 * Is the database on this machine: a loopback address, a Unix socket, or no host (pg then uses PGHOST or localhost)?
 * Then PostgreSQL and this process share the same cores (how `npm start` runs it: a cluster on 127.0.0.1).
 */
export function databaseIsLocal(connectionString: string): boolean {
  let url: URL;
  try {
    url = new URL(connectionString);
  } catch {
    return false;
  }
  const host = (url.searchParams.get("host") || decodeURIComponent(url.hostname) || process.env.PGHOST || "localhost")
    .replace(/^\[(.*)\]$/, "$1")
    .toLowerCase();
  return host.startsWith("/") || host === "localhost" || host === "::1" || /^127\.\d+\.\d+\.\d+$/.test(host);
}

/**
 * The app pool's default size when DATABASE_POOL_MAX is not set. A database on this machine (`databaseIsLocal`):
 * twice the cores this process may run on (`os.availableParallelism()`), at least 2 and at most 10 — 4 on a 2-core
 * machine. A database elsewhere: 10, as before, since its cores cannot be seen from here (set DATABASE_POOL_MAX to
 * twice them). Decided from the bench's 50 clients on the register (DEVELOPERS.md "Pool size from the cores",
 * decision record of 2026-12-03): the register's statements are CPU-bound on a cached site, so more of them running
 * at once than the cores can run add no throughput and take time slices from the server's one event-loop thread,
 * and from the health probe's backend, on the same cores. Twice the cores because a statement also waits for its
 * round trips and for the server to read its answer: the rule of thumb for a cached database is about 2 × cores
 * (PostgreSQL wiki, "Number Of Database Connections"; from memory). The cap keeps (instances + workers) × the pool
 * under PostgreSQL's 100 connections.
 */
export const defaultPoolMax = (connectionString: string, cores = availableParallelism()) =>
  databaseIsLocal(connectionString) ? Math.min(10, Math.max(2, 2 * cores)) : 10;

/** The app pool's size for this database: DATABASE_POOL_MAX, else `defaultPoolMax`. */
export const appPoolMax = (connectionString: string) => envInt("DATABASE_POOL_MAX", defaultPoolMax(connectionString));

/**
 * The waiting queue's default bound: ten statements per connection, and never fewer than 100. Chosen (DEVELOPERS.md
 * "Pool and queue sizes") so that (1) the load — 50 clients on the register, each with at most two
 * statements in flight — never meets it (at most 100 waiting), whatever the pool's size: with a bound of 10 × 4 a
 * pool of 4 refused 196–249 requests a run under those 50 clients (bench, 2026-12-03 17:38 UTC); and (2) the last
 * statement admitted waits about ten statement times (0.1–0.5 s at the 10–50 ms measured under load) on the default
 * pool, a tenth of the 5 s acquire timeout: past that, one more waiter only makes every answer later, and a 503 the
 * client retries is kinder than a 5 s wait ending in one.
 */
export const defaultMaxWaiting = (max: number) => Math.max(100, 10 * max);

/**
 * The settings the app serves with; tools that run long statements pass their own. The pool's size and its waiting
 * bound depend on where the database is, so `createDb` sets them: `appPoolMax(url)` and DATABASE_POOL_MAX_WAITING,
 * else `defaultMaxWaiting` of that size.
 */
export const APP_DB_OPTIONS: Required<Omit<DbOptions, "max" | "maxWaiting">> = {
  statementTimeoutMs: envInt("DATABASE_STATEMENT_TIMEOUT_MS", 30_000),
  idleInTransactionMs: envInt("DATABASE_IDLE_IN_TRANSACTION_MS", 60_000),
  connectionTimeoutMs: envInt("DATABASE_CONNECT_TIMEOUT_MS", 5_000),
  minIdle: envInt("DATABASE_POOL_MIN", 2),
};

/** For migrations, seeds, the benchmark and backups: no statement or idle-in-transaction limit, no queue bound. */
export const MAINTENANCE_DB_OPTIONS: DbOptions = {
  max: 2,
  statementTimeoutMs: 0,
  idleInTransactionMs: 0,
  connectionTimeoutMs: 30_000,
  maxWaiting: 0,
  minIdle: 0,
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
  const given = typeof options === "number" ? { max: options } : options;
  const max = given.max ?? appPoolMax(connectionString);
  // A pool without its own bound gets DATABASE_POOL_MAX_WAITING, else the bound for its size.
  const maxWaiting = given.maxWaiting ?? envInt("DATABASE_POOL_MAX_WAITING", defaultMaxWaiting(max));
  const o = { ...APP_DB_OPTIONS, ...given, max, maxWaiting };
  const pool = new pg.Pool({
    connectionString,
    max: o.max,
    connectionTimeoutMillis: o.connectionTimeoutMs,
    idleTimeoutMillis: 30_000,
    min: Math.min(o.minIdle ?? 0, o.max),
    // Idle connections kept open do not keep a script's process alive; a server's listener does that.
    allowExitOnIdle: true,
    keepAlive: true,
    application_name: "tideline",
    ...(o.statementTimeoutMs ? { statement_timeout: o.statementTimeoutMs } : {}),
    ...(o.idleInTransactionMs ? { idle_in_transaction_session_timeout: o.idleInTransactionMs } : {}),
  });
  pool.on("connect", (client) => {
    client.on("error", (err) => logConnectionLoss(err));
  });
  if (o.maxWaiting > 0) boundQueue(pool, o.maxWaiting);
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

/**
 * Refuses a checkout at once when every connection is taken and `maxWaiting` statements already wait
 * (pg-pool's own queue has no bound: only the acquire timeout ends a wait). The refusal is
 * PoolQueueFull, which the error handler answers 503 `db_unavailable` with Retry-After; it is counted
 * (`refusedCheckouts`) and logged once a second at most.
 */
function boundQueue(pool: pg.Pool, maxWaiting: number) {
  bounds.set(pool, maxWaiting);
  const connect = pool.connect.bind(pool) as (cb?: (err: Error | undefined, ...rest: unknown[]) => void) => unknown;
  pool.connect = ((cb?: (err: Error | undefined, ...rest: unknown[]) => void) => {
    if (pool.idleCount === 0 && pool.totalCount >= (pool.options.max ?? 10) && pool.waitingCount >= maxWaiting) {
      const err = new PoolQueueFull(maxWaiting);
      refused++;
      logRefusal(maxWaiting);
      if (cb) return void process.nextTick(() => cb(err));
      return Promise.reject(err);
    }
    return connect(cb);
  }) as typeof pool.connect;
}

const bounds = new WeakMap<pg.Pool, number>();

/**
 * Whether the app's pool takes one more statement now, read from its counters (no statement, no wait): "full" when
 * every connection is taken and the waiting queue is at its bound, so the next request that needs the database is
 * refused 503 at once. `/api/health/ready` reports it; "accepting" for a pool without a bound or a Db not made by
 * createDb (it then queues, and the acquire timeout answers).
 */
export function poolState(db: Db): "accepting" | "full" {
  const pool = pools.get(db);
  const maxWaiting = pool && bounds.get(pool);
  if (!pool || !maxWaiting) return "accepting";
  const full = pool.idleCount === 0 && pool.totalCount >= (pool.options.max ?? 10) && pool.waitingCount >= maxWaiting;
  return full ? "full" : "accepting";
}

let refused = 0;
/** Checkouts refused by a full waiting queue since the process started (metrics, tests). */
export const refusedCheckouts = () => refused;
let lastRefusalLog = 0;
function logRefusal(maxWaiting: number) {
  const now = Date.now();
  if (now - lastRefusalLog < 1000) return;
  lastRefusalLog = now;
  log.warn({ maxWaiting, refused }, "database pool queue full: refusing at once (503)");
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
    maxWaiting: 0, // background work waits its turn; only requests are refused at once
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

/**
 * The raw baseline of each endpoint: the very statements the endpoint issued (session check,
 * role check, its queries), captured once through Kysely's per-query `log` hook on an in-process
 * copy of the app, then replayed with the bare `pg` driver — same SQL, same parameters, rows read
 * in full. Statements the endpoint ran at the same time (Promise.all) are replayed at the same
 * time on a pool; anything inside a transaction is replayed on one connection, in order.
 */
import { CamelCasePlugin, Kysely, PostgresDialect } from "kysely";
import pg from "pg";
import type { Database } from "../../db/types";
import type { Db } from "../db";

export interface Statement {
  sql: string;
  params: readonly unknown[];
  start: number;
  end: number;
}

export interface Capture {
  db: Db;
  /** Statements since the last take(). */
  take(): Statement[];
  close(): Promise<void>;
}

export function capturingDb(url: string): Capture {
  let log: Statement[] = [];
  const pool = new pg.Pool({ connectionString: url, max: 10 });
  const db = new Kysely<Database>({
    dialect: new PostgresDialect({ pool }),
    plugins: [new CamelCasePlugin()],
    log: (e) => {
      const end = performance.now();
      log.push({ sql: e.query.sql, params: e.query.parameters, start: end - e.queryDurationMillis, end });
    },
  });
  return {
    db,
    take: () => {
      const out = log;
      log = [];
      return out;
    },
    close: () => db.destroy(),
  };
}

/** Statements grouped into waves that ran concurrently. */
export interface Replay {
  waves: Statement[][];
  transactional: boolean;
  count: number;
}

export function planReplay(statements: Statement[]): Replay {
  const sorted = [...statements].sort((a, b) => a.start - b.start);
  const waves: Statement[][] = [];
  let waveEnd = -Infinity;
  for (const s of sorted) {
    if (waves.length && s.start < waveEnd) {
      waves[waves.length - 1].push(s);
      waveEnd = Math.min(waveEnd, s.end);
    } else {
      waves.push([s]);
      waveEnd = s.end;
    }
  }
  const transactional = statements.some((s) => /^\s*(begin|start transaction)\b/i.test(s.sql));
  return { waves, transactional, count: statements.length };
}

/** Runs the plan once; resolves with the number of rows read. */
export async function replay(pool: pg.Pool, plan: Replay): Promise<number> {
  let rows = 0;
  if (plan.transactional) {
    const c = await pool.connect();
    try {
      for (const w of plan.waves)
        for (const s of w) rows += (await c.query(s.sql, s.params as unknown[])).rowCount ?? 0;
    } finally {
      c.release();
    }
    return rows;
  }
  for (const w of plan.waves) {
    const rs = await Promise.all(w.map((s) => pool.query(s.sql, s.params as unknown[])));
    for (const r of rs) rows += r.rowCount ?? 0;
  }
  return rows;
}

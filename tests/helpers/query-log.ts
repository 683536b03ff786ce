/**
 * A second Kysely over the same test database that records every statement it executes, through
 * Kysely's own per-query `log` hook (transaction begin/commit included). Tests use it to check that
 * a list endpoint issues a fixed number of statements, whatever the number of rows it returns, and
 * that a public read writes nothing.
 */
import { CamelCasePlugin, Kysely, PostgresDialect } from "kysely";
import pg from "pg";
import type { Database } from "../../db/types";
import type { Db } from "../../server/db";

export interface QueryLog {
  db: Db;
  /** Statements executed since the last reset, in order. */
  statements: string[];
  reset(): void;
  close(): Promise<void>;
}

export function loggingDb(url: string): QueryLog {
  const statements: string[] = [];
  const pool = new pg.Pool({ connectionString: url, max: 5 });
  const db = new Kysely<Database>({
    dialect: new PostgresDialect({ pool }),
    plugins: [new CamelCasePlugin()],
    log: (e) => {
      // The job worker shares the pool and polls its queue (schema pgboss) on its own clock: that is
      // background work, not the statements of the request being counted.
      if (/\bpgboss\./.test(e.query.sql)) return;
      statements.push(e.query.sql);
    },
  });
  return {
    db,
    statements,
    reset: () => {
      statements.length = 0;
    },
    close: () => db.destroy(),
  };
}

/** Statements that change data or take locks. */
export const writes = (statements: readonly string[]) =>
  statements.filter((s) => /^\s*(insert|update|delete|merge)\b|pg_advisory|for update|for share/i.test(s));

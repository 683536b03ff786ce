import { sql } from "kysely";
import type { Db } from "../../server/db";

/**
 * Resolves once no job of the app is waiting to run now or running (jobs scheduled for
 * later, such as a retry after a delay, do not count). Polls pg-boss's table.
 */
export async function jobsIdle(db: Db, timeoutMs = 15_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const { rows } = await sql<{ n: number }>`
      select count(*)::int as n from pgboss.job
      where name not like '\\_\\_pgboss%' and (state = 'active' or (state in ('created', 'retry') and start_after <= now()))`.execute(
      db,
    );
    if (rows[0].n === 0) return;
    if (Date.now() > until) throw new Error(`background jobs still busy after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

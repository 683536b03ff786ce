import { sql } from "kysely";
import type { Db } from "./db";
import { dbFailureOf } from "./db-errors";

export type DbState = "up" | "down";

/**
 * Is the database answering? `select 1` through the app's own pool, bounded by
 * `timeoutMs` so a health check never hangs behind a stuck pool: a pool that cannot hand
 * out a connection in time counts as down, which is what a caller of the app would see.
 */
export async function databaseState(db: Db, timeoutMs = 3000): Promise<{ db: DbState; reason?: string }> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(Object.assign(new Error("no answer in time"), { code: "ETIMEDOUT" })), timeoutMs);
  });
  const probe = sql`select 1`.execute(db);
  probe.catch(() => {}); // it may settle after the timeout
  try {
    await Promise.race([probe, timeout]);
    return { db: "up" };
  } catch (e) {
    const failure = dbFailureOf(e);
    return {
      db: "down",
      reason: failure === "timeout" || (e as { code?: string }).code === "ETIMEDOUT" ? "timeout" : "unreachable",
    };
  } finally {
    clearTimeout(timer);
  }
}

import { sql } from "kysely";
import type { Db } from "./db";
import { pendingMigrations } from "../db/migrate";
import { dbFailureOf } from "./db-errors";

export type DbState = "up" | "down";

/**
 * Is the database answering? `select 1` through `db` — the app passes the probes' own connection (`probeDbFor`), so
 * the answer does not wait behind user work queued for the app's pool — bounded by `timeoutMs` so a health check
 * never hangs: no answer in time counts as down.
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

export interface Readiness {
  ok: boolean;
  db: DbState;
  /** "current", or the names of migrations this database has not run. */
  migrations: "current" | "unknown" | string[];
  storage: "up" | "down";
  queue: "running" | "stopped" | "none";
  /**
   * The app's own pool, read from its counters: "full" when every connection is taken and its waiting queue is at
   * its bound, so a request needing the database now is refused 503 (what a caller would see). Reported, and it does
   * not make `ok` false: failing readiness under load takes instances out exactly when load rises (decision record
   * "Health answers on its own connection"; kept on 2026-12-03 "Readiness says when the pool is full").
   */
  pool: "accepting" | "full";
  /** Shutting down: finishing in-flight work, taking no new requests. */
  draining?: true;
}

/** Resolves with `probe`'s value, or rejects after `ms`. */
async function within<T>(probe: Promise<T>, ms: number): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  probe.catch(() => {});
  try {
    return await Promise.race([
      probe,
      new Promise<never>((_, reject) => (timer = setTimeout(() => reject(new Error("no answer in time")), ms))),
    ]);
  } finally {
    clearTimeout(timer);
  }
}

/**
 * The readiness check a load balancer asks before sending this instance traffic: the database
 * answers, every migration of this build has run on it, the photo store answers, the job
 * queue runs, and the instance is not shutting down. Each probe is bounded by `timeoutMs`.
 */
export function readinessCheck(deps: {
  db: Db;
  storage: { check(): Promise<void> };
  jobs?: { running: boolean };
  draining: () => boolean;
  /** The app pool's state (`poolState` of the app's Db); "accepting" when not given. */
  pool?: () => "accepting" | "full";
  timeoutMs?: number;
}): () => Promise<Readiness> {
  const ms = deps.timeoutMs ?? 3000;
  // A migration once seen applied stays applied; after that the check costs nothing.
  let migrationsCurrent = false;
  return async () => {
    const [db, storage] = await Promise.all([
      databaseState(deps.db, ms),
      within(deps.storage.check(), ms).then(
        () => "up" as const,
        () => "down" as const,
      ),
    ]);
    let migrations: Readiness["migrations"] = "unknown";
    if (migrationsCurrent) migrations = "current";
    else if (db.db === "up") {
      const pending = await within(pendingMigrations(deps.db), ms).catch(() => null);
      if (pending && !pending.length) migrationsCurrent = true;
      migrations = pending === null ? "unknown" : pending.length ? pending : "current";
    }
    const queue = !deps.jobs ? "none" : deps.jobs.running ? "running" : "stopped";
    const draining = deps.draining();
    const pool = deps.pool?.() ?? "accepting";
    const ok = db.db === "up" && migrations === "current" && storage === "up" && queue !== "stopped" && !draining;
    return { ok, db: db.db, migrations, storage, queue, pool, ...(draining ? { draining: true as const } : {}) };
  };
}

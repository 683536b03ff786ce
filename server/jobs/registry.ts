/**
 * Every background job and schedule Tideline has, in one place. Each process (web,
 * worker or both) calls startJobs(); a web-only instance defines the same queues but
 * runs no handler. To add a job: define it here (or in a `defineXJobs(jobs, deps)` of
 * your domain called from here), then `jobs.enqueue(name, data, { trx })` from a service.
 */
import { queueDbFor, type Db } from "../db";
import type { Mailer } from "../mail/mailer";
import { defineMailJobs } from "../mail/outbox";
import { sendWeeklySummaries } from "../notifications/weekly";
import { sendOverdueWatchNotices } from "../return-to-service/overdue";
import { definePhotoJobs } from "../photos/service";
import { definePreparedFileJobs } from "../prepared-files/service";
import type { PhotoStorage } from "../photos/storage";
import { createJobs, type Jobs, type JobsConfig } from "./index";

export interface JobDeps {
  db: Db;
  mailer: Mailer;
  publicUrl: string;
  photoStorage: PhotoStorage;
}

export const WEEKLY_SUMMARY_JOB = "notifications.weekly-summary";

/** Mondays 07:00 in TIDELINE_TZ (default UTC); WEEKLY_SUMMARY_CRON=off when an outside scheduler runs `npm run mail:weekly`. */
export const weeklyCron = (env = process.env) => env.WEEKLY_SUMMARY_CRON ?? "0 7 * * 1";

export const OVERDUE_WATCH_JOB = "rts.overdue-watch-check";
/** Every five minutes by default (idempotent: each overdue check is noticed once); RTS_OVERDUE_CRON=off when `npm run rts:overdue` runs from an outside scheduler. */
export const overdueCron = (env = process.env) => env.RTS_OVERDUE_CRON ?? "*/5 * * * *";

export function defineAppJobs(jobs: Jobs, deps: JobDeps, env = process.env) {
  defineMailJobs(jobs, deps);
  definePhotoJobs(jobs, deps, undefined, env);
  definePreparedFileJobs(jobs, deps, env);
  jobs.define(
    WEEKLY_SUMMARY_JOB,
    async (_data, ctx) => {
      const r = await sendWeeklySummaries({ ...deps, jobs });
      ctx.log.info(r, "weekly summary queued");
    },
    { retryLimit: 2, retryDelay: 300 },
  );
  jobs.define(
    OVERDUE_WATCH_JOB,
    async (_data, ctx) => {
      const r = await sendOverdueWatchNotices({ ...deps, jobs }, new Date());
      if (r.overdue) ctx.log.info(r, "overdue watch checks noticed");
    },
    { retryLimit: 1, retryDelay: 60 },
  );
  if (overdueCron(env) === "off") jobs.never(OVERDUE_WATCH_JOB);
  else jobs.every(OVERDUE_WATCH_JOB, overdueCron(env), {}, "UTC");
  const cron = weeklyCron(env);
  if (cron === "off") jobs.never(WEEKLY_SUMMARY_JOB);
  else jobs.every(WEEKLY_SUMMARY_JOB, cron, {}, env.TIDELINE_TZ ?? "UTC");
}

/**
 * Creates, defines and starts the queue of this process. The queue and every job handler use
 * a small pool of their own (JOB_POOL_MAX, default 4), not the request pool of `deps.db`, so
 * background work cannot starve requests; a job enqueued inside a request's transaction still
 * commits with that transaction. The pool is closed by jobs.stop().
 */
export async function startJobs(deps: JobDeps, opts: Omit<JobsConfig, "db" | "ownsDb">): Promise<Jobs> {
  const own = queueDbFor(deps.db);
  const db = own ?? deps.db;
  const jobs = createJobs({ db, ownsDb: !!own, ...opts });
  defineAppJobs(jobs, { ...deps, db });
  try {
    await jobs.start();
  } catch (e) {
    await own?.destroy().catch(() => {});
    throw e;
  }
  return jobs;
}

import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, poolOf } from "../../server/db";
import { createJobs, workerEnabled, type Jobs } from "../../server/jobs";
import { WEEKLY_SUMMARY_JOB, startJobs } from "../../server/jobs/registry";
import { memoryMailer } from "../../server/mail/mailer";
import { storageFromEnv } from "../../server/photos/storage";
import { createTestDb, type TestDb } from "../helpers/db";
import { jobsIdle } from "../helpers/jobs";

let t: TestDb;
let worker: Jobs;
let web: Jobs;
const ran: string[] = [];
let flaky = 0;

beforeAll(async () => {
  t = await createTestDb();
  const define = (j: Jobs) => {
    j.define<{ tag: string }>("test.record", async ({ tag }) => void ran.push(tag));
    j.define<{ tag: string }>(
      "test.flaky",
      async ({ tag }) => {
        if (++flaky < 3) throw new Error(`not yet (${flaky})`);
        ran.push(tag);
      },
      { retryLimit: 4, retryDelay: 1 },
    );
  };
  // A web-only instance (no handlers) and a worker, against one database.
  web = createJobs({ db: t.db, work: false, pollingIntervalSeconds: 0.5 });
  worker = createJobs({ db: t.db, work: true, pollingIntervalSeconds: 0.5 });
  define(web);
  define(worker);
  await web.start();
  await worker.start();
});
afterAll(async () => {
  await web.stop(1000);
  await worker.stop(1000);
  await t.drop();
});

describe("the job queue (pg-boss)", () => {
  it("a job enqueued in a transaction that rolls back never runs; one that commits runs once", async () => {
    await t.db.transaction().execute(async (trx) => {
      await web.enqueue("test.record", { tag: "committed" }, { trx });
    });
    await t.db
      .transaction()
      .execute(async (trx) => {
        await web.enqueue("test.record", { tag: "rolled back" }, { trx });
        throw new Error("the action failed");
      })
      .catch(() => undefined);
    await jobsIdle(t.db);
    expect(ran.filter((x) => x === "committed")).toHaveLength(1);
    expect(ran).not.toContain("rolled back");
  });

  it("a failing job is retried until it succeeds", async () => {
    await web.enqueue("test.flaky", { tag: "third time" });
    const until = Date.now() + 20_000;
    while (!ran.includes("third time") && Date.now() < until) await new Promise((r) => setTimeout(r, 200));
    expect(ran).toContain("third time");
    expect(flaky).toBe(3);
  });

  it("refuses a job nobody defined", async () => {
    await expect(web.enqueue("test.unknown", {})).rejects.toThrow(/No job named/);
  });

  it("reports waiting, running and failed jobs per queue", async () => {
    const s = await web.stats();
    expect(s.queues["test.record"]).toEqual({ waiting: 0, active: 0, failed: 0 });
  });
});

describe("the app's jobs", () => {
  it("keep the weekly summary's schedule in the database (Mondays 07:00 UTC unless WEEKLY_SUMMARY_CRON says otherwise)", async () => {
    const app = await startJobs(
      { db: t.db, mailer: memoryMailer(), publicUrl: "http://x.test", photoStorage: storageFromEnv() },
      { work: true, pollingIntervalSeconds: 0.5 },
    );
    const { rows } = await sql<{
      name: string;
      cron: string;
      timezone: string;
    }>`select name, cron, timezone from pgboss.schedule`.execute(t.db);
    expect(rows).toContainEqual({ name: WEEKLY_SUMMARY_JOB, cron: "0 7 * * 1", timezone: "UTC" });
    await app.stop(1000);
  });

  it("TIDELINE_WORKER=off turns the worker off; anything else leaves it on", () => {
    expect(workerEnabled({ TIDELINE_WORKER: "off" })).toBe(false);
    expect(workerEnabled({ TIDELINE_WORKER: "0" })).toBe(false);
    expect(workerEnabled({})).toBe(true);
    expect(workerEnabled({ TIDELINE_WORKER: "on" })).toBe(true);
  });
});

describe("the queue's own connections", () => {
  it("polls and runs jobs through a small pool of its own, never the request pool, and stops cleanly", async () => {
    const app = createDb(t.url, 10);
    const appPool = poolOf(app)!;
    const jobs = await startJobs(
      { db: app, mailer: memoryMailer(), publicUrl: "http://127.0.0.1", photoStorage: storageFromEnv() },
      { work: true, pollingIntervalSeconds: 0.5 },
    );
    try {
      // A few polling rounds of every queue, and a stats read (the metrics' queue depth).
      await new Promise((r) => setTimeout(r, 2500));
      await jobs.stats();
      expect(appPool.totalCount, "connections the request pool opened for the queue").toBe(0);
    } finally {
      await jobs.stop(2000);
    }
    await app.destroy();
  }, 30_000);
});

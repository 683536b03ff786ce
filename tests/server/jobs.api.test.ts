import { sql, type CompiledQuery } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, poolOf, type Db } from "../../server/db";
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

  it("wake: a worker that polls rarely starts a committed job at once, and drains a backlog without waiting a poll per job", async () => {
    // A third instance polling every 30 s: without wake() each job would wait for the next poll.
    const slow = createJobs({ db: t.db, work: true, pollingIntervalSeconds: 30 });
    const at: number[] = [];
    slow.define<{ n: number }>("test.slow-poll", async () => void at.push(performance.now()));
    await slow.start();
    try {
      await new Promise((r) => setTimeout(r, 300)); // its first (empty) poll is over: it sleeps now
      const t0 = performance.now();
      await t.db.transaction().execute(async (trx) => {
        for (let n = 0; n < 5; n++) await slow.enqueue("test.slow-poll", { n }, { trx });
      });
      slow.wake("test.slow-poll");
      const until = Date.now() + 10_000;
      while (at.length < 5 && Date.now() < until) await new Promise((r) => setTimeout(r, 20));
      expect(at).toHaveLength(5);
      // All five within a few seconds on a loaded machine, far below one 30 s poll.
      expect(at[4] - t0).toBeLessThan(8_000);
    } finally {
      await slow.stop(1000);
    }
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

describe("a long job's lease (pg-boss 10 has no heartbeat; server/jobs/index.ts keeps one)", () => {
  const LEASE = 3;
  const expiryIn = async (name: string) => {
    const { rows } = await sql<{ s: number; state: string; retryCount: number }>`
      select extract(epoch from started_on + expire_in - now())::float as s, state::text, retry_count as "retryCount"
      from pgboss.job where name = ${name} order by created_on desc limit 1`.execute(t.db);
    return rows[0];
  };

  it("a running job's expiry is kept a lease ahead (not its whole hard cap) and a live job is never cut off by it", async () => {
    let finish!: () => void;
    const done = new Promise<void>((r) => (finish = r));
    let runs = 0;
    const jobs = createJobs({ db: t.db, work: true, pollingIntervalSeconds: 0.5, maintenanceIntervalSeconds: 1 });
    jobs.define(
      "test.leased-live",
      async () => {
        runs++;
        await done;
      },
      { leaseSeconds: LEASE, expireInSeconds: 600, retryDelay: 1 },
    );
    await jobs.start();
    try {
      await jobs.enqueue("test.leased-live", {});
      await waitUntil(async () => (await expiryIn("test.leased-live"))?.state === "active");
      // Longer than the lease, with maintenance every second: the renewals keep it active.
      await new Promise((r) => setTimeout(r, (LEASE + 2) * 1000));
      const mid = await expiryIn("test.leased-live");
      expect(mid.state).toBe("active");
      expect(mid.retryCount).toBe(0);
      expect(mid.s, "seconds until the job would be failed").toBeGreaterThan(0);
      expect(mid.s, "seconds until the job would be failed").toBeLessThanOrEqual(LEASE + 0.5);
      finish();
      await waitUntil(async () => (await expiryIn("test.leased-live")).state === "completed");
      expect(runs).toBe(1);
    } finally {
      finish();
      await jobs.stop(2000);
    }
  }, 60_000);

  it("a worker that dies mid-job stops renewing; the job is failed when its lease lapses and another worker runs it", async () => {
    // The dying worker talks to the database through a gate; closing it is the process going away
    // (kill -9): no renewal, no completion, no graceful hand-back. (The real kill is in
    // tests/faults/fleet.test.ts.) Opened again at the end, its held statements then find the job
    // done by the other worker and change nothing.
    const gate = frozenGate(t.db);
    const dying = createJobs({ db: gate.db, work: true, pollingIntervalSeconds: 0.5, maintenanceIntervalSeconds: 1 });
    const seen: string[] = [];
    let unblock!: () => void;
    const never = new Promise<void>((r) => (unblock = r));
    const opts = { leaseSeconds: LEASE, expireInSeconds: 600, retryDelay: 1, retryLimit: 2 };
    dying.define(
      "test.leased-crash",
      async (_d, ctx) => {
        seen.push(`dying, attempt ${ctx.retryCount + 1}`);
        await never;
      },
      opts,
    );
    await dying.start();
    const survivor = createJobs({ db: t.db, work: true, pollingIntervalSeconds: 0.5, maintenanceIntervalSeconds: 1 });
    survivor.define(
      "test.leased-crash",
      async (_d, ctx) => void seen.push(`survivor, attempt ${ctx.retryCount + 1}`),
      opts,
    );
    try {
      await dying.enqueue("test.leased-crash", {});
      await waitUntil(async () => seen.length === 1);
      gate.close(); // "kill -9"
      await survivor.start();
      // Without the lease this waits for the 600 s cap; with it: lease + maintenance + retry delay.
      await waitUntil(async () => (await expiryIn("test.leased-crash")).state === "completed", 45_000);
      expect(seen).toEqual(["dying, attempt 1", "survivor, attempt 2"]);
      const after = await expiryIn("test.leased-crash");
      expect(after.retryCount).toBe(1);
    } finally {
      gate.open();
      unblock();
      await survivor.stop(2000);
      await dying.stop(2000);
      await gate.settled();
    }
    expect(seen, "the dying worker's late completion changes nothing").toHaveLength(2);
  }, 90_000);
});

/** A Db whose statements wait while the gate is closed (a frozen or dead process, seen from the database). */
function frozenGate(db: Db) {
  let closed: Promise<void> | null = null;
  let release = () => {};
  let inFlight = 0;
  const inner = db.withoutPlugins();
  const gated = {
    withoutPlugins: () => gated,
    executeQuery: async (q: CompiledQuery) => {
      inFlight++;
      try {
        while (closed) await closed;
        return await inner.executeQuery(q);
      } finally {
        inFlight--;
      }
    },
  };
  return {
    db: gated as unknown as Db,
    close: () => {
      closed = new Promise<void>((r) => (release = r));
    },
    open: () => {
      closed = null;
      release();
    },
    /** Resolves when no statement of the gated process is still running. */
    settled: () => waitUntil(async () => inFlight === 0),
  };
}

async function waitUntil(check: () => Promise<boolean>, timeoutMs = 20_000) {
  const until = Date.now() + timeoutMs;
  while (!(await check().catch(() => false))) {
    if (Date.now() > until) throw new Error(`not within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

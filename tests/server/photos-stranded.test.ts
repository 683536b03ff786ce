/**
 * The stranded-rendition sweep (`failStranded`) against the real database and the real queue
 * (pg-boss 10.4.2 through `Jobs`, its maintenance every second): a photo whose rendition job's last
 * attempt was failed by expiry (its worker died mid-job) is marked failed with a reason; a photo
 * whose job is still queued, active or set to retry is never touched; a second sweep changes nothing.
 */
import { randomUUID } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createJobs, type Jobs } from "../../server/jobs";
import { startJobs } from "../../server/jobs/registry";
import { memoryMailer } from "../../server/mail/mailer";
import {
  definePhotoJobs,
  failStranded,
  RENDITION_JOB,
  STRANDED_REASON,
  STRANDED_SWEEP_JOB,
  type RenditionJob,
} from "../../server/photos/service";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";

let t: TestDb;
let dir: string;
let jobs: Jobs;
let siteId: string;

beforeAll(async () => {
  t = await createTestDb();
  siteId = (await makeCrew(t.db)).siteId;
  dir = await mkdtemp(join(tmpdir(), "tideline-stranded-"));
  // A worker with the app's rendition job and its queue policy (retryLimit 3, expiry 300 s); the sweep's
  // own schedule is off here, the test runs the sweep itself.
  jobs = createJobs({ db: t.db, work: true, pollingIntervalSeconds: 0.5, maintenanceIntervalSeconds: 1 });
  definePhotoJobs(jobs, { db: t.db, photoStorage: new LocalDiskStorage(join(dir, "store")) }, undefined, {
    PHOTO_STRANDED_CRON: "off",
  });
  await jobs.start();
});
afterAll(async () => {
  await jobs?.stop(2000);
  await t.drop();
  await rm(dir, { recursive: true, force: true });
});

const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000);

/** A photo row as an upload leaves it ('processing' unless told), uploaded `age` minutes ago. */
async function photo(age: number, renditionState: "processing" | "ready" = "processing") {
  const id = randomUUID();
  await t.db
    .insertInto("photos")
    .values({
      id,
      siteId,
      originalName: `${id}.jpg`,
      format: "jpeg",
      width: 640,
      height: 480,
      bytes: 1000,
      capturedAt: null,
      originalKey: `sites/${siteId}/photos/${id}/original.jpg`,
      displayKey: `sites/${siteId}/photos/${id}/display.jpg`,
      thumbKey: `sites/${siteId}/photos/${id}/thumb.jpg`,
      uploadedBy: null,
      renditionState,
      renditionError: null,
      createdAt: minutesAgo(age),
    })
    .execute();
  return id;
}

/** Its rendition job, queued for later so no worker here fetches it; the test then sets its state. */
const queueFor = async (photoId: string) =>
  (await jobs.enqueue(RENDITION_JOB, { siteId, photoId, hevc: false } satisfies RenditionJob, {
    startAfter: new Date(Date.now() + 3600_000),
  }))!;

const jobState = async (id: string) =>
  (
    await sql<{ state: string; retryCount: number; retryLimit: number }>`
    select state, retry_count as "retryCount", retry_limit as "retryLimit" from pgboss.job where id = ${id}`.execute(
      t.db,
    )
  ).rows[0];

const photoState = (id: string) =>
  t.db.selectFrom("photos").select(["renditionState", "renditionError"]).where("id", "=", id).executeTakeFirstOrThrow();

describe("photos whose rendition job is gone", () => {
  it("are marked failed once the queue expired the job's last attempt; queued, active and retrying ones are not", async () => {
    // The last attempt's worker took the job and died: active, no retry left, past its expiry.
    const cutOff = await photo(30);
    const cutOffJob = await queueFor(cutOff);
    await sql`update pgboss.job set state = 'active', retry_count = retry_limit,
                started_on = now() - expire_in - interval '5 seconds'
              where id = ${cutOffJob}`.execute(t.db);
    // pg-boss's own maintenance fails it by timeout (no retry left), as after a real crash.
    const until = Date.now() + 30_000;
    while ((await jobState(cutOffJob)).state !== "failed") {
      if (Date.now() > until) throw new Error("pg-boss did not expire the job");
      await new Promise((r) => setTimeout(r, 250));
    }
    expect(await jobState(cutOffJob)).toMatchObject({ state: "failed", retryLimit: 3, retryCount: 3 });

    // Waiting behind a long queue: its job is still there.
    const waiting = await photo(30);
    await queueFor(waiting);
    // Being made by a live worker (not past its expiry).
    const running = await photo(30);
    const runningJob = await queueFor(running);
    await sql`update pgboss.job set state = 'active', started_on = now() where id = ${runningJob}`.execute(t.db);
    // An earlier attempt failed; the queue retries it later.
    const retrying = await photo(30);
    const retryingJob = await queueFor(retrying);
    await sql`update pgboss.job set state = 'retry', retry_count = 1 where id = ${retryingJob}`.execute(t.db);
    // No job at all, long after its upload (e.g. a job cleared from the queue).
    const jobless = await photo(30);
    // No job visible yet, within the grace.
    const fresh = await photo(1);
    // Finished: never touched.
    const ready = await photo(30, "ready");

    expect(await failStranded({ db: t.db, jobs })).toEqual({ failed: 2 });
    for (const id of [cutOff, jobless])
      expect(await photoState(id)).toEqual({ renditionState: "failed", renditionError: STRANDED_REASON });
    for (const id of [waiting, running, retrying, fresh])
      expect(await photoState(id)).toEqual({ renditionState: "processing", renditionError: null });
    expect(await photoState(ready)).toEqual({ renditionState: "ready", renditionError: null });
    // The live jobs were left as they were.
    expect((await jobState(runningJob)).state).toBe("active");
    expect((await jobState(retryingJob)).state).toBe("retry");

    // Run again: nothing more to do, and the failed photos keep their reason.
    expect(await failStranded({ db: t.db, jobs })).toEqual({ failed: 0 });
    expect(await photoState(cutOff)).toEqual({ renditionState: "failed", renditionError: STRANDED_REASON });
  }, 60_000);

  it("runs on the app's schedule (every five minutes unless PHOTO_STRANDED_CRON says otherwise)", async () => {
    const app = await startJobs(
      {
        db: t.db,
        mailer: memoryMailer(),
        publicUrl: "http://x.test",
        photoStorage: new LocalDiskStorage(join(dir, "store")),
      },
      { work: true, pollingIntervalSeconds: 0.5 },
    );
    await app.stop(2000);
    const { rows } = await sql<{
      cron: string;
    }>`select cron from pgboss.schedule where name = ${STRANDED_SWEEP_JOB}`.execute(t.db);
    expect(rows).toEqual([{ cron: "*/5 * * * *" }]);
  }, 30_000);
});

/**
 * The rendition job's handler against the real database and a real disk store, driven directly
 * (no queue): what it stores, that a store hiccup is thrown for the queue to retry and a later
 * attempt finishes the photo, that the last attempt marks the photo failed with a reason, and that
 * a job queued without the original's key (before 2026-12-03 evening) still works.
 */
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { User } from "lucia";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { JobContext, JobHandler, Jobs } from "../../server/jobs";
import { renderRenditions } from "../../server/photos/images";
import { definePhotoJobs, RENDITION_JOB, uploadPhotos, type RenditionJob } from "../../server/photos/service";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";
import { uploadFields } from "../../src/schemas/photos";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { makeBoard, sidewaysJpegWithGps } from "../helpers/photo-fixtures";
import { log } from "../../server/log";

/** A store whose next `failures` writes (of keys matching `match`) fail, as a full or unreachable disk would. */
class FlakyStore extends LocalDiskStorage {
  failures = 0;
  match = /thumb/;
  writes: string[] = [];
  async put(key: string, body: Buffer, contentType?: string) {
    if (this.match.test(key) && this.failures > 0) {
      this.failures--;
      throw Object.assign(new Error("ENOSPC: no space left on device"), { code: "ENOSPC" });
    }
    this.writes.push(key);
    return super.put(key, body, contentType);
  }
}

let t: TestDb;
let dir: string;
let store: FlakyStore;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let positionId: string;
let handler: JobHandler<RenditionJob>;
const queued: RenditionJob[] = [];
/** Only what uploadPhotos and definePhotoJobs use of the queue: the handler is called by the test. */
const jobs = {
  define: (name: string, h: JobHandler<RenditionJob>) => {
    if (name === RENDITION_JOB) handler = h;
  },
  enqueue: async (_name: string, data: RenditionJob) => (queued.push(data), "job"),
  wake: () => {},
  every: () => {},
  never: () => {},
} as unknown as Jobs;
const ctx = (retryCount: number, retryLimit = 3): JobContext => ({
  id: "job",
  name: RENDITION_JOB,
  retryCount,
  retryLimit,
  lastAttempt: retryCount >= retryLimit,
  log,
});

beforeAll(async () => {
  t = await createTestDb();
  fx = await makeCrew(t.db);
  positionId = (await makeBoard(t.db, fx.siteId, ["1-1"])).positions["1-1"].id;
  dir = await mkdtemp(join(tmpdir(), "tideline-rendition-job-"));
  store = new FlakyStore(join(dir, "store"));
  definePhotoJobs(jobs, { db: t.db, photoStorage: store });
});
afterAll(async () => {
  await t.drop();
  await rm(dir, { recursive: true, force: true });
});

/** One upload through the service; returns its photo id and the job it queued. */
async function uploadOne(bytes: Buffer) {
  const path = join(dir, `upload-${queued.length}.jpg`);
  await writeFile(path, bytes);
  const [id] = await uploadPhotos(
    t.db,
    store,
    jobs,
    fx.siteId,
    { user: { id: fx.crew.curator.id } as User, role: "curator" },
    [{ originalname: "board.jpg", path, size: bytes.length }],
    uploadFields.parse({ positionId }),
  );
  return { id, job: queued[queued.length - 1] };
}
const stateOf = (id: string) =>
  t.db
    .selectFrom("photos")
    .select(["renditionState", "renditionError", "displayKey", "thumbKey"])
    .where("id", "=", id)
    .executeTakeFirstOrThrow();

describe("the rendition job", () => {
  it("names the original's key, stores both renditions (the same bytes as made in one go) and marks the photo ready", async () => {
    const bytes = await sidewaysJpegWithGps();
    const { id, job } = await uploadOne(bytes);
    expect(job).toMatchObject({ siteId: fx.siteId, photoId: id, hevc: false });
    expect(job.originalKey).toMatch(new RegExp(`^sites/${fx.siteId}/${id}/original\\.jpg$`));
    await handler(job, ctx(0));
    const row = await stateOf(id);
    expect(row).toMatchObject({ renditionState: "ready", renditionError: null });
    const expected = await renderRenditions(bytes, { hevc: false }, "board.jpg");
    expect((await readFile(join(store.root, row.displayKey))).equals(expected.display)).toBe(true);
    expect((await readFile(join(store.root, row.thumbKey))).equals(expected.thumb)).toBe(true);
    // Done is done: a repeated delivery of the same job writes nothing.
    const writes = store.writes.length;
    await handler(job, ctx(0));
    expect(store.writes.length).toBe(writes);
  });

  it("a failed store write is thrown for the queue to retry (photo still processing); the next attempt finishes it", async () => {
    const { id, job } = await uploadOne(await sidewaysJpegWithGps());
    store.failures = 1;
    await expect(handler(job, ctx(0))).rejects.toThrow(/ENOSPC/);
    expect(await stateOf(id)).toMatchObject({ renditionState: "processing" });
    await handler(job, ctx(1));
    expect(await stateOf(id)).toMatchObject({ renditionState: "ready" });
  });

  it("on the last attempt a failed store write marks the photo failed with its reason (never left processing)", async () => {
    const { id, job } = await uploadOne(await sidewaysJpegWithGps());
    store.failures = 1;
    await expect(handler(job, ctx(3))).rejects.toThrow(/ENOSPC/);
    expect(await stateOf(id)).toMatchObject({
      renditionState: "failed",
      renditionError: expect.stringMatching(/could not be stored/),
    });
  });

  it("a job queued without the original's key (before it was named) reads the key from the row", async () => {
    const { id, job } = await uploadOne(
      await sharp({ create: { width: 900, height: 300, channels: 3, background: "#357" } })
        .jpeg()
        .toBuffer(),
    );
    const { originalKey: _k, ...old } = job;
    await handler(old, ctx(0));
    expect(await stateOf(id)).toMatchObject({ renditionState: "ready" });
    expect(await sharp(await readFile(join(store.root, (await stateOf(id)).thumbKey))).metadata()).toMatchObject({
      width: 320,
      height: 107,
    });
  });

  it("an original missing from the store is retried, not refused as a damaged picture (libvips reads the file itself)", async () => {
    const { id, job } = await uploadOne(await sidewaysJpegWithGps());
    await rm(join(store.root, job.originalKey!));
    await expect(handler(job, ctx(0))).rejects.toThrow(/missing/i);
    expect(await stateOf(id)).toMatchObject({ renditionState: "processing" });
    await expect(handler(job, ctx(3))).rejects.toThrow(/missing/i);
    expect(await stateOf(id)).toMatchObject({
      renditionState: "failed",
      renditionError: expect.stringMatching(/display copy could not be made/),
    });
  });
});

import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { AddressInfo } from "node:net";
import { CreateBucketCommand } from "@aws-sdk/client-s3";
import S3rver from "s3rver";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { findOrphans, purgeDeleted } from "../../server/photos/cleanup";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";
import { S3Storage } from "../../server/photos/storage/s3";
import { StorageNotFound, type PhotoStorage } from "../../server/photos/storage";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer } from "../helpers/http";
import { form, noisyJpeg, sidewaysJpegWithGps } from "../helpers/photo-fixtures";

let t: TestDb;
let fake: S3rver;
let s3dir: string;
let diskDir: string;
let s3: S3Storage;
let disk: LocalDiskStorage;
let fx: Awaited<ReturnType<typeof makeCrew>>;

beforeAll(async () => {
  t = await createTestDb();
  fx = await makeCrew(t.db);
  s3dir = await mkdtemp(join(tmpdir(), "tideline-s3rver-"));
  diskDir = await mkdtemp(join(tmpdir(), "tideline-disk-"));
  // s3rver 3.7.1 on loopback, ephemeral port, its own temp folder.
  fake = new S3rver({ address: "127.0.0.1", port: 0, directory: s3dir, silent: true });
  const addr = (await fake.run()) as AddressInfo;
  s3 = new S3Storage({
    bucket: "tideline-photos",
    endpoint: `http://127.0.0.1:${addr.port}`,
    region: "us-east-1",
    accessKeyId: "S3RVER",
    secretAccessKey: "S3RVER",
    forcePathStyle: true,
  });
  await s3.client.send(new CreateBucketCommand({ Bucket: "tideline-photos" }));
  disk = new LocalDiskStorage(diskDir);
});
afterAll(async () => {
  s3.client.destroy();
  await fake.close();
  await t.drop();
  await rm(s3dir, { recursive: true, force: true });
  await rm(diskDir, { recursive: true, force: true });
});

const readAll = async (s: NodeJS.ReadableStream) => {
  const parts: Buffer[] = [];
  for await (const c of s) parts.push(Buffer.from(c as Buffer));
  return Buffer.concat(parts);
};

describe.each([
  ["local disk", () => disk as PhotoStorage],
  ["fake S3 (s3rver) through @aws-sdk/client-s3", () => s3 as PhotoStorage],
])("storage on %s", (_name, get) => {
  it("put then get returns the very same bytes; list shows the key; delete removes it", async () => {
    const s = get();
    const bytes = await noisyJpeg(320, 240);
    await s.put("sites/a/b/original.jpg", bytes, "image/jpeg");
    expect((await readAll(await s.get("sites/a/b/original.jpg"))).equals(bytes)).toBe(true);
    expect((await s.getBytes("sites/a/b/original.jpg")).equals(bytes)).toBe(true);
    expect(await s.listKeys("sites/a/")).toEqual(["sites/a/b/original.jpg"]);
    await s.delete("sites/a/b/original.jpg");
    expect(await s.listKeys("sites/a/")).toEqual([]);
    await expect(s.get("sites/a/b/original.jpg")).rejects.toBeInstanceOf(StorageNotFound);
    await expect(s.getBytes("sites/a/b/original.jpg")).rejects.toBeInstanceOf(StorageNotFound);
    await s.delete("sites/a/b/original.jpg"); // deleting twice is fine
  });

  it("putFile stores a file's bytes and leaves the file itself to its owner", async () => {
    const s = get();
    const bytes = await noisyJpeg(320, 240);
    const dir = await mkdtemp(join(tmpdir(), "tideline-putfile-"));
    const path = join(dir, "upload.tmp");
    await writeFile(path, bytes);
    await s.putFile("sites/a/c/original.jpg", path, "image/jpeg");
    await rm(dir, { recursive: true }); // the upload's temporary file goes; the stored copy stays
    expect((await s.getBytes("sites/a/c/original.jpg")).equals(bytes)).toBe(true);
    expect(await s.listKeys("sites/a/c/")).toEqual(["sites/a/c/original.jpg"]);
    await s.delete("sites/a/c/original.jpg");
  });

  it("an upload through the app stores the original byte for byte and serves the renditions from it", async () => {
    const s = get();
    const server = await startTestServer({ db: t.db, photoStorage: s });
    const c = server.client();
    await c.signIn(fx.crew.photographer.email);
    const original = await sidewaysJpegWithGps();
    const r = await c.call("POST", `/api/sites/${fx.siteId}/photos`, form([{ name: "s3.jpg", data: original }]));
    expect(r.status).toBe(201);
    await server.jobsIdle(); // the renditions are made by the job queue's worker
    const id = r.body.photos[0].id;
    const got = await fetch(`${server.base}/api/sites/${fx.siteId}/photos/${id}/original`, {
      headers: { cookie: c.cookie },
    });
    expect(Buffer.from(await got.arrayBuffer()).equals(original)).toBe(true);
    expect((await s.listKeys(`sites/${fx.siteId}/${id}/`)).length).toBe(3);
    const shown = await fetch(`${server.base}/api/sites/${fx.siteId}/photos/${id}/display`, {
      headers: { cookie: c.cookie },
    });
    expect(shown.headers.get("content-type")).toBe("image/jpeg");
    await server.close();
  });
});

describe("cleanup", () => {
  it("reports files without rows and rows without files, and purges photos deleted more than 30 days ago", async () => {
    await t.db.deleteFrom("photos").execute(); // a clean slate: the tests above used other stores
    const disk = new LocalDiskStorage(join(diskDir, "cleanup"));
    const server = await startTestServer({ db: t.db, photoStorage: disk });
    const c = server.client();
    await c.signIn(fx.crew.photographer.email);
    const png = await noisyJpeg(64, 64);
    const r = await c.call(
      "POST",
      `/api/sites/${fx.siteId}/photos`,
      form([
        { name: "a.jpg", data: png },
        { name: "b.jpg", data: png },
        { name: "c.jpg", data: png },
      ]),
    );
    await server.jobsIdle();
    await server.close();
    const [a, b, cc] = r.body.photos.map((p: { id: string }) => p.id);
    await disk.put(`sites/${fx.siteId}/stray/original.jpg`, png, "image/jpeg");
    const row = await t.db.selectFrom("photos").select("thumbKey").where("id", "=", b).executeTakeFirstOrThrow();
    await disk.delete(row.thumbKey);
    const report = await findOrphans(t.db, disk);
    expect(report.filesWithoutRows).toEqual([`sites/${fx.siteId}/stray/original.jpg`]);
    expect(report.rowsWithoutFiles).toEqual([{ photoId: b, missing: [row.thumbKey] }]);

    const now = new Date("2027-03-01T12:00:00Z");
    await t.db
      .updateTable("photos")
      .set({ deletedAt: new Date("2027-01-20T12:00:00Z") })
      .where("id", "=", a)
      .execute(); // 40 days before
    await t.db
      .updateTable("photos")
      .set({ deletedAt: new Date("2027-02-20T12:00:00Z") })
      .where("id", "=", cc)
      .execute(); // 9 days before
    expect(await purgeDeleted(t.db, disk, now)).toEqual([a]);
    expect(await t.db.selectFrom("photos").select("id").where("id", "in", [a, cc]).execute()).toEqual([{ id: cc }]);
    expect(await disk.listKeys(`sites/${fx.siteId}/${a}/`)).toEqual([]);
    expect((await disk.listKeys(`sites/${fx.siteId}/${cc}/`)).length).toBe(3);
  });
});

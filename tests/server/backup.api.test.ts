/**
 * `npm run backup` / `npm run restore`: a round trip through the archive puts
 * the database and the photo store back byte for byte, on local disk and on S3 (s3rver
 * through the real @aws-sdk/client-s3).
 */
import { randomBytes } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { AddressInfo } from "node:net";
import { CreateBucketCommand } from "@aws-sdk/client-s3";
import { sql } from "kysely";
import S3rver from "s3rver";
import * as tar from "tar";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { backup, restore } from "../../server/backup";
import type { PhotoStorage } from "../../server/photos/storage";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";
import { S3Storage } from "../../server/photos/storage/s3";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";

let t: TestDb;
let work: string;
let fake: S3rver;
let s3: S3Storage;
let fx: Awaited<ReturnType<typeof makeCrew>>;

beforeAll(async () => {
  t = await createTestDb();
  fx = await makeCrew(t.db);
  await t.db.insertInto("boards").values({ siteId: fx.siteId, name: "Main switchboard" }).execute();
  await t.db
    .insertInto("floodEvents")
    .values([
      {
        siteId: fx.siteId,
        occurredOn: "2026-11-20",
        waterType: "salt",
        notes: "Harbour water to 1.1 m — ünïcode kept",
      },
      { siteId: fx.siteId, occurredOn: "2026-11-21", waterType: "brackish", notes: "second" },
    ])
    .execute();
  work = await mkdtemp(join(tmpdir(), "tideline-backup-test-"));
  fake = new S3rver({ address: "127.0.0.1", port: 0, directory: join(work, "s3"), silent: true });
  const addr = (await fake.run()) as AddressInfo;
  s3 = new S3Storage({
    bucket: "tideline-backup",
    endpoint: `http://127.0.0.1:${addr.port}`,
    region: "us-east-1",
    accessKeyId: "S3RVER",
    secretAccessKey: "S3RVER",
    forcePathStyle: true,
  });
  await s3.client.send(new CreateBucketCommand({ Bucket: "tideline-backup" }));
});

afterAll(async () => {
  s3?.client.destroy();
  await fake?.close();
  await t?.drop();
  await rm(work, { recursive: true, force: true });
});

/** Every row of the tables a crew's work lives in, as text, in a stable order. */
async function snapshot() {
  const out: Record<string, unknown[]> = {};
  for (const table of ["users", "sites", "memberships", "boards", "flood_events", "audit_log"]) {
    const exists = await sql<{
      n: number;
    }>`select count(*)::int as n from information_schema.tables where table_name = ${table}`.execute(t.db);
    if (!exists.rows[0].n) continue;
    const r = await sql<{ row: string }>`select t::text as row from ${sql.table(table)} t order by 1`.execute(t.db);
    out[table] = r.rows.map((x) => x.row);
  }
  return out;
}

async function photoBytes(storage: PhotoStorage) {
  const out = new Map<string, string>();
  for (const key of await storage.listKeys()) {
    const parts: Buffer[] = [];
    for await (const c of await storage.get(key)) parts.push(Buffer.from(c as Buffer));
    out.set(key, Buffer.concat(parts).toString("base64"));
  }
  return out;
}

describe.each([
  ["local disk", () => new LocalDiskStorage(join(work, "photos-disk")) as PhotoStorage],
  ["S3 (s3rver)", () => s3 as PhotoStorage],
])("backup and restore with photos on %s", (name, storageOf) => {
  it("backup, change and delete rows and photos, restore: everything is back byte for byte", async () => {
    const storage = storageOf();
    for (const key of ["a/original.jpg", "a/display.jpg", "b/original.png"])
      await storage.put(`sites/${fx.siteId}/${key}`, randomBytes(50_000 + key.length), "image/jpeg");
    const dbBefore = await snapshot();
    const photosBefore = await photoBytes(storage);

    const file = join(work, `backup-${name.replace(/\W+/g, "-")}.tar.gz`);
    const made = await backup({ databaseUrl: t.url, storage, out: file });
    expect(made.photos).toBe(3);
    const names: string[] = [];
    await tar.list({ file, onReadEntry: (e) => void names.push(e.path) });
    expect(names).toEqual(
      expect.arrayContaining(["manifest.json", "database.dump", `photos/sites/${fx.siteId}/a/original.jpg`]),
    );

    // A bad day: rows changed, added and deleted, a photo deleted, one overwritten, one added.
    await t.db.updateTable("boards").set({ name: "Renamed by mistake" }).where("siteId", "=", fx.siteId).execute();
    await t.db.deleteFrom("floodEvents").where("notes", "=", "second").execute();
    await t.db
      .insertInto("floodEvents")
      .values({ siteId: fx.siteId, occurredOn: "2026-12-01", waterType: "fresh", notes: "after the backup" })
      .execute();
    await storage.delete(`sites/${fx.siteId}/a/display.jpg`);
    await storage.put(`sites/${fx.siteId}/b/original.png`, randomBytes(10), "image/png");
    await storage.put(`sites/${fx.siteId}/c/original.jpg`, randomBytes(10), "image/jpeg");
    expect(await snapshot()).not.toEqual(dbBefore);

    const r = await restore({ databaseUrl: t.url, storage, file });
    expect(r).toEqual({ photos: 3, removed: 1 });
    expect(await snapshot()).toEqual(dbBefore);
    expect(await photoBytes(storage)).toEqual(photosBefore);
    // The app's pool works on the restored database.
    expect(
      (
        await t.db
          .selectFrom("floodEvents")
          .select("notes")
          .where("siteId", "=", fx.siteId)
          .orderBy("occurredOn")
          .execute()
      ).map((x) => x.notes),
    ).toEqual(["Harbour water to 1.1 m — ünïcode kept", "second"]);
  });
});

it("refuses a file that is not a Tideline backup, changing nothing", async () => {
  const file = join(work, "not-a-backup.tar.gz");
  const { writeFile } = await import("node:fs/promises");
  await writeFile(join(work, "manifest.json"), JSON.stringify({ format: "something-else", version: 1 }));
  await tar.create({ gzip: true, file, cwd: work }, ["manifest.json"]);
  const before = await snapshot();
  await expect(
    restore({ databaseUrl: t.url, storage: new LocalDiskStorage(join(work, "photos-x")), file }),
  ).rejects.toThrow(/not a Tideline backup/);
  expect(await snapshot()).toEqual(before);
});

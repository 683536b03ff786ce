import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { acquireExportSlot, releaseExportSlot, runningExports } from "../../server/export-stream";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type TestServer } from "../helpers/http";

// A person's cap on concurrent downloads (EXPORTS_PER_PERSON, 2) is kept in PostgreSQL
// (export_slots), so it holds across server instances on one database, not per process.
let t: TestDb;
let a: TestServer;
let b: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;

beforeAll(async () => {
  t = await createTestDb();
  fx = await makeCrew(t.db);
  // Two instances of the app on the same database, as behind a load balancer.
  a = await startTestServer({ db: t.db });
  b = await startTestServer({ db: t.db });
});

afterAll(async () => {
  await a?.close();
  await b?.close();
  await t?.drop();
});

const slots = (holder: string) => t.db.selectFrom("exportSlots").select("id").where("holder", "=", holder).execute();

describe("download slots in PostgreSQL", () => {
  it("gives a person two slots, refuses a third, and frees one on release", async () => {
    const one = await acquireExportSlot(t.db, "person-1", 2);
    const two = await acquireExportSlot(t.db, "person-1", 2);
    expect(one).toBeTruthy();
    expect(two).toBeTruthy();
    expect(await acquireExportSlot(t.db, "person-1", 2)).toBeNull();
    expect(await acquireExportSlot(t.db, "person-2", 2)).toBeTruthy(); // someone else is not affected
    await releaseExportSlot(t.db, one!);
    expect(await acquireExportSlot(t.db, "person-1", 2)).toBeTruthy();
  });

  it("stops counting a slot whose lease ran out (its instance died)", async () => {
    expect(await acquireExportSlot(t.db, "person-3", 1)).toBeTruthy();
    expect(await acquireExportSlot(t.db, "person-3", 1)).toBeNull();
    await t.db
      .updateTable("exportSlots")
      .set({ leaseUntil: new Date(Date.now() - 1000) })
      .where("holder", "=", "person-3")
      .execute();
    expect(await acquireExportSlot(t.db, "person-3", 1)).toBeTruthy();
    expect(await slots("person-3")).toHaveLength(1); // the expired row is gone
  });

  it("hands out exactly the cap when many ask at once", async () => {
    const got = await Promise.all(Array.from({ length: 8 }, () => acquireExportSlot(t.db, "person-4", 2)));
    expect(got.filter(Boolean)).toHaveLength(2);
    expect(await slots("person-4")).toHaveLength(2);
  });
});

describe("the cap across two instances", () => {
  it("refuses a download on instance B while the person's two slots are held elsewhere, with Retry-After", async () => {
    const viewer = b.client();
    await viewer.signIn(fx.crew.viewer.email);
    const held = [await acquireExportSlot(t.db, fx.crew.viewer.id), await acquireExportSlot(t.db, fx.crew.viewer.id)];
    const refused = await viewer.get(`/api/sites/${fx.siteId}/defects.csv`);
    expect(refused.status).toBe(429);
    expect(refused.body.error.code).toBe("too_many_exports");
    expect(Number(refused.headers.get("retry-after"))).toBeGreaterThan(0);
    for (const id of held) await releaseExportSlot(t.db, id!);

    const onA = a.client();
    await onA.signIn(fx.crew.viewer.email);
    const ok = await onA.get(`/api/sites/${fx.siteId}/defects.csv`);
    expect(ok.status).toBe(200);
    // The finished download gave its slot back, in the database and in this process's count.
    await expect.poll(async () => (await slots(fx.crew.viewer.id)).length).toBe(0);
    expect(runningExports().get(fx.crew.viewer.id)).toBeUndefined();
  });

  it("a finished download has given its slot back by the time its last byte arrives: three in a row, none refused", async () => {
    const c = a.client();
    await c.signIn(fx.crew.curator.email);
    for (const path of ["defects.csv", "parts.csv", "inventory.csv"]) {
      const r = await c.get(`/api/sites/${fx.siteId}/${path}`);
      expect(r.status, path).toBe(200);
      // No waiting: the slot row is already gone when the response has been read.
      expect(await slots(fx.crew.curator.id), path).toHaveLength(0);
    }
  });
});

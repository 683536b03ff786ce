/** Integrity: defect numbers per site, one position per grid cell, file names, hashed session ids. */
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sessionKey } from "../../server/auth/session-repository";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew, makeUser } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { plainPng } from "../helpers/photo-fixtures";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
let dir: string;

beforeAll(async () => {
  t = await createTestDb();
  dir = await mkdtemp(join(tmpdir(), "tideline-integrity-"));
  server = await startTestServer({ db: t.db, photoStorage: new LocalDiskStorage(dir) });
  fx = await makeCrew(t.db);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
});
afterAll(async () => {
  await server.close();
  await t.drop();
  await rm(dir, { recursive: true, force: true });
});

async function newBoard(c: Client, siteId: string, name: string) {
  const r = await c.post(`/api/sites/${siteId}/boards`, { name, gridRows: 4, gridCols: 6 });
  expect(r.status).toBe(201);
  return r.body.id as string;
}

describe("defect numbers count per site", () => {
  it("site B's first defect is D-1 even after site A has several; two raised at once get different numbers", async () => {
    const boardA = await newBoard(curator, fx.siteId, "A main");
    const raise = (c: Client, siteId: string, boardId: string, title: string) =>
      c.post(`/api/sites/${siteId}/defects`, { boardId, title, category: "corrosion", severity: "degraded" });
    for (const n of [1, 2, 3])
      expect((await raise(curator, fx.siteId, boardA, `Verdigris on bus ${n}`)).body.defect.ref).toBe(n);

    const curatorB = server.client();
    const b = await makeUser(t.db, { siteId: fx.otherSiteId, role: "volunteer" });
    await t.db.updateTable("memberships").set({ role: "curator" }).where("userId", "=", fx.crew.outsider.id).execute();
    await curatorB.signIn(fx.crew.outsider.email);
    const boardB = await newBoard(curatorB, fx.otherSiteId, "B main");
    expect((await raise(curatorB, fx.otherSiteId, boardB, "Lamp socket cracked")).body.defect.ref).toBe(1);

    const vol = server.client();
    await vol.signIn(b.email);
    const both = await Promise.all([
      raise(curatorB, fx.otherSiteId, boardB, "Seized handle"),
      raise(vol, fx.otherSiteId, boardB, "Missing arc chute"),
    ]);
    expect(both.map((r) => r.body.defect.ref).sort()).toEqual([2, 3]);
  });
});

describe("one position per grid cell", () => {
  it("the API refuses a second position on a taken cell (409 naming the holder), as the CSV import does", async () => {
    const boardId = await newBoard(curator, fx.siteId, "Grid check");
    const pos = (designation: string, gridRow: number, gridCol: number, extra = {}) =>
      curator.post(`/api/sites/${fx.siteId}/boards/${boardId}/positions`, {
        designation,
        kind: "molded_case_breaker",
        gridRow,
        gridCol,
        ...extra,
      });
    expect((await pos("1-1", 1, 1, { colSpan: 2 })).status).toBe(201);
    const clash = await pos("1-2", 1, 2);
    expect(clash.status).toBe(409);
    expect(clash.body.error.message).toContain("1-1");
    expect((await pos("1-3", 1, 3)).status).toBe(201);
    const moved = await curator.get(`/api/sites/${fx.siteId}/boards/${boardId}`);
    const p13 = moved.body.positions.find((p: { designation: string }) => p.designation === "1-3");
    const onto = await curator.patch(`/api/sites/${fx.siteId}/positions/${p13.id}`, {
      version: p13.version,
      gridCol: 2,
    });
    expect(onto.status).toBe(409);
  });

  it("the database refuses it too (exclusion constraint), so two saves at once cannot both land", async () => {
    const board = await t.db
      .insertInto("boards")
      .values({ siteId: fx.siteId, name: "Raw grid" })
      .returning("id")
      .executeTakeFirstOrThrow();
    const row = (designation: string, gridCol: number) => ({
      siteId: fx.siteId,
      boardId: board.id,
      designation,
      kind: "fuse" as const,
      gridRow: 2,
      gridCol,
    });
    await t.db.insertInto("positions").values(row("F1", 1)).execute();
    await expect(t.db.insertInto("positions").values(row("F2", 1)).execute()).rejects.toMatchObject({ code: "23P01" });
  });
});

describe("upload file names", () => {
  it("a name with non-ASCII characters (Ståle's 配電盤 №3.png) is stored as typed, not as latin1 mojibake", async () => {
    const name = "Ståle's 配電盤 №3.png";
    const form = new FormData();
    form.append("files", new Blob([new Uint8Array(await plainPng())], { type: "image/png" }), name);
    const r = await curator.call("POST", `/api/sites/${fx.siteId}/photos`, form);
    expect(r.status).toBe(201);
    expect(r.body.photos[0].originalName).toBe(name);
  });
});

describe("session ids", () => {
  it("the database keeps only the SHA-256 of the id in the cookie", async () => {
    const c = server.client();
    await c.signIn(fx.crew.viewer.email);
    const id = c.cookie.split("=")[1];
    const rows = await t.db.selectFrom("sessions").select("id").where("userId", "=", fx.crew.viewer.id).execute();
    expect(rows.map((r) => r.id)).toContain(sessionKey(id));
    expect(rows.map((r) => r.id)).not.toContain(id);
    expect((await c.get("/api/session")).status).toBe(200);
    await c.post("/api/auth/sign-out");
    expect(
      await t.db.selectFrom("sessions").select("id").where("id", "=", sessionKey(id)).executeTakeFirst(),
    ).toBeUndefined();
  });
});

import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { reconcileDemand } from "../../server/parts/service";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { loggingDb } from "../helpers/query-log";
import { BREAKER, makeBoard, makeComponent, makeDefect, registerChanged, setDisposition } from "./parts-fixtures";

// Merging rules: Tideline's own (src/domain/parts.ts). These tests check the
// register → wanted list wiring over HTTP against real PostgreSQL.
let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let scrounger: Client;
let siteId: string;
let boardId: string;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  scrounger = server.client();
  await scrounger.signIn(fx.crew.scrounger.email);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});
beforeEach(async () => {
  // A fresh site per test keeps the lists independent.
  const s = await t.db
    .insertInto("sites")
    .values({ name: "Test hulk", kind: "vessel", location: "", description: "" })
    .returning("id")
    .executeTakeFirstOrThrow();
  siteId = s.id;
  await t.db.insertInto("memberships").values({ siteId, userId: fx.crew.scrounger.id, role: "scrounger" }).execute();
  boardId = (await makeBoard(t.db, siteId)).id;
});

const list = async (q = "") => {
  const r = await scrounger.get(`/api/sites/${siteId}/parts${q}`);
  expect(r.status).toBe(200);
  return r.body.lines as Array<Record<string, any>>;
};

describe("demand follows dispositions", () => {
  it("when a component is set to replace, a wanted line appears with its position; set back to clean, it is gone", async () => {
    const c = await makeComponent(t.db, siteId, boardId, "2-14");
    expect(await list()).toEqual([]);
    await setDisposition(t.db, c.componentId, "replace");
    const lines = await list();
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatchObject({
      status: "wanted",
      qty: 1,
      kind: "power_breaker",
      ratingAmps: 225,
      heritageRule: "original_only",
      origin: "register",
    });
    expect(lines[0].positions).toEqual([
      expect.objectContaining({ designation: "2-14", boardId, componentId: c.componentId, state: "active" }),
    ]);
    await setDisposition(t.db, c.componentId, "clean");
    expect(await list()).toEqual([]);
    const all = await list("?status=all");
    expect(all[0]).toMatchObject({ status: "cancelled", qty: 0 });
  });

  it("when two positions need the same spec (maker typed differently), they share one line of qty 2; other poles split", async () => {
    const a = await makeComponent(t.db, siteId, boardId, "1-1", { ...BREAKER, disposition: "source" });
    const b = await makeComponent(t.db, siteId, boardId, "1-2", {
      ...BREAKER,
      maker: "  NORTHBAY electric",
      disposition: "replace",
    });
    await makeComponent(t.db, siteId, boardId, "1-3", { ...BREAKER, poles: 2, disposition: "replace" });
    const lines = await list();
    expect(lines.map((l) => l.qty).sort()).toEqual([1, 2]);
    const merged = lines.find((l) => l.qty === 2)!;
    expect(merged.positions.map((p: any) => p.componentId).sort()).toEqual([a.componentId, b.componentId].sort());
  });

  it("when a merged position goes back to clean, the line keeps the other and its quantity drops", async () => {
    const a = await makeComponent(t.db, siteId, boardId, "3-1", { ...BREAKER, disposition: "replace" });
    await makeComponent(t.db, siteId, boardId, "3-2", { ...BREAKER, disposition: "replace" });
    const before = await list();
    await setDisposition(t.db, a.componentId, "clean");
    const after = await list();
    expect(after).toHaveLength(1);
    expect(after[0]).toMatchObject({ id: before[0].id, qty: 1 });
  });

  it("when a component's nameplate changes, its demand moves to the line of the new spec", async () => {
    const a = await makeComponent(t.db, siteId, boardId, "4-1", { ...BREAKER, disposition: "replace" });
    await list();
    await t.db.updateTable("components").set({ ratingAmps: 400 }).where("id", "=", a.componentId).execute();
    await registerChanged(t.db, siteId, { componentIds: [a.componentId] });
    const lines = await list();
    expect(lines).toHaveLength(1);
    expect(lines[0].ratingAmps).toBe(400);
  });

  it("a retired component asks for nothing", async () => {
    const a = await makeComponent(t.db, siteId, boardId, "4-2", { ...BREAKER, disposition: "replace" });
    await t.db.updateTable("components").set({ retiredAt: new Date() }).where("id", "=", a.componentId).execute();
    await registerChanged(t.db, siteId, { componentIds: [a.componentId] });
    expect(await list()).toEqual([]);
  });

  it("an open defect with parts wanted adds a line for the named part; a closed one does not", async () => {
    const c = await makeComponent(t.db, siteId, boardId, "5-1");
    const d = await makeDefect(t.db, siteId, boardId, c, { partsNeeded: "Arc chute" });
    await makeDefect(t.db, siteId, boardId, c, { partsNeeded: "handle", status: "closed" });
    const lines = await list();
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatchObject({ need: "Arc chute", qty: 1 });
    expect(lines[0].positions[0]).toMatchObject({ defectId: d.id, defectTitle: "Arc chute cracked" });
    await t.db.updateTable("defects").set({ partsState: "in_hand" }).where("id", "=", d.id).execute();
    await registerChanged(t.db, siteId, { defectIds: [d.id] });
    expect(await list()).toEqual([]);
  });

  it("a defect asking for its whole component, when that component is itself being replaced, adds no second part", async () => {
    const c = await makeComponent(t.db, siteId, boardId, "5-2", { ...BREAKER, disposition: "replace" });
    const d = await makeDefect(t.db, siteId, boardId, c, { partsNeeded: "" });
    const lines = await list();
    expect(lines).toHaveLength(1);
    expect(lines[0].qty).toBe(1);
    expect(lines[0].positions.map((p: any) => p.defectId ?? p.componentId).sort()).toEqual(
      [c.componentId, d.id].sort(),
    );
  });

  it("reconcileDemand is idempotent: running it again adds no links or lines", async () => {
    await makeComponent(t.db, siteId, boardId, "6-1", { ...BREAKER, disposition: "replace" });
    await t.db.transaction().execute((trx) => reconcileDemand(trx, siteId));
    const again = await t.db.transaction().execute((trx) => reconcileDemand(trx, siteId));
    expect(again).toEqual({ created: 0, linked: 0, withdrawn: 0 });
    const links = await t.db.selectFrom("partDemandLinks").select("id").where("siteId", "=", siteId).execute();
    expect(links).toHaveLength(1);
  });

  it("after the line is fitted it stays in the history (status fitted) even when the component goes back to clean, and no new line appears", async () => {
    const c = await makeComponent(t.db, siteId, boardId, "7-1", { ...BREAKER, disposition: "replace" });
    const [line] = await list();
    const date = "2026-11-20";
    let v = line.version;
    for (const body of [
      { to: "acquired", acquisition: { cost: 80, acquiredOn: date } },
      { to: "received", note: "Inspected: contacts good" },
      { to: "fitted", heritageAfter: "period" },
    ]) {
      const r = await scrounger.post(`/api/sites/${siteId}/parts/${line.id}/status`, { ...body, version: v });
      expect(r.status, JSON.stringify(r.body)).toBe(200);
      v = r.body.line.version;
    }
    expect(await list()).toEqual([]); // open list: nothing more wanted
    await setDisposition(t.db, c.componentId, "clean");
    const fitted = await list("?status=fitted");
    expect(fitted).toHaveLength(1);
    expect(fitted[0]).toMatchObject({ id: line.id, qty: 1 });
    expect(fitted[0].positions[0]).toMatchObject({ designation: "7-1", state: "fitted" });
  });
});

describe("manual lines and must-match lists", () => {
  it("a hand-added line with a relaxed must-match list absorbs register demand of another maker", async () => {
    const add = await scrounger.post(`/api/sites/${siteId}/parts`, {
      kind: "power_breaker",
      ratingAmps: 225,
      poles: 3,
      mustMatch: ["ratingAmps", "poles"],
      qty: 1,
      notes: "one spare",
    });
    expect(add.status, JSON.stringify(add.body)).toBe(201);
    await makeComponent(t.db, siteId, boardId, "8-1", { ...BREAKER, maker: "Other Works", disposition: "replace" });
    const lines = await list();
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatchObject({ id: add.body.line.id, origin: "manual", qty: 2, manualQty: 1 });
  });
});

describe("through the inventory's disposition endpoint", () => {
  it("when the curator sets a component to replace through the API, it is wanted; back to clean, it is gone", async () => {
    const curator = server.client();
    await curator.signIn(fx.crew.curator.email);
    await t.db.insertInto("memberships").values({ siteId, userId: fx.crew.curator.id, role: "curator" }).execute();
    const c = await makeComponent(t.db, siteId, boardId, "9-1");
    const put = (disposition: string, version: number) =>
      curator.put(`/api/sites/${siteId}/components/${c.componentId}/disposition`, {
        disposition,
        reason: "Test: curator's call",
        version,
      });
    const r1 = await put("replace", 1);
    expect(r1.status, JSON.stringify(r1.body)).toBe(200);
    const lines = await list();
    expect(lines.map((l) => l.positions.map((p: any) => p.designation))).toEqual([["9-1"]]);
    const r2 = await put("clean", r1.body.component.version);
    expect(r2.status, JSON.stringify(r2.body)).toBe(200);
    expect(await list()).toEqual([]);
  });
});

describe("through the defects and inventory services (kept current by the writes, never by a read)", () => {
  let curator: Awaited<ReturnType<typeof server.client>>;
  beforeEach(async () => {
    curator = server.client();
    await curator.signIn(fx.crew.curator.email);
    await t.db.insertInto("memberships").values({ siteId, userId: fx.crew.curator.id, role: "curator" }).execute();
  });

  it("a defect raised with parts wanted is on the list at once; closing it as accepted as is withdraws it and the line closes itself", async () => {
    const c = await makeComponent(t.db, siteId, boardId, "10-1");
    const r = await curator.post(`/api/sites/${siteId}/defects`, {
      boardId,
      positionId: c.positionId,
      title: "Handle snapped",
      category: "mechanical",
      severity: "impaired",
      partsNeeded: "Operating handle",
      partsState: "wanted",
    });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    const lines = await list();
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatchObject({ need: "Operating handle", qty: 1 });
    const moved = await curator.post(`/api/sites/${siteId}/defects/${r.body.defect?.id ?? r.body.id}/status`, {
      to: "accepted_as_is",
      reason: "Handle kept as found",
      version: r.body.defect?.version ?? r.body.version,
    });
    expect(moved.status, JSON.stringify(moved.body)).toBe(200);
    expect(await list()).toEqual([]);
    expect((await list("?status=all"))[0]).toMatchObject({ status: "cancelled" });
  });

  it("deleting a position withdraws its demand: the line it alone wanted closes itself", async () => {
    const c = await makeComponent(t.db, siteId, boardId, "10-2", { ...BREAKER, disposition: "replace" });
    expect(await list()).toHaveLength(1);
    const r = await curator.del(`/api/sites/${siteId}/positions/${c.positionId}`);
    expect(r.status, JSON.stringify(r.body)).toBeLessThan(300);
    expect(await list()).toEqual([]);
  });

  it("a nameplate edit through the API moves the demand to the new spec's line", async () => {
    const c = await makeComponent(t.db, siteId, boardId, "10-3", { ...BREAKER, disposition: "replace" });
    const r = await curator.patch(`/api/sites/${siteId}/components/${c.componentId}`, { ratingAmps: 600, version: 1 });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    const lines = await list();
    expect(lines.map((l) => l.ratingAmps)).toEqual([600]);
  });

  it("a sync closes only the lines it took demand from: a line left empty by hand waits for its own change or the whole site's", async () => {
    const kept = await makeComponent(t.db, siteId, boardId, "11-1", {
      ...BREAKER,
      model: "NB 11",
      disposition: "replace",
    });
    await setDisposition(t.db, kept.componentId, "clean");
    const line = (await list("?status=all")).find((l) => l.model === "NB 11")!;
    expect(line.status).toBe("cancelled");
    // Reopened by hand with nothing asking for it: another component's change leaves it alone.
    const r = await scrounger.post(`/api/sites/${siteId}/parts/${line.id}/status`, {
      to: "wanted",
      version: line.version,
    });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    const log = loggingDb(t.url);
    try {
      const other = await makeComponent(log.db, siteId, boardId, "11-2", { ...BREAKER, model: "NB 12" });
      log.reset();
      await setDisposition(log.db, other.componentId, "replace"); // adds demand, withdraws none
      expect(log.statements.filter((q) => /set status = 'cancelled'/.test(q))).toEqual([]);
      log.reset();
      await setDisposition(log.db, other.componentId, "clean"); // withdraws from its own line only
      const cancels = log.statements.filter((q) => /set status = 'cancelled'/.test(q));
      expect(cancels).toHaveLength(1);
      expect(cancels[0]).toMatch(/pl\.id = any\(/);
    } finally {
      await log.close();
    }
    const now = await list("?status=all");
    expect(now.find((l) => l.model === "NB 11")).toMatchObject({ status: "wanted" });
    expect(now.find((l) => l.model === "NB 12")).toMatchObject({ status: "cancelled" });
    // The whole site's reconcile looks at every line, as before.
    await t.db.transaction().execute((trx) => reconcileDemand(trx, siteId));
    expect((await list("?status=all")).find((l) => l.model === "NB 11")).toMatchObject({ status: "cancelled" });
  });

  it("pages and filters on the server: size, page, total and a text search", async () => {
    for (let i = 0; i < 5; i++)
      await makeComponent(t.db, siteId, boardId, `11-${i}`, {
        ...BREAKER,
        ratingAmps: 100 + i,
        disposition: "replace",
      });
    const r = await scrounger.get(`/api/sites/${siteId}/parts?size=2&page=2&sort=part&dir=desc`);
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({ total: 5, page: 2, size: 2 });
    expect(r.body.lines.map((l: any) => l.ratingAmps)).toEqual([102, 101]);
    const found = await scrounger.get(`/api/sites/${siteId}/parts?q=${encodeURIComponent("nb 3")}`);
    expect(found.body.total).toBe(5);
    const none = await scrounger.get(`/api/sites/${siteId}/parts?q=zzz`);
    expect(none.body).toMatchObject({ total: 0, lines: [] });
  });
});

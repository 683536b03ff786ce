import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { LINKS_IN_ROW } from "../../src/schemas/parts";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { loggingDb, type QueryLog } from "../helpers/query-log";
import { BREAKER, makeBoard, makeComponent, setDisposition } from "./parts-fixtures";

// A row of the wanted list carries a line's first LINKS_IN_ROW positions and a count of them all; the line's
// links route pages through every one (withdrawn ones too). Nothing is lost between the two.
let t: TestDb;
let log: QueryLog;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let crew: Client;
let siteId: string;
let otherSiteId: string;
let bigLine: string;
let smallLine: string;
const made: string[] = [];

async function site(name: string) {
  const s = await t.db
    .insertInto("sites")
    .values({ name, kind: "vessel", location: "", description: "" })
    .returning("id")
    .executeTakeFirstOrThrow();
  await t.db
    .insertInto("memberships")
    .values({ siteId: s.id, userId: fx.crew.volunteer.id, role: "volunteer" })
    .execute();
  return s.id;
}

beforeAll(async () => {
  t = await createTestDb();
  log = loggingDb(t.url);
  server = await startTestServer({ db: log.db });
  fx = await makeCrew(t.db);
  crew = server.client();
  await crew.signIn(fx.crew.volunteer.email);
  siteId = await site("Test hulk");
  otherSiteId = await site("Another hulk");
  const aft = await makeBoard(t.db, siteId, "Aft distribution");
  const main = await makeBoard(t.db, siteId, "Main switchboard");
  // Nine positions want the same breaker, made in the order 9-1, 8-1, … 1-1 and alternating boards; two of
  // them later stop wanting it (withdrawn links, the line's history).
  const comps = [];
  for (let i = 9; i >= 1; i--) {
    const c = await makeComponent(t.db, siteId, (i % 2 ? main : aft).id, `${i}-1`, {
      ...BREAKER,
      disposition: "replace",
    });
    comps.push(c);
    made.push(c.designation);
  }
  await setDisposition(t.db, comps[1].componentId, null); // 8-1
  await setDisposition(t.db, comps[4].componentId, null); // 5-1
  // A second line of two positions (another rating).
  for (const d of ["20-1", "21-1"])
    await makeComponent(t.db, siteId, main.id, d, { ...BREAKER, ratingAmps: 400, disposition: "replace" });
  const lines = (await crew.get(`/api/sites/${siteId}/parts`)).body.lines as Array<{ id: string; qty: number }>;
  bigLine = lines.find((l) => l.qty === 7)!.id;
  smallLine = lines.find((l) => l.qty === 2)!.id;
}, 60_000);
afterAll(async () => {
  await server.close();
  await log.close();
  await t.drop();
});

describe("a row carries its line's first positions and how many there are", () => {
  it("the list's row: the first four to ask for the part, in the order they asked, and a count of all seven", async () => {
    const r = await crew.get(`/api/sites/${siteId}/parts`);
    expect(r.status).toBe(200);
    const line = r.body.lines.find((l: { id: string }) => l.id === bigLine);
    expect(LINKS_IN_ROW).toBe(4);
    expect(line).toMatchObject({ qty: 7, linkCount: 7 });
    expect(line.positions.map((p: { designation: string }) => p.designation)).toEqual(["9-1", "7-1", "6-1", "4-1"]);
    expect(line.positions.every((p: { state: string }) => p.state === "active")).toBe(true);
    const small = r.body.lines.find((l: { id: string }) => l.id === smallLine);
    expect(small).toMatchObject({ qty: 2, linkCount: 2 });
    expect(small.positions).toHaveLength(2);
  });

  it("the line's page heading carries the same row", async () => {
    const r = await crew.get(`/api/sites/${siteId}/parts/${bigLine}`);
    expect(r.status).toBe(200);
    expect(r.body.line).toMatchObject({ qty: 7, linkCount: 7 });
    expect(r.body.line.positions).toHaveLength(4);
  });

  it("the links route pages through every link, withdrawn ones too, in board and designation order", async () => {
    const seen: Array<{ linkId: string; boardName: string; designation: string; state: string }> = [];
    for (let page = 1; page <= 4; page++) {
      const r = await crew.get(`/api/sites/${siteId}/parts/${bigLine}/links?page=${page}&size=3`);
      expect(r.status).toBe(200);
      expect(r.body).toMatchObject({ total: 9, page, size: 3 });
      seen.push(...r.body.links);
    }
    expect(seen.map((l) => `${l.boardName} ${l.designation}`)).toEqual([
      "Aft distribution 2-1",
      "Aft distribution 4-1",
      "Aft distribution 6-1",
      "Aft distribution 8-1",
      "Main switchboard 1-1",
      "Main switchboard 3-1",
      "Main switchboard 5-1",
      "Main switchboard 7-1",
      "Main switchboard 9-1",
    ]);
    expect(seen.filter((l) => l.state === "withdrawn").map((l) => l.designation)).toEqual(["8-1", "5-1"]);
    const inDb = await t.db.selectFrom("partDemandLinks").select("id").where("lineId", "=", bigLine).execute();
    expect(new Set(seen.map((l) => l.linkId))).toEqual(new Set(inDb.map((l) => l.id)));
    expect(made).toHaveLength(9);
  });

  it("the default page is 50 links", async () => {
    const r = await crew.get(`/api/sites/${siteId}/parts/${bigLine}/links`);
    expect(r.body).toMatchObject({ total: 9, page: 1, size: 50 });
    expect(r.body.links).toHaveLength(9);
  });
});

describe("the links route is guarded and checks its input", () => {
  it("a line of another site, or none, is 404; a bad page or line id is 400; no session is 401", async () => {
    expect((await crew.get(`/api/sites/${otherSiteId}/parts/${bigLine}/links`)).status).toBe(404);
    expect((await crew.get(`/api/sites/${siteId}/parts/${crypto.randomUUID()}/links`)).status).toBe(404);
    for (const q of ["page=0", "size=0", "size=501", "page=x"]) {
      const r = await crew.get(`/api/sites/${siteId}/parts/${bigLine}/links?${q}`);
      expect(r.status, q).toBe(400);
      expect(JSON.stringify(r.body)).not.toMatch(/at .*\.ts:\d+/);
    }
    expect((await crew.get(`/api/sites/${siteId}/parts/not-a-line/links`)).status).toBe(400);
    expect((await server.client().get(`/api/sites/${siteId}/parts/${bigLine}/links`)).status).toBe(401);
  });
});

describe("statements", () => {
  const statementsOf = async (path: string) => {
    log.reset();
    const r = await crew.get(path);
    expect(r.status).toBe(200);
    return [...log.statements];
  };

  it("the links route: the same statements for a line of two links and one of nine", async () => {
    const small = await statementsOf(`/api/sites/${siteId}/parts/${smallLine}/links`);
    const big = await statementsOf(`/api/sites/${siteId}/parts/${bigLine}/links`);
    expect([...big].sort()).toEqual([...small].sort()); // the page and the count run side by side
  });

  it("the list's page is the session, the page with its rows' links, the count, the boards and the budget", async () => {
    const statements = await statementsOf(`/api/sites/${siteId}/parts`);
    expect(statements, statements.join("\n")).toHaveLength(5);
  });
});

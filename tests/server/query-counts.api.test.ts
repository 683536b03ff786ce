import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { loggingDb, writes, type QueryLog } from "../helpers/query-log";
import { BREAKER, makeBoard, makeComponent, makeDefect } from "./parts-fixtures";

// A list endpoint must issue a fixed number of statements, whatever the number of rows
// it returns (no query per row: "N+1"). Two sites differ only in size; every endpoint must issue
// the same statements for both.
let t: TestDb;
let log: QueryLog;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
const sites: Record<"small" | "large", { id: string; boardId: string; token: string }> = {} as never;

async function makeSiteOf(size: number, name: string) {
  const s = await t.db
    .insertInto("sites")
    .values({ name, kind: "vessel", location: "", description: "" })
    .returning("id")
    .executeTakeFirstOrThrow();
  await t.db.insertInto("memberships").values({ siteId: s.id, userId: fx.crew.curator.id, role: "curator" }).execute();
  const board = await makeBoard(t.db, s.id);
  for (let i = 0; i < size; i++) {
    // Each spec twice (a line of two positions), a defect naming a sub-part, a nameplate photo and a lead.
    for (const k of [0, 1]) {
      const c = await makeComponent(t.db, s.id, board.id, `${name}-${i}-${k}`, {
        ...BREAKER,
        ratingAmps: 100 + i,
        disposition: "replace",
      });
      await t.db
        .insertInto("photos")
        .values({
          siteId: s.id,
          boardId: board.id,
          positionId: c.positionId,
          componentId: c.componentId,
          kind: "nameplate",
          format: "jpeg",
          width: 10,
          height: 10,
          bytes: 1,
          originalKey: `o/${c.componentId}`,
          displayKey: `d/${c.componentId}`,
          thumbKey: `t/${c.componentId}`,
        })
        .execute();
      if (k === 0) await makeDefect(t.db, s.id, board.id, c, { partsNeeded: `handle ${i}` });
      if (k === 0) {
        // A reading of each kind per spec, through the API as a crew records them.
        const at = `2026-11-${String(1 + (i % 28)).padStart(2, "0")}T09:00:00Z`;
        for (const [path, body] of [
          [
            `boards/${board.id}/insulation-readings`,
            {
              componentId: c.componentId,
              circuit: `Feeder ${i}`,
              testVoltsDc: 1000,
              megohms: 500,
              conductors: "A-G",
              equipmentTempC: 20,
              measuredAt: at,
            },
          ],
          [
            `components/${c.componentId}/contact-readings`,
            { poleMicroOhms: [50, 52, 51], testCurrentA: 100, measuredAt: at },
          ],
          [`components/${c.componentId}/thermal-scans`, { componentTempC: 31, ambientTempC: 25, measuredAt: at }],
        ] as const) {
          const r = await curator.post(`/api/sites/${s.id}/${path}`, body);
          expect(r.status, JSON.stringify(r.body)).toBe(201);
        }
      }
    }
  }
  const lines = await t.db.selectFrom("partLines").select("id").where("siteId", "=", s.id).execute();
  for (const l of lines)
    await t.db
      .insertInto("partLeads")
      .values({ siteId: s.id, lineId: l.id, source: "Breakers' yard (fictional)" })
      .execute();
  const share = await curator.post(`/api/sites/${s.id}/parts/share-links`, { label: "partners" });
  expect(share.status).toBe(201);
  return { id: s.id, boardId: board.id, token: share.body.token as string };
}

beforeAll(async () => {
  t = await createTestDb();
  log = loggingDb(t.url);
  server = await startTestServer({ db: log.db });
  fx = await makeCrew(t.db);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
  sites.small = await makeSiteOf(2, "S");
  sites.large = await makeSiteOf(25, "L");
}, 120_000);
afterAll(async () => {
  await server.close();
  await log.close();
  await t.drop();
});

// A download's slot (server/export-stream.ts) is freed before its last byte (runExport), or when the
// response closes for a download that ends otherwise: wait for that release all the same so it never
// lands in the next request's statements, and leave it out of the count (one statement whatever the size).
const isSlotRelease = (s: string) => /^\s*delete from "export_slots" where "id" = \$1\s*$/i.test(s);

async function statementsOf(path: string) {
  log.reset();
  const r = await curator.get(path);
  expect(r.status, JSON.stringify(r.body).slice(0, 300)).toBe(200);
  if (log.statements.some((s) => /insert into "export_slots"/i.test(s)))
    await vi.waitFor(() => expect(log.statements.filter(isSlotRelease)).toHaveLength(1), { timeout: 10_000 });
  return { body: r.body, statements: log.statements.filter((s) => !isSlotRelease(s)) };
}

// Summaries (overview, board list) answer the same few rows for both sites: there the check is that
// they count the larger site's positions, with the same statements.
const SUMMARIES = new Set(["site overview", "board list"]);
const ENDPOINTS: Array<[string, (s: (typeof sites)["small"]) => string]> = [
  ["wanted list", (s) => `/api/sites/${s.id}/parts?status=all&size=500`],
  ["wanted list filtered by board", (s) => `/api/sites/${s.id}/parts?boardId=${s.boardId}&sort=qty&dir=desc`],
  ["wanted list CSV", (s) => `/api/sites/${s.id}/parts.csv`],
  ["public share link", (s) => `/api/share/parts/${s.token}`],
  ["defect register", (s) => `/api/sites/${s.id}/defects?size=200`],
  ["site overview", (s) => `/api/sites/${s.id}/overview`],
  ["board list", (s) => `/api/sites/${s.id}/boards`],
  ["one board", (s) => `/api/sites/${s.id}/boards/${s.boardId}`],
  ["a board's thumbnail", (s) => `/api/sites/${s.id}/boards/${s.boardId}/thumbnail`],
  ["a board's readings", (s) => `/api/sites/${s.id}/boards/${s.boardId}/readings`],
  ["a board's insulation readings", (s) => `/api/sites/${s.id}/boards/${s.boardId}/insulation-readings`],
  ["a board's contact readings", (s) => `/api/sites/${s.id}/boards/${s.boardId}/contact-readings`],
  ["a board's thermal scans", (s) => `/api/sites/${s.id}/boards/${s.boardId}/thermal-scans`],
];

describe("list endpoints issue a fixed number of statements", () => {
  for (const [name, path] of ENDPOINTS)
    it(`${name}: the same statements for 2 and 25 specifications`, async () => {
      const small = await statementsOf(path(sites.small));
      const large = await statementsOf(path(sites.large));
      if (SUMMARIES.has(name))
        expect(JSON.stringify(large.body)).toMatch(/"(positions|positionCount)":50\b/); // 25 specs × 2 positions
      else expect(JSON.stringify(large.body).length).toBeGreaterThan(JSON.stringify(small.body).length * 3); // the large site really answers more rows
      expect(large.statements.length, large.statements.join("\n")).toBe(small.statements.length);
    });

  it("the wanted list answers every line of the large site, with both positions, the photos and the lead count", async () => {
    const { body } = await statementsOf(`/api/sites/${sites.large.id}/parts?size=500`);
    expect(body.total).toBe(50);
    expect(body.lines).toHaveLength(50);
    const whole = body.lines.filter((l: any) => l.need === "");
    expect(whole).toHaveLength(25);
    for (const l of whole) expect(l).toMatchObject({ qty: 2, leadCount: 1 });
    for (const l of whole) expect(l.photoIds).toHaveLength(2);
  });
});

describe("the fixed cost of a site request", () => {
  it("a member's session and their standing on the site are one statement: the overview is that and its two reads", async () => {
    const { statements } = await statementsOf(`/api/sites/${sites.large.id}/overview`);
    expect(statements, statements.join("\n")).toHaveLength(3);
    expect(statements[0]).toMatch(/from "sessions"/);
    expect(statements[0]).toMatch(/from "memberships"/);
    expect(statements.slice(1).filter((s) => /"memberships"/.test(s))).toEqual([]);
  });
});

describe("reads never write", () => {
  it("a public share-link view runs no insert, update, delete or lock, and no transaction", async () => {
    const { statements } = await statementsOf(`/api/share/parts/${sites.large.token}`);
    expect(writes(statements)).toEqual([]);
    expect(statements.filter((s) => /^\s*begin/i.test(s))).toEqual([]);
  });

  it("reading the wanted list writes nothing either", async () => {
    const { statements } = await statementsOf(`/api/sites/${sites.large.id}/parts`);
    expect(writes(statements).filter((s) => !/sessions/i.test(s))).toEqual([]);
  });
});

import fc from "fast-check";
import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CUSTODY, DISPOSITIONS } from "../../src/domain/vocab";
import { GRADE_KEYS, overviewResponse, type Overview } from "../../src/schemas/inventory";
import { refreshSiteSummaries } from "../../server/inventory/board-summaries-repository";
import { moveCustodyFor } from "../../server/inventory/survey-service";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";

// The overview and the board list read per-board counts kept current by the writes
// (server/inventory/board-summaries-repository.ts). After every kind of write, and after a random sequence of
// them, what they answer must equal the counts taken from scratch over every position — the
// definitions of overviewResponse in src/schemas/inventory.ts, computed here one position at a time.

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
let base: string;
const boards: string[] = [];

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
  base = `/api/sites/${fx.siteId}`;
  for (const name of ["Summary board A", "Summary board B"]) {
    const r = await curator.post(`${base}/boards`, { name, gridRows: 60, gridCols: 60 });
    expect(r.status).toBe(201);
    boards.push(r.body.id);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

interface Fact {
  boardId: string;
  disposition: string | null;
  custody: string | null;
  heritage: string | null;
  inspections: number;
  grade: number | null;
}

/** Every position of the site with its current component and that component's newest inspection. */
const facts = async () =>
  (
    await sql<Fact>`select p.board_id as "boardId", c.disposition, c.custody, c.heritage,
      (select count(*) from inspections i where i.position_id = p.id)::int as inspections,
      (select i.astm_grade from inspections i where i.component_id = c.id
        order by i.inspected_at desc, i.created_at desc, i.id desc limit 1) as grade
      from positions p left join components c on c.position_id = p.id and c.retired_at is null
      where p.site_id = ${fx.siteId}`.execute(t.db)
  ).rows;

/** The overview from scratch, one position at a time (the definitions in overviewResponse). */
async function expectedOverview(): Promise<Overview> {
  const all = await facts();
  const zeros = (keys: readonly string[]) => Object.fromEntries(keys.map((k) => [k, 0]));
  const o = {
    totals: { positions: all.length, surveyed: 0, bySurveyState: zeros(["not_surveyed", "inspected", "decided"]) },
    byDisposition: zeros([...DISPOSITIONS, "undecided"]),
    byCustody: zeros(CUSTODY),
    byGrade: zeros(GRADE_KEYS),
  } as unknown as Omit<Overview, "originalRetained" | "originalRetainedPercent" | "boards">;
  let retained = 0;
  const names = await t.db
    .selectFrom("boards")
    .select(["id", "name"])
    .where("siteId", "=", fx.siteId)
    .orderBy("name")
    .execute();
  const perBoard = names.map((b) => ({ id: b.id, name: b.name, positions: 0, surveyed: 0 }));
  const inc = (rec: object, k: string) => ((rec as Record<string, number>)[k] += 1);
  for (const f of all) {
    const surveyed = f.inspections > 0;
    const b = perBoard.find((x) => x.id === f.boardId)!;
    b.positions++;
    if (surveyed) {
      b.surveyed++;
      o.totals.surveyed++;
    }
    inc(o.totals.bySurveyState, f.disposition ? "decided" : surveyed ? "inspected" : "not_surveyed");
    inc(o.byDisposition, f.disposition ?? "undecided");
    if (f.custody) inc(o.byCustody, f.custody);
    inc(o.byGrade, f.grade === null ? "ungraded" : String(f.grade));
    if (f.heritage === "original" && f.custody !== "scrapped" && f.custody !== "missing") retained++;
  }
  return {
    ...o,
    originalRetained: retained,
    originalRetainedPercent: all.length ? Math.round((retained / all.length) * 1000) / 10 : null,
    boards: perBoard,
  };
}

const summaryRows = () =>
  t.db
    .selectFrom("boardSummaries")
    .select(["boardId", "facet", "key", "surveyed", "n"])
    .where("siteId", "=", fx.siteId)
    .orderBy("boardId")
    .orderBy("facet")
    .orderBy("key")
    .orderBy("surveyed")
    .execute();

/** What the overview and board list answer equals the counts from scratch; so do the kept rows a full rebuild makes. */
async function expectCurrent(step: string) {
  const [overview, list] = await Promise.all([curator.get(`${base}/overview`), curator.get(`${base}/boards`)]);
  expect(overview.status, step).toBe(200);
  const expected = await expectedOverview();
  expect(overviewResponse.parse(overview.body), step).toEqual(expected);
  expect(
    list.body.map((b: { id: string; positionCount: number; surveyedCount: number }) => [
      b.id,
      b.positionCount,
      b.surveyedCount,
    ]),
    step,
  ).toEqual(expected.boards.map((b) => [b.id, b.positions, b.surveyed]));
  const kept = await summaryRows();
  await t.db.transaction().execute((trx) => refreshSiteSummaries(trx, fx.siteId));
  expect(await summaryRows(), `${step}: kept rows = rebuilt rows`).toEqual(kept);
}

let cell = 0;
const nextCell = () => ({ gridRow: Math.floor(cell / 60) + 1, gridCol: (cell++ % 60) + 1 });

async function createPosition(board: number, kind = "molded_case_breaker") {
  const r = await curator.post(`${base}/boards/${boards[board]}/positions`, {
    designation: `P-${cell}`,
    kind,
    ...nextCell(),
  });
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  return r.body.component as { id: string; version: number; positionId: string };
}

const current = async (componentId: string) =>
  t.db.selectFrom("components").select(["id", "version"]).where("id", "=", componentId).executeTakeFirstOrThrow();

const componentsOfSite = () =>
  t.db
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .select(["c.id", "c.version", "c.positionId"])
    .where("c.siteId", "=", fx.siteId)
    .where("c.retiredAt", "is", null)
    .orderBy("p.designation")
    .execute();

describe("each kind of write keeps the overview and board list current", () => {
  it("an empty site: every count zero, the retained share null", async () => {
    await expectCurrent("empty");
  });

  it("creating and generating positions, inspecting, deciding, moving custody, changing heritage, deleting", async () => {
    const a = await createPosition(0);
    const b = await createPosition(0, "meter");
    const c = await createPosition(1);
    await expectCurrent("created");
    const gen = await curator.post(`${base}/boards/${boards[1]}/positions/generate`, {
      prefix: "G-",
      from: 1,
      to: 3,
      gridRow: 50,
      startCol: 1,
      kind: "fuse",
    });
    expect(gen.status).toBe(201);
    await expectCurrent("generated");

    for (const [comp, pct] of [
      [a, 0.5],
      [a, 20],
      [c, null],
    ] as const) {
      const r = await curator.post(`${base}/components/${comp.id}/inspections`, { percentRusted: pct });
      expect(r.status).toBe(201);
      await expectCurrent(`inspected ${pct}`);
    }

    const d = await curator.put(`${base}/components/${a.id}/disposition`, {
      disposition: "rebuild",
      reason: "Contacts pitted",
      version: (await current(a.id)).version,
    });
    expect(d.status).toBe(200);
    await expectCurrent("decided");

    const m = await curator.post(`${base}/components/${b.id}/custody`, {
      toState: "removed",
      tagNumber: "SUM-0001",
      releaseReason: "Summary test: released on purpose",
      version: (await current(b.id)).version,
    });
    expect(m.status, JSON.stringify(m.body)).toBe(201);
    await expectCurrent("custody");

    const h = await curator.patch(`${base}/components/${c.id}`, {
      heritage: "original",
      version: (await current(c.id)).version,
    });
    expect(h.status).toBe(200);
    await expectCurrent("heritage");

    const scrap = await curator.post(`${base}/components/${c.id}/custody`, {
      toState: "scrapped",
      tagNumber: "SUM-0002",
      releaseReason: "Summary test: released on purpose",
      version: (await current(c.id)).version,
    });
    expect([201, 409, 422]).toContain(scrap.status);
    await expectCurrent("scrapped (or refused)");

    expect((await curator.del(`${base}/positions/${a.positionId}`)).status).toBe(204);
    await expectCurrent("deleted");
  });

  it("a custody move another domain makes in its own transaction (the parts workflow's refit)", async () => {
    const c = await createPosition(1);
    await t.db.transaction().execute((trx) =>
      moveCustodyFor(trx, fx.siteId, c.id, fx.crew.curator.id, {
        toState: "ready_to_refit",
        note: "Replacement part received",
        because: "Summary test",
        heritage: "modern",
      }),
    );
    await expectCurrent("moveCustodyFor");
  });

  it("a CSV import that creates a board and positions and changes a heritage", async () => {
    const header = "board,designation,kind,grid_row,grid_col,heritage";
    const file =
      [
        header,
        "Imported board,I-1,meter,1,1,original",
        "Imported board,I-2,fuse,1,2,period",
        "Summary board A,P-1,meter,1,2,modern",
      ].join("\r\n") + "\r\n";
    const r = await curator.call("POST", `${base}/inventory/import?mode=commit`, file, { "content-type": "text/csv" });
    expect(r.status, JSON.stringify(r.body).slice(0, 500)).toBe(201);
    const kept = await t.db
      .selectFrom("components as c")
      .innerJoin("positions as p", "p.id", "c.positionId")
      .select("c.heritage")
      .where("p.boardId", "=", boards[0])
      .where("p.designation", "=", "P-1")
      .executeTakeFirstOrThrow();
    expect(kept.heritage).toBe("modern");
    await expectCurrent("csv import");
  });

  it("two inspections of one board at the same moment both count", async () => {
    const [x, y] = [await createPosition(0), await createPosition(0)];
    const rs = await Promise.all(
      [x, y].map((comp) => curator.post(`${base}/components/${comp.id}/inspections`, { percentRusted: 3 })),
    );
    expect(rs.map((r) => r.status)).toEqual([201, 201]);
    await expectCurrent("concurrent inspections");
  });
});

type Cmd =
  | { k: "create"; board: number }
  | { k: "inspect"; pick: number; pct: number | null }
  | { k: "decide"; pick: number; disposition: (typeof DISPOSITIONS)[number] }
  | { k: "custody"; pick: number; to: (typeof CUSTODY)[number] }
  | { k: "heritage"; pick: number; heritage: "original" | "period" | "modern" }
  | { k: "delete"; pick: number };

const cmd: fc.Arbitrary<Cmd> = fc.oneof(
  fc.record({ k: fc.constant("create" as const), board: fc.integer({ min: 0, max: 1 }) }),
  fc.record({
    k: fc.constant("inspect" as const),
    pick: fc.nat(),
    pct: fc.option(fc.integer({ min: 0, max: 100 }), { nil: null }),
  }),
  fc.record({ k: fc.constant("decide" as const), pick: fc.nat(), disposition: fc.constantFrom(...DISPOSITIONS) }),
  fc.record({ k: fc.constant("custody" as const), pick: fc.nat(), to: fc.constantFrom(...CUSTODY) }),
  fc.record({
    k: fc.constant("heritage" as const),
    pick: fc.nat(),
    heritage: fc.constantFrom("original" as const, "period" as const, "modern" as const),
  }),
  fc.record({ k: fc.constant("delete" as const), pick: fc.nat() }),
);

let tags = 100;
async function run(c: Cmd) {
  if (c.k === "create") return void (await createPosition(c.board));
  const all = await componentsOfSite();
  if (!all.length) return;
  const p = all[c.pick % all.length];
  const url = `${base}/components/${p.id}`;
  const r =
    c.k === "inspect"
      ? await curator.post(`${url}/inspections`, { percentRusted: c.pct })
      : c.k === "decide"
        ? await curator.put(`${url}/disposition`, {
            disposition: c.disposition,
            reason: "Sequence",
            version: p.version,
          })
        : c.k === "custody"
          ? await curator.post(`${url}/custody`, {
              toState: c.to,
              tagNumber: `SEQ-${++tags}`,
              releaseReason: "Random sequence: released",
              version: p.version,
            })
          : c.k === "heritage"
            ? await curator.patch(url, { heritage: c.heritage, version: p.version })
            : await curator.del(`${base}/positions/${p.positionId}`);
  // A move the custody chain refuses outright is a 409/422 and changes nothing; every other write succeeds.
  expect(r.status < 300 || (c.k === "custody" && [409, 422].includes(r.status)), JSON.stringify(r.body)).toBe(true);
}

describe("a random sequence of writes", () => {
  it("leaves the overview and board list equal to a count from scratch after every step", async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(cmd, { minLength: 4, maxLength: 10 }), async (cmds) => {
        for (const [i, c] of cmds.entries()) {
          await run(c);
          await expectCurrent(`step ${i}: ${JSON.stringify(c)}`);
        }
      }),
      { numRuns: 10 },
    );
  }, 240_000);
});

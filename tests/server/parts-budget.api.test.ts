import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { BREAKER, makeBoard, makeComponent, makeDefect, setDisposition } from "./parts-fixtures";

// The wanted list's budget is kept by the writes (server/parts/budget-repository.ts). After each kind of write that
// changes it, the kept sums must equal a count from scratch over every line, link and acquisition of the
// site: the statement the list used to run on every read, kept here as the reference.
let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
let scrounger: Client;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
  scrounger = server.client();
  await scrounger.signIn(fx.crew.scrounger.email);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const url = (p = "") => `/api/sites/${fx.siteId}/parts${p}`;

/** Each (line, board) share counted from scratch over the site's lines, links and acquisitions (exact numerics). */
async function scratch(siteId: string) {
  const r = await sql<{ lineId: string; board: string; estimated: string; spent: string; unestimated: number }>`
    with lines as (
      select id, manual_qty, estimated_unit_cost, status from part_lines where site_id = ${siteId} and status <> 'cancelled'
    ), q as (
      select l.id as line_id, coalesce(dl.board_id::text, '') as board, dl.qty
      from lines l join part_demand_links dl on dl.line_id = l.id and (case when l.status = 'fitted' then dl.fitted else dl.active end)
      union all
      select id, '', manual_qty from lines where manual_qty > 0
    ), qb as (
      select line_id, board, sum(qty) as qty from q group by line_id, board having sum(qty) > 0
    ), tot as (
      select line_id, sum(qty) as total from qb group by line_id
    ), spent as (
      select a.line_id, sum(a.cost) as spent from part_acquisitions a join lines l on l.id = a.line_id group by a.line_id
    )
    select qb.line_id as "lineId", qb.board, coalesce(l.estimated_unit_cost * qb.qty, 0)::text as estimated,
      (coalesce(s.spent, 0) * qb.qty / tot.total)::text as spent, (l.estimated_unit_cost is null)::int as unestimated
    from qb join lines l on l.id = qb.line_id join tot on tot.line_id = qb.line_id left join spent s on s.line_id = qb.line_id
    union all
    select s.line_id, '', '0', s.spent::text, 0 from spent s where s.spent > 0 and not exists (select 1 from tot where tot.line_id = s.line_id)`.execute(
    t.db,
  );
  return r.rows;
}

/** The kept rows equal a count from scratch, exactly; the list's budget is those sums rounded to cents. */
async function expectKept() {
  const siteId = fx.siteId;
  const want = await scratch(siteId);
  const shares = await t.db
    .selectFrom("partBudgetShares")
    .select([
      "lineId",
      "board",
      sql<string>`estimated::text`.as("estimated"),
      sql<string>`spent::text`.as("spent"),
      "unestimated",
    ])
    .where("siteId", "=", siteId)
    .execute();
  const key = (r: { lineId: string; board: string }) => `${r.lineId}/${r.board}`;
  const exact = (x: string) => Number(x).toFixed(12); // the same numeric, whatever its written scale
  const norm = (rows: typeof want) =>
    rows
      .map((r) => ({ ...r, estimated: exact(r.estimated), spent: exact(r.spent) }))
      .sort((a, b) => key(a).localeCompare(key(b)));
  expect(norm(shares)).toEqual(norm(want));

  const sums = new Map<string, { estimated: number; spent: number; unestimatedLines: number; shares: number }>();
  for (const r of want) {
    const s = sums.get(r.board) ?? { estimated: 0, spent: 0, unestimatedLines: 0, shares: 0 };
    sums.set(r.board, {
      estimated: s.estimated + Number(r.estimated),
      spent: s.spent + Number(r.spent),
      unestimatedLines: s.unestimatedLines + r.unestimated,
      shares: s.shares + 1,
    });
  }
  // The per-board sums, compared in SQL so numerics compare exactly (equal whatever their scale).
  const wrong = await sql<{ board: string }>`
    with want as (
      select board, sum(estimated) as e, sum(spent) as s, sum(unestimated) as u, count(*) as n
      from (values ${sql.join(
        want.length
          ? want.map((r) => sql`(${r.board}, ${r.estimated}::numeric, ${r.spent}::numeric, ${r.unestimated}::int)`)
          : [sql`('', 0::numeric, 0::numeric, 0)`],
      )}) v(board, estimated, spent, unestimated)
      where ${want.length > 0}
      group by board
    ), kept as (
      select board, estimated as e, spent as s, unestimated_lines as u, shares as n from part_budget_boards
      where site_id = ${siteId} and shares > 0
    )
    select coalesce(want.board, kept.board) as board from want full join kept on kept.board = want.board
    where want.board is null or kept.board is null or want.e <> kept.e or want.s <> kept.s or want.u <> kept.u or want.n <> kept.n`.execute(
    t.db,
  );
  expect(wrong.rows).toEqual([]);

  const body = (await scrounger.get(url("?size=1"))).body;
  const round2 = (x: number) => Math.round(x * 100) / 100;
  expect(
    body.budget.rows.map((r: any) => ({
      board: r.boardId,
      estimated: r.estimated,
      spent: r.spent,
      unestimatedLines: r.unestimatedLines,
    })),
  ).toEqual(
    [...sums.entries()]
      .sort(([a], [b]) => (a === "" ? 1 : b === "" ? -1 : 0) || (a < b ? -1 : a > b ? 1 : 0))
      .map(([board, s]) => ({
        board,
        estimated: round2(s.estimated),
        spent: round2(s.spent),
        unestimatedLines: s.unestimatedLines,
      })),
  );
}

async function lineOf(model: string) {
  const lines = (await scrounger.get(url("?status=all&size=500"))).body.lines as any[];
  return lines.find((l) => l.model === model && !l.need);
}

describe("the kept budget after each kind of write", () => {
  const model = "NB 7";
  let boardA: { id: string };
  let boardB: { id: string };
  let first: Awaited<ReturnType<typeof makeComponent>>;
  let second: Awaited<ReturnType<typeof makeComponent>>;

  it("a component set to replace adds a line and its share; a second position joins it", async () => {
    boardA = await makeBoard(t.db, fx.siteId, "Board A");
    boardB = await makeBoard(t.db, fx.siteId, "Board B");
    first = await makeComponent(t.db, fx.siteId, boardA.id, "1-1", { ...BREAKER, model, disposition: "replace" });
    await expectKept();
    second = await makeComponent(t.db, fx.siteId, boardB.id, "1-2", { ...BREAKER, model, disposition: "replace" });
    await expectKept();
    expect((await lineOf(model)).qty).toBe(2);
  });

  it("a unit cost and a hand-added quantity edited on the line", async () => {
    const line = await lineOf(model);
    const r = await scrounger.patch(url(`/${line.id}`), { version: line.version, estimatedUnitCost: 133.33 });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    await expectKept();
    const q = await scrounger.patch(url(`/${line.id}`), { version: r.body.line.version, manualQty: 1 });
    expect(q.status, JSON.stringify(q.body)).toBe(200);
    await expectKept();
  });

  it("a line added by hand, with a cost", async () => {
    const r = await scrounger.post(url(), {
      kind: "fuse",
      qty: 7,
      need: "spare cartridges",
      voltageRating: 500,
      estimatedUnitCost: 4.1,
    });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    await expectKept();
  });

  it("an acquisition is shared between the boards in proportion (a third each)", async () => {
    const line = await lineOf(model);
    const r = await scrounger.post(url(`/${line.id}/status`), {
      to: "acquired",
      version: line.version,
      acquisition: { cost: 100, acquiredOn: "2026-11-05" },
    });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    await expectKept();
  });

  it("a defect asking for a sub-part, and one riding on its replaced component", async () => {
    await makeDefect(t.db, fx.siteId, boardB.id, second, { partsNeeded: "arc chute" });
    await expectKept();
    await makeDefect(t.db, fx.siteId, boardA.id, first, { partsNeeded: "" });
    await expectKept();
  });

  it("demand withdrawn through the disposition endpoint, and back again", async () => {
    const put = async (disposition: string) => {
      const v = (
        await t.db
          .selectFrom("components")
          .select("version")
          .where("id", "=", second.componentId)
          .executeTakeFirstOrThrow()
      ).version;
      const r = await curator.put(`/api/sites/${fx.siteId}/components/${second.componentId}/disposition`, {
        disposition,
        reason: "Test: curator's call",
        version: v,
      });
      expect(r.status, JSON.stringify(r.body)).toBe(200);
    };
    await put("clean");
    await expectKept();
    await put("replace");
    await expectKept();
  });

  it("a register line left with no demand closes itself and comes back when wanted again", async () => {
    const lone = await makeComponent(t.db, fx.siteId, boardA.id, "1-3", {
      ...BREAKER,
      model: "NB 9",
      disposition: "replace",
    });
    const line = await lineOf("NB 9");
    const e = await scrounger.patch(url(`/${line.id}`), { version: line.version, estimatedUnitCost: 80 });
    expect(e.status).toBe(200);
    await setDisposition(t.db, lone.componentId, null);
    expect((await lineOf("NB 9")).status).toBe("cancelled");
    await expectKept();
    await setDisposition(t.db, lone.componentId, "replace");
    expect((await lineOf("NB 9")).status).toBe("wanted");
    await expectKept();
  });

  it("cancelled by a person, reopened, then received and fitted (fitted links count)", async () => {
    let line = await lineOf("NB 9");
    const c1 = await scrounger.post(url(`/${line.id}/status`), {
      to: "cancelled",
      reason: "bought elsewhere",
      version: line.version,
    });
    expect(c1.status, JSON.stringify(c1.body)).toBe(200);
    await expectKept();
    const c2 = await scrounger.post(url(`/${line.id}/status`), { to: "wanted", version: c1.body.line.version });
    expect(c2.status, JSON.stringify(c2.body)).toBe(200);
    await expectKept();
    line = await lineOf(model);
    let v = line.version;
    for (const body of [{ to: "received" }, { to: "fitted", heritageAfter: "period" }]) {
      const r = await scrounger.post(url(`/${line.id}/status`), { ...body, version: v });
      expect(r.status, JSON.stringify(r.body)).toBe(200);
      v = r.body.line.version;
      await expectKept();
    }
  });

  it("deleting a position takes its links with its component, a fitted one too", async () => {
    const r = await curator.del(`/api/sites/${fx.siteId}/positions/${first.positionId}`);
    expect(r.status, JSON.stringify(r.body)).toBeLessThan(300);
    await expectKept();
  });

  it("a line's specification edited (the whole site's demand matched again)", async () => {
    const line = await lineOf("NB 9");
    const r = await scrounger.patch(url(`/${line.id}`), { version: line.version, model: "NB 9A" });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    await expectKept();
  });

  it("concurrent writers on one site: every change is counted", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Board C");
    const comps = [];
    for (let i = 0; i < 6; i++)
      comps.push(await makeComponent(t.db, fx.siteId, board.id, `3-${i}`, { ...BREAKER, model: `NB ${20 + (i % 2)}` }));
    await Promise.all(comps.map((c) => setDisposition(t.db, c.componentId, "replace")));
    await expectKept();
    const lines = await Promise.all([lineOf("NB 20"), lineOf("NB 21")]);
    await Promise.all([
      ...lines.map((l) => scrounger.patch(url(`/${l.id}`), { version: l.version, estimatedUnitCost: 12.5 })),
      ...comps.slice(0, 3).map((c) => setDisposition(t.db, c.componentId, null)),
    ]);
    await expectKept();
  });
});

import { sql } from "kysely";
import { afterAll, beforeAll, expect, it } from "vitest";
import { seedDemo } from "../../server/seed/demo";
import { DEMO_PASSWORD } from "../../server/seed/people";
import { boardDetailResponse, boardListResponse, overviewResponse } from "../../src/schemas/inventory";
import { createTestDb, type TestDb } from "../helpers/db";
import { Client, startTestServer, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let curator: Client;
let base: string;

beforeAll(async () => {
  t = await createTestDb();
  await seedDemo(t.db);
  server = await startTestServer({ db: t.db });
  curator = server.client();
  await curator.signIn("curator@tideline.test", DEMO_PASSWORD);
  const site = await t.db.selectFrom("sites").select("id").executeTakeFirstOrThrow();
  base = `/api/sites/${site.id}`;
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const rows = async <T>(q: ReturnType<typeof sql<T>>) => (await q.execute(t.db)).rows;

it("the overview's counts agree with the same counts taken by direct SQL on the demo", async () => {
  const r = await curator.get(`${base}/overview`);
  expect(r.status).toBe(200);
  const o = overviewResponse.parse(r.body);
  const [totals] = await rows(sql<{ positions: number; surveyed: number; decided: number }>`select
    (select count(*) from positions)::int as positions,
    (select count(distinct position_id) from inspections)::int as surveyed,
    (select count(*) from components where disposition is not null and retired_at is null)::int as decided`);
  expect(o.totals).toMatchObject({ positions: totals.positions, surveyed: totals.surveyed });
  expect(o.totals.bySurveyState.decided).toBe(totals.decided);
  expect(o.totals.bySurveyState.not_surveyed + o.totals.bySurveyState.inspected + o.totals.bySurveyState.decided).toBe(
    totals.positions,
  );
  for (const c of await rows(
    sql<{ custody: string; n: number }>`select custody, count(*)::int as n from components group by custody`,
  ))
    expect(o.byCustody[c.custody as keyof typeof o.byCustody]).toBe(c.n);
  for (const d of await rows(
    sql<{
      d: string;
      n: number;
    }>`select coalesce(disposition, 'undecided') as d, count(*)::int as n from components group by 1`,
  ))
    expect(o.byDisposition[d.d as keyof typeof o.byDisposition]).toBe(d.n);
  const grades = await rows(sql<{
    g: string;
    n: number;
  }>`select coalesce(li.astm_grade::text, 'ungraded') as g, count(*)::int as n
    from components c left join lateral (select astm_grade from inspections i where i.component_id = c.id order by inspected_at desc, created_at desc limit 1) li on true group by 1`);
  for (const g of grades) expect(o.byGrade[g.g as keyof typeof o.byGrade]).toBe(g.n);
  const [kept] = await rows(
    sql<{
      pct: number;
    }>`select round(100.0 * count(*) filter (where heritage = 'original' and custody not in ('scrapped', 'missing')) / count(*), 1)::float as pct from components`,
  );
  expect(o.originalRetainedPercent).toBe(kept.pct);
  expect(o.boards.reduce((s, b) => s + b.positions, 0)).toBe(totals.positions);
});

it("the demo's boards read through the API with every state a tile can show", async () => {
  const list = boardListResponse.parse((await curator.get(`${base}/boards`)).body);
  expect(list.map((b) => b.name)).toEqual(["Emergency board (boat deck)", "Main switchboard (engine room, aft)"]);
  const main = list.find((b) => b.name.startsWith("Main"))!;
  expect(main).toMatchObject({
    nominalVolts: 450,
    phases: 3,
    frequencyHz: 60,
    earthing: "ungrounded",
    waterLineMm: 1100,
  });
  const detail = boardDetailResponse.parse((await curator.get(`${base}/boards/${main.id}`)).body);
  expect(detail.positions).toHaveLength(main.positionCount);
  const tiles = detail.positions;
  expect(tiles.filter((p) => p.kind === "ground_lamp")).toHaveLength(3);
  expect(tiles.some((p) => p.latest === null)).toBe(true);
  expect(new Set(tiles.map((p) => p.latest?.belowWaterLine ?? null))).toEqual(new Set([true, false, null]));
  expect(tiles.some((p) => p.component?.dispositionOverridden)).toBe(true);
  expect(tiles.some((p) => (p.rowSpan > 1 || p.colSpan > 1) && p.kind === "bus_tie")).toBe(true);
  for (const p of tiles) {
    expect(p.gridRow + p.rowSpan - 1).toBeLessThanOrEqual(detail.board.gridRows);
    expect(p.gridCol + p.colSpan - 1).toBeLessThanOrEqual(detail.board.gridCols);
  }
  // No two positions of a board cover the same grid cell.
  const cells = new Set<string>();
  for (const p of tiles)
    for (let r = p.gridRow; r < p.gridRow + p.rowSpan; r++)
      for (let c = p.gridCol; c < p.gridCol + p.colSpan; c++) {
        expect(cells.has(`${r},${c}`)).toBe(false);
        cells.add(`${r},${c}`);
      }
});

it("a demo position's detail has its inspections, custody moves, decisions and history", async () => {
  const [row] = await rows(sql<{ id: string }>`select p.id from positions p join components c on c.position_id = p.id
    where c.disposition_overridden and c.custody <> 'in_place' limit 1`);
  const d = (await curator.get(`${base}/positions/${row.id}`)).body;
  expect(d.inspections.length).toBeGreaterThan(0);
  expect(d.custodyMoves.length).toBeGreaterThan(0);
  expect(d.dispositions[0].overridden).toBe(true);
  expect(d.dispositions[0].reason.length).toBeGreaterThan(10);
  expect(d.history.map((h: any) => h.action)).toEqual(
    expect.arrayContaining(["create", "inspect", "disposition", "custody"]),
  );
  expect(d.history[0].actorName).toBeTruthy();
  expect(d.recommendation.recommendation.disposition).toBe(d.dispositions[0].recommended);
});

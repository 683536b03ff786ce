/**
 * Lists that outgrow their first page on a board a crew has worked for weeks; nothing is cut without saying so.
 *
 * A dry-out of weeks: a board with more insulation readings than its page lists. The page lists the
 * board's newest 100 and says how many there are; every series stays choosable for the dry-out chart
 * and is read whole from GET …/dry-out; a component whose readings are all older than the newest listed
 * keeps its link. Ground hunts keep the newest when there are more steps than are read; a defect can be raised
 * on any position of a board of up to 60 × 60. The return-to-service view reads each pair's newest two readings
 * (now, and as each energised stage stood when it was energised), not a dry-out's thousands. (Before, the board's answer held the newest 500 and nothing else: on day three of a
 * dry-out with 40 circuits read three phases twice a day, the chart lost the start of every series.)
 */
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let boardId: string;
let older: string; // component "1-1": 200 readings, all older than the newest listed of the board
let newer: string; // component "1-2": 521 readings, the newest
let viewer: Client;

const HOUR = 3_600_000;
const start = Date.parse("2026-11-01T08:00:00Z");

async function component(designation: string, circuit: string, gridCol: number) {
  const p = await t.db
    .insertInto("positions")
    .values({ siteId: fx.siteId, boardId, designation, kind: "molded_case_breaker", gridRow: 1, gridCol, circuit })
    .returning("id")
    .executeTakeFirstOrThrow();
  return (
    await t.db
      .insertInto("components")
      .values({ siteId: fx.siteId, positionId: p.id, kind: "molded_case_breaker", poles: 3 })
      .returning("id")
      .executeTakeFirstOrThrow()
  ).id;
}

const reading = (componentId: string | null, circuit: string, at: number, megohms: number) => ({
  siteId: fx.siteId,
  boardId,
  componentId,
  circuit,
  testVoltsDc: 1000,
  megohms,
  conductors: "A-G" as const,
  equipmentTempC: 20,
  measuredAt: new Date(at),
  instrument: "Megohmmeter 1",
  notes: "",
  recordedBy: fx.crew.volunteer.id,
});

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  boardId = (
    await t.db
      .insertInto("boards")
      .values({ siteId: fx.siteId, name: "Main switchboard", nominalVolts: 450, gridRows: 60, gridCols: 60 })
      .returning("id")
      .executeTakeFirstOrThrow()
  ).id;
  older = await component("1-1", "Steering gear", 1);
  newer = await component("1-2", "Galley", 2);
  const rows = [
    ...Array.from({ length: 200 }, (_, i) => reading(older, "Steering gear", start + i * HOUR, 5 + i)),
    ...Array.from({ length: 5 }, (_, i) => reading(null, "Shore supply", start + 100 * HOUR + i * HOUR, 50)),
    // A component's reading whose circuit has the same words as the circuit named by hand: not in that series.
    reading(newer, "Shore supply", start + 210 * HOUR, 60),
    ...Array.from({ length: 520 }, (_, i) => reading(newer, "Galley", start + 220 * HOUR + i * HOUR, 100)),
  ];
  await t.db.insertInto("insulationReadings").values(rows).execute();
  viewer = server.client();
  await viewer.signIn(fx.crew.viewer.email);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const site = () => `/api/sites/${fx.siteId}`;

describe("a board with more insulation readings than its page lists", () => {
  it("lists the newest 100 and counts all 726", async () => {
    const r = await viewer.get(`${site()}/boards/${boardId}/readings`);
    expect(r.status).toBe(200);
    expect(r.body.insulation).toHaveLength(100);
    expect(r.body.insulation.every((x: { componentId: string }) => x.componentId === newer)).toBe(true);
    expect(r.body.totals).toMatchObject({ insulation: 726, contacts: 0, thermal: 0, groundChecks: 0 });
  });

  it("offers every series for the chart, newest first, with its count over every reading", async () => {
    const r = await viewer.get(`${site()}/boards/${boardId}/readings`);
    expect(
      r.body.dryOutSeries.map((s: { componentId: string | null; circuit: string; count: number }) => [
        s.componentId,
        s.circuit,
        s.count,
      ]),
    ).toEqual([
      [newer, "Galley", 521],
      [older, "Steering gear", 200],
      [null, "Shore supply", 5],
    ]);
    expect(r.body.dryOutSeries[1]).toMatchObject({
      designation: "1-1",
      conductors: ["A-G"],
      latestAt: new Date(start + 199 * HOUR).toISOString(),
    });
  });

  it("keeps the link of a component whose readings are all older than the newest listed", async () => {
    const r = await viewer.get(`${site()}/boards/${boardId}/readings`);
    expect(r.body.componentsWithReadings).toEqual([
      { componentId: older, designation: "1-1" },
      { componentId: newer, designation: "1-2" },
    ]);
  });

  it("compares the phases and the trend of a series whose readings are all older than the listed ones", async () => {
    const r = await viewer.get(`${site()}/boards/${boardId}/readings`);
    const mine = r.body.phaseComparisons.find((c: { key: string }) => c.key === `c:${older}`);
    expect(mine).toBeDefined();
    expect(mine.measuredAt).toBe(new Date(start + 199 * HOUR).toISOString());
    expect(mine.trend).toHaveLength(1);
    expect(mine.trend[0].conductors).toBe("A-G");
    expect(mine.trend[0].current).toBeGreaterThan(mine.trend[0].previous);
  });

  it("reads one series whole: the component's 200, oldest included, each judged", async () => {
    const r = await viewer.get(`${site()}/boards/${boardId}/dry-out?componentId=${older}`);
    expect(r.status).toBe(200);
    expect(r.body.complete).toBe(true);
    expect(r.body.readings).toHaveLength(200);
    expect(r.body.readings.at(-1).measuredAt).toBe(new Date(start).toISOString());
    expect(r.body.readings[0].judgement.verdict).toBeTruthy();
  });

  it("a circuit named by hand is its own series: a component's reading with the same words is not in it", async () => {
    const r = await viewer.get(`${site()}/boards/${boardId}/dry-out?circuit=${encodeURIComponent("Shore supply")}`);
    expect(r.status).toBe(200);
    expect(r.body.readings).toHaveLength(5);
    expect(r.body.readings.every((x: { componentId: string | null }) => x.componentId === null)).toBe(true);
  });

  it("a component's page has all of its readings and the same counts", async () => {
    const r = await viewer.get(`${site()}/components/${newer}/readings`);
    expect(r.status).toBe(200);
    expect(r.body.insulation).toHaveLength(521);
    expect(r.body.totals).toMatchObject({ insulation: 521, groundChecks: 0 });
  });

  it("a series named neither way, or by a bad id, is a 400 that says so; a board not on the site is a 404", async () => {
    const none = await viewer.get(`${site()}/boards/${boardId}/dry-out`);
    expect(none.status).toBe(400);
    expect(none.body.error.message).toMatch(/componentId|circuit/);
    const bad = await viewer.get(`${site()}/boards/${boardId}/dry-out?componentId=nope`);
    expect(bad.status).toBe(400);
    const unknown = await viewer.get(`${site()}/boards/${randomUUID()}/dry-out?circuit=x`);
    expect(unknown.status).toBe(404);
  });
});

describe("a board with more ground-hunt steps than its page reads", () => {
  it("keeps the newest hunt: the oldest steps are the ones left out", async () => {
    const step = (hunt: string, i: number) => ({
      siteId: fx.siteId,
      boardId,
      hunt,
      positionId: null,
      feeder: `F${i}`,
      action: "opened" as const,
      lampA: "bright" as const,
      lampB: "dim" as const,
      lampC: "bright" as const,
      measuredAt: new Date(start + i * 60_000),
      instrument: "",
      notes: "",
      recordedBy: fx.crew.volunteer.id,
    });
    await t.db
      .insertInto("groundHuntSteps")
      .values(Array.from({ length: 1000 }, (_, i) => step("November hunt", i)))
      .execute();
    await t.db
      .insertInto("groundHuntSteps")
      .values([1, 2, 3].map((i) => step("December hunt", 2000 + i)))
      .execute();
    const r = await viewer.get(`${site()}/boards/${boardId}/readings`);
    expect(r.status).toBe(200);
    expect(r.body.groundHunts[0].hunt).toBe("December hunt");
    expect(r.body.groundHunts[0].steps.map((s: { feeder: string }) => s.feeder)).toEqual(["F2001", "F2002", "F2003"]);
  });
});

describe("a board of more than 2,000 positions", () => {
  it("offers every one of its positions when a defect is raised (a grid holds up to 60 × 60)", async () => {
    const rows = [];
    for (let gridRow = 2; gridRow <= 46; gridRow++)
      for (let gridCol = 1; gridCol <= 60; gridCol++)
        rows.push({
          siteId: fx.siteId,
          boardId,
          designation: `${gridRow}-${gridCol}`,
          kind: "fuse" as const,
          gridRow,
          gridCol,
          sortOrder: gridRow * 100 + gridCol,
        });
    await t.db.insertInto("positions").values(rows).execute();
    const r = await viewer.get(`${site()}/defect-positions/${boardId}`);
    expect(r.status).toBe(200);
    expect(r.body.positions).toHaveLength(2 + 45 * 60);
    expect(r.body.positions.at(-1).designation).toBe("46-60");
  });
});

describe("the return-to-service view of a board weeks into its dry-out", () => {
  // Its own board: the hold point judges readings against today, so they are placed relative to now.
  const now = Date.now();
  let shore: string;
  const stages: Record<string, string> = {};

  async function circuitOf(designation: string, circuit: string, gridCol: number) {
    const p = await t.db
      .insertInto("positions")
      .values({
        siteId: fx.siteId,
        boardId: shore,
        designation,
        kind: "molded_case_breaker",
        gridRow: 1,
        gridCol,
        circuit,
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    const c = await t.db
      .insertInto("components")
      .values({ siteId: fx.siteId, positionId: p.id, kind: "molded_case_breaker", poles: 3 })
      .returning("id")
      .executeTakeFirstOrThrow();
    return { positionId: p.id, componentId: c.id };
  }
  const at = (componentId: string, conductors: "A-G" | "B-G", hoursAgo: number, megohms: number) => ({
    ...reading(componentId, "", now - hoursAgo * HOUR, megohms),
    boardId: shore,
    conductors,
  });
  const gateOf = async (name: string) => {
    const r = await viewer.get(`${site()}/boards/${shore}/return-to-service`);
    expect(r.status).toBe(200);
    const stage = r.body.stages.find((s: { id: string }) => s.id === stages[name]);
    return stage.gate.holdPoints.find((h: { kind: string }) => h.kind === "insulation");
  };

  beforeAll(async () => {
    shore = (
      await t.db
        .insertInto("boards")
        .values({ siteId: fx.siteId, name: "Shore connection panel", nominalVolts: 450 })
        .returning("id")
        .executeTakeFirstOrThrow()
    ).id;
    const fallen = await circuitOf("2-1", "Windlass", 1);
    const live = await circuitOf("2-2", "Ballast pump", 2);
    const rows = [
      // Three weeks of phase A twice an hour at 200 MΩ, then the newest at 100: it fell. Phase B, read once just after
      // at 150, below the 200s of phase A, is its own pair and not a fall.
      ...Array.from({ length: 1000 }, (_, i) => at(fallen.componentId, "A-G", 520 - i * 0.5, 200)),
      at(fallen.componentId, "A-G", 3, 100),
      at(fallen.componentId, "B-G", 2, 150),
      // Energised 10 h ago after weeks of readings that met; read again since, below the criterion (a later matter).
      ...Array.from({ length: 1000 }, (_, i) => at(live.componentId, "A-G", 520 - i * 0.5, 200)),
      ...[8, 6, 4].map((h) => at(live.componentId, "A-G", h, 0.1)),
    ];
    await t.db.insertInto("insulationReadings").values(rows).execute();
    const curator = server.client();
    await curator.signIn(fx.crew.curator.email);
    for (const [name, p] of [
      ["windlass", fallen],
      ["ballast", live],
    ] as const) {
      const r = await curator.post(`${site()}/boards/${shore}/return-to-service/stages`, {
        name: `Bring back ${name}`,
        positionIds: [p.positionId],
        supply: "temporary_fused",
        voltageStep: "full",
        stepVolts: 450,
      });
      expect(r.status, JSON.stringify(r.body)).toBe(201);
      stages[name] = r.body.stage.id;
    }
    await t.db
      .updateTable("rtsStages")
      .set({ status: "energised", energisedAt: new Date(now - 10 * HOUR) })
      .where("id", "=", stages.ballast)
      .execute();
  });

  it("judges each pair by its newest reading and the one before, past a thousand older ones", async () => {
    const hold = await gateOf("windlass");
    expect(hold.state).toBe("blocked");
    expect(hold.blockers.map((b: { message: string }) => b.message)).toEqual([
      "2-1 (Windlass), A to ground: insulation resistance fell from 200 to 100 MΩ (corrected) since the reading before.",
    ]);
  });

  it("judges an energised stage's circuits as they stood when it was energised, not by the readings since", async () => {
    const hold = await gateOf("ballast");
    expect(hold.blockers).toEqual([]);
  });
});

/**
 * Field readings over HTTP: a dead short and over-range readings are recorded, the dew point gate,
 * trip tests, step-voltage tests, the ground-hunt log and the phase comparison on the board.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let boardId: string;
let componentId: string;
let positionId: string;
const as: Record<string, Client> = {};

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  const board = await t.db
    .insertInto("boards")
    .values({ siteId: fx.siteId, name: "Main switchboard", nominalVolts: 450 })
    .returning("id")
    .executeTakeFirstOrThrow();
  boardId = board.id;
  const p = await t.db
    .insertInto("positions")
    .values({
      siteId: fx.siteId,
      boardId,
      designation: "2-1",
      kind: "molded_case_breaker",
      gridRow: 1,
      gridCol: 1,
      circuit: "Bilge pump",
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  positionId = p.id;
  componentId = (
    await t.db
      .insertInto("components")
      .values({ siteId: fx.siteId, positionId, kind: "molded_case_breaker", poles: 3, ratingAmps: 20 })
      .returning("id")
      .executeTakeFirstOrThrow()
  ).id;
  for (const role of ["curator", "volunteer", "viewer"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const site = () => `/api/sites/${fx.siteId}`;
const ir = (over: Record<string, unknown>) => ({
  componentId,
  testVoltsDc: 1000,
  megohms: 80,
  conductors: "A-G",
  equipmentTempC: 25,
  ambientTempC: 22,
  humidityPercent: 40,
  measuredAt: "2026-11-20T09:00:00Z",
  ...over,
});

describe("insulation readings as a flooded board gives them", () => {
  it("0 MΩ is recorded (201) and judged a fault below the NETA Table 100.1 minimum of 100 MΩ", async () => {
    const r = await as.volunteer.post(
      `${site()}/boards/${boardId}/insulation-readings`,
      ir({ megohms: 0, r1min: 0, r10min: 0 }),
    );
    expect(r.status).toBe(201);
    expect(r.body.reading.judgement).toMatchObject({
      correctedMegohms: 0,
      verdict: "below_minimum",
      piBound: "not_computable",
    });
  });

  it("an over-range reading keeps its qualifier; both PI readings at the limit give no PI", async () => {
    const r = await as.volunteer.post(
      `${site()}/boards/${boardId}/insulation-readings`,
      ir({
        megohms: 2000,
        megohmsQualifier: "at_or_above",
        r1min: 2000,
        r1minQualifier: "at_or_above",
        r10min: 2000,
        r10minQualifier: "at_or_above",
      }),
    );
    expect(r.status).toBe(201);
    expect(r.body.reading.megohmsQualifier).toBe("at_or_above");
    expect(r.body.reading.judgement).toMatchObject({
      qualifier: "at_or_above",
      piBound: "not_computable",
      verdict: "meets",
    });
  });

  it("a reading at 16 °C in 18 °C air at 85 % RH (dew point 15.4 °C, Magnus) is not valid for judging", async () => {
    const r = await as.volunteer.post(
      `${site()}/boards/${boardId}/insulation-readings`,
      ir({ megohms: 500, equipmentTempC: 16, ambientTempC: 18, humidityPercent: 85 }),
    );
    expect(r.body.reading.judgement.verdict).toBe("not_valid");
    expect(r.body.reading.judgement.dewPointC).toBeCloseTo(15.44, 1);
  });

  it("the curator's dew-point margin is kept with the criteria", async () => {
    const now = (await as.curator.get(`${site()}/readings/criteria`)).body.criteria;
    expect(now.dewPointMarginK).toBe(3);
    const r = await as.curator.put(`${site()}/readings/criteria`, { ...now, dewPointMarginK: 5 });
    expect(r.status).toBe(200);
    expect(r.body.criteria.dewPointMarginK).toBe(5);
    expect(
      (await as.curator.put(`${site()}/readings/criteria`, { ...r.body.criteria, dewPointMarginK: 50 })).status,
    ).toBe(400);
  });

  it("5 000 V on a 450 V board gets a note above the 1 000 V NETA Table 100.1 suggests", async () => {
    const r = await as.volunteer.post(
      `${site()}/boards/${boardId}/insulation-readings`,
      ir({ testVoltsDc: 5000, megohms: 300 }),
    );
    expect(r.body.reading.judgement).toMatchObject({ suggestedTestVoltsDc: 1000, testVoltageOver: true });
  });

  it("the board shows A, B and C to ground side by side and flags the low phase", async () => {
    for (const [conductors, megohms] of [
      ["A-G", 600],
      ["B-G", 580],
      ["C-G", 150],
    ] as const) {
      expect(
        (
          await as.volunteer.post(
            `${site()}/boards/${boardId}/insulation-readings`,
            ir({ conductors, megohms, measuredAt: "2026-11-21T09:00:00Z" }),
          )
        ).status,
      ).toBe(201);
    }
    const b = (await as.viewer.get(`${site()}/boards/${boardId}/readings`)).body;
    const cmp = b.phaseComparisons.find((c: { key: string }) => c.key === `c:${componentId}`);
    expect(cmp.flagged).toEqual(["C"]);
    // the screens show the rule's source beside the comparison
    expect(cmp.source.table).toMatch(/common practice/);
    expect(cmp.source.text).toContain("50 %");
  });
});

describe("trip tests, step voltage, ground hunt", () => {
  it("a 20 A breaker tripping in 30 s at 60 A meets the 50 s of NETA Table 100.7 (from memory)", async () => {
    const r = await as.volunteer.post(`${site()}/components/${componentId}/trip-tests`, {
      test: "inverse_time",
      tripUnit: "thermal_magnetic",
      ratingAmps: 20,
      systemVolts: 240,
      testAmps: 60,
      tripSeconds: 30,
      measuredAt: "2026-11-22T09:00:00Z",
    });
    expect(r.status).toBe(201);
    expect(r.body.test.judgement.verdict).toBe("meets");
  });

  it("an instantaneous test without its setting is a 400 naming the field; viewers get 403", async () => {
    const body = {
      test: "instantaneous",
      tripUnit: "electronic",
      ratingAmps: 100,
      systemVolts: 480,
      pickupAmps: 900,
      measuredAt: "2026-11-22T09:00:00Z",
    };
    const r = await as.volunteer.post(`${site()}/components/${componentId}/trip-tests`, body);
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toHaveProperty("settingAmps");
    expect(
      (await as.viewer.post(`${site()}/components/${componentId}/trip-tests`, { ...body, settingAmps: 1000 })).status,
    ).toBe(403);
    const ok = await as.volunteer.post(`${site()}/components/${componentId}/trip-tests`, {
      ...body,
      settingAmps: 1000,
    });
    expect(ok.body.test.judgement).toMatchObject({ verdict: "meets", window: "700–1300 A" });
  });

  it("a trip test on a part that has no trip (a meter) is a 400 and stores nothing", async () => {
    const pos = await t.db
      .insertInto("positions")
      .values({ siteId: fx.siteId, boardId, designation: "M-1", kind: "meter", gridRow: 9, gridCol: 9 })
      .returning("id")
      .executeTakeFirstOrThrow();
    const meter = await t.db
      .insertInto("components")
      .values({ siteId: fx.siteId, positionId: pos.id, kind: "meter" })
      .returning("id")
      .executeTakeFirstOrThrow();
    const r = await as.volunteer.post(`${site()}/components/${meter.id}/trip-tests`, {
      test: "inverse_time",
      tripUnit: "thermal_magnetic",
      ratingAmps: 20,
      systemVolts: 240,
      testAmps: 60,
      tripSeconds: 30,
      measuredAt: "2026-11-22T09:00:00Z",
    });
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toHaveProperty("componentId");
    const kept = await t.db.selectFrom("tripTests").where("componentId", "=", meter.id).select("id").execute();
    expect(kept).toHaveLength(0);
  });

  it("a step-voltage test falling 30 % is investigated (common practice: 25 %)", async () => {
    const r = await as.volunteer.post(`${site()}/boards/${boardId}/step-voltage-tests`, {
      componentId,
      conductors: "A-G",
      steps: [
        { testVoltsDc: 500, megohms: 1000 },
        { testVoltsDc: 1000, megohms: 900 },
        { testVoltsDc: 2500, megohms: 700 },
      ],
      measuredAt: "2026-11-22T10:00:00Z",
    });
    expect(r.status).toBe(201);
    expect(r.body.test.judgement).toMatchObject({ verdict: "investigate" });
    const bad = await as.volunteer.post(`${site()}/boards/${boardId}/step-voltage-tests`, {
      componentId,
      conductors: "A-G",
      steps: [{ testVoltsDc: 500, megohms: 1 }],
      measuredAt: "2026-11-22T10:00:00Z",
    });
    expect(bad.status).toBe(400);
  });

  it("a ground hunt log points at the feeder whose opening balanced the lamps", async () => {
    const step = (feeder: string, action: string, lamps: Record<string, string>, minute: number) =>
      as.volunteer.post(`${site()}/boards/${boardId}/ground-hunts`, {
        hunt: "Energisation 1",
        feeder,
        action,
        lamps,
        positionId: feeder === "2-1" ? positionId : null,
        measuredAt: `2026-11-22T11:${String(minute).padStart(2, "0")}:00Z`,
      });
    expect((await step("1-4", "opened", { A: "dark", B: "bright", C: "bright" }, 0)).status).toBe(201);
    expect((await step("1-4", "closed", { A: "dark", B: "bright", C: "bright" }, 2)).status).toBe(201);
    expect((await step("2-1", "opened", { A: "bright", B: "bright", C: "bright" }, 4)).status).toBe(201);
    const hunts = (await as.viewer.get(`${site()}/boards/${boardId}/ground-hunts`)).body.hunts;
    expect(hunts[0]).toMatchObject({ hunt: "Energisation 1", finding: { feeder: "2-1" } });
    expect(hunts[0].steps).toHaveLength(3);
    expect(hunts[0].source.table).toBe("Ground hunt by opening feeders one at a time (common practice)");
  });
});

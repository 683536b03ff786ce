import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let boardId: string;
let componentId: string;
let otherComponentId: string;
const as: Record<string, Client> = {};

async function makeBoard(siteId: string) {
  const db = t.db;
  const board = await db
    .insertInto("boards")
    .values({ siteId, name: "Main switchboard", nominalVolts: 450 })
    .returning("id")
    .executeTakeFirstOrThrow();
  let col = 0;
  const mk = async (designation: string, circuit: string) => {
    const p = await db
      .insertInto("positions")
      .values({
        siteId,
        boardId: board.id,
        designation,
        kind: "molded_case_breaker",
        gridRow: 1,
        gridCol: ++col,
        circuit,
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    return (
      await db
        .insertInto("components")
        .values({ siteId, positionId: p.id, kind: "molded_case_breaker", poles: 3 })
        .returning("id")
        .executeTakeFirstOrThrow()
    ).id;
  };
  return {
    boardId: board.id,
    componentId: await mk("1-1", "Steering gear"),
    otherComponentId: await mk("1-2", "Galley"),
  };
}

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  ({ boardId, componentId, otherComponentId } = await makeBoard(fx.siteId));
  for (const role of ["curator", "volunteer", "photographer", "scrounger", "viewer", "admin", "outsider"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const site = () => `/api/sites/${fx.siteId}`;
const insulation = (over: Record<string, unknown> = {}) => ({
  // 24 °C at 30 % RH: dew point 5.4 °C (Magnus), so readings at 12 °C and up are valid for judging.
  componentId,
  testVoltsDc: 1000,
  megohms: 80,
  conductors: "A-G",
  equipmentTempC: 30,
  ambientTempC: 24,
  humidityPercent: 30,
  durationS: 60,
  instrument: "Megohmmeter 1",
  measuredAt: "2026-11-20T09:00:00Z",
  ...over,
});
const record = (who: string, over: Record<string, unknown> = {}) =>
  as[who].post(`${site()}/boards/${boardId}/insulation-readings`, insulation(over));

async function setCriteria(patch: Record<string, unknown>) {
  const now = (await as.curator.get(`${site()}/readings/criteria`)).body.criteria;
  const r = await as.curator.put(`${site()}/readings/criteria`, { ...now, ...patch });
  expect(r.status).toBe(200);
  return r.body.criteria;
}
const resetCriteria = () =>
  setCriteria({
    correctionMethod: "neta_20c",
    insulationMedium: "solid",
    thermalClass: "B",
    minimumMegohms: null,
    minimumSource: "",
    contactOutlierPercent: 50,
  });

describe("who records readings", () => {
  it.each(["volunteer", "curator", "admin"])("a %s records an insulation reading (201)", async (who) => {
    const r = await record(who);
    expect(r.status).toBe(201);
    expect(r.body.reading).toMatchObject({ megohms: 80, conductors: "A-G", designation: "1-1" });
  });

  it.each(["photographer", "scrounger", "viewer"])(
    "a %s gets 403 recording any reading, but reads them (200)",
    async (who) => {
      expect((await record(who)).status).toBe(403);
      expect(
        (
          await as[who].post(`${site()}/components/${componentId}/contact-readings`, {
            poleMicroOhms: [50, 51, 52],
            testCurrentA: 100,
            measuredAt: "2026-11-20T09:00:00Z",
          })
        ).status,
      ).toBe(403);
      expect(
        (
          await as[who].post(`${site()}/boards/${boardId}/ground-checks`, {
            lineVolts: 450,
            lamps: { A: "bright", B: "bright", C: "bright" },
            measuredAt: "2026-11-20T09:00:00Z",
          })
        ).status,
      ).toBe(403);
      expect((await as[who].get(`${site()}/boards/${boardId}/readings`)).status).toBe(200);
    },
  );

  it("a member of another site gets 404", async () => {
    expect((await record("outsider")).status).toBe(404);
    expect((await as.outsider.get(`${site()}/boards/${boardId}/readings`)).status).toBe(404);
  });

  it("without a session it is 401", async () => {
    expect((await server.client().get(`${site()}/boards/${boardId}/readings`)).status).toBe(401);
  });
});

describe("bad input is a 400 naming the field, never a 500", () => {
  it.each([
    ["megohms", { megohms: -5 }],
    ["megohms", { megohms: "lots" }],
    ["equipmentTempC", { equipmentTempC: 150 }],
    ["conductors", { conductors: "A-N" }],
    ["humidityPercent", { humidityPercent: 120 }],
    ["measuredAt", { measuredAt: "yesterday" }],
    ["circuit", { componentId: null, circuit: "" }],
    ["r10min", { r10min: -1 }],
    ["megohmsQualifier", { megohmsQualifier: "about" }],
  ])("%s: %o", async (field, over) => {
    const r = await record("volunteer", over);
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toHaveProperty(field);
  });

  it("a temperature outside the IEEE 43 range (−10…100 °C) is a 400 once the site uses IEEE 43", async () => {
    await setCriteria({ correctionMethod: "ieee43_40c" });
    const r = await record("volunteer", { equipmentTempC: 105 });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.equipmentTempC).toMatch(/IEEE 43/);
    await resetCriteria();
    expect((await record("volunteer", { equipmentTempC: 105 })).status).toBe(201); // NETA table runs to 110 °C
  });

  it("a reading from the future, a component of another board and a bad board id are refused", async () => {
    expect((await record("volunteer", { measuredAt: "2099-01-01T00:00:00Z" })).body.error.fields).toHaveProperty(
      "measuredAt",
    );
    const other = await t.db
      .insertInto("boards")
      .values({ siteId: fx.siteId, name: "Emergency board" })
      .returning("id")
      .executeTakeFirstOrThrow();
    const r = await as.volunteer.post(`${site()}/boards/${other.id}/insulation-readings`, insulation());
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toHaveProperty("componentId");
    expect((await as.volunteer.post(`${site()}/boards/not-a-uuid/insulation-readings`, insulation())).status).toBe(400);
  });

  it("contact, thermal and ground-lamp bodies are checked too", async () => {
    const c = await as.volunteer.post(`${site()}/components/${componentId}/contact-readings`, {
      poleMicroOhms: [50, 0],
      testCurrentA: 100,
      measuredAt: "2026-11-20T09:00:00Z",
    });
    expect(c.status).toBe(400);
    const th = await as.volunteer.post(`${site()}/components/${componentId}/thermal-scans`, {
      componentTempC: 40,
      measuredAt: "2026-11-20T09:00:00Z",
    });
    expect(th.status).toBe(400);
    expect(th.body.error.fields).toHaveProperty("similarTempC");
    const g = await as.volunteer.post(`${site()}/boards/${boardId}/ground-checks`, {
      lineVolts: 450,
      measuredAt: "2026-11-20T09:00:00Z",
    });
    expect(g.status).toBe(400);
    expect(g.body.error.fields).toHaveProperty("lamps");
  });
});

describe("corrected values and verdicts (hand-computed from the published tables)", () => {
  it.each([
    // NETA Table 100.14 solid, 30 °C: ×1.58 (from memory) → 94.8 MΩ; ANSI/NETA MTS-2019 Table 100.1 600 V row: 100 MΩ
    [60, 30, 94.8, "below_minimum"],
    // 80 × 1.58 = 126.4 MΩ ≥ 100 MΩ
    [80, 30, 126.4, "meets"],
    // 12 °C interpolated: 0.63 + 0.4 × (0.81 − 0.63) = 0.702 (NETA 100.14 rows from memory) → 140.4 MΩ
    [200, 12, 140.4, "meets"],
  ])("%f MΩ at %f °C → %f MΩ at 20 °C, %s", async (megohms, equipmentTempC, corrected, verdict) => {
    const r = await record("volunteer", { megohms, equipmentTempC });
    expect(r.status).toBe(201);
    const j = r.body.reading.judgement;
    expect(j.correctedMegohms).toBeCloseTo(corrected, 9);
    expect(j.baseTemperatureC).toBe(20);
    expect(j.verdict).toBe(verdict);
    expect(j.minimum).toMatchObject({
      megohms: 100,
      from: "table",
      source: { table: "ANSI/NETA MTS-2019 Table 100.1" },
    });
    expect(j.correction.table).toMatch(/100\.14/);
  });

  it("IEEE 43 to 40 °C halves a 30 °C reading (IEEE Std 43 halving rule): 80 → 40 MΩ, below 100 MΩ", async () => {
    const { body } = await record("volunteer", { megohms: 80, equipmentTempC: 30, measuredAt: "2026-11-21T09:00:00Z" });
    await setCriteria({ correctionMethod: "ieee43_40c" });
    const list = (await as.viewer.get(`${site()}/boards/${boardId}/insulation-readings`)).body.readings;
    const again = list.find((x: { id: string }) => x.id === body.reading.id);
    expect(again.judgement.correctedMegohms).toBeCloseTo(40, 9);
    expect(again.judgement.verdict).toBe("below_minimum");
    await resetCriteria();
  });

  it("PI from the timed readings: 300/200 = 1.5 is under class B's 2.0 (IEEE Std 43) → investigate", async () => {
    const r = await record("volunteer", { megohms: 400, equipmentTempC: 20, r30s: 180, r1min: 200, r10min: 300 });
    expect(r.body.reading.judgement).toMatchObject({ pi: 1.5, minimumPi: 2, verdict: "investigate" });
    expect(r.body.reading.judgement.dar).toBeCloseTo(200 / 180, 9);
  });

  it("contact resistance flags the pole more than 50 % above the lowest (Schneider 0600DB1901 example: 50, 60, 76)", async () => {
    const r = await as.curator.post(`${site()}/components/${componentId}/contact-readings`, {
      poleMicroOhms: [50, 60, 76],
      testCurrentA: 100,
      measuredAt: "2026-11-20T10:00:00Z",
    });
    expect(r.status).toBe(201);
    expect(r.body.reading.judgement).toMatchObject({ outliers: [2], verdict: "investigate", limitMicroOhms: 75 });
  });

  it("a thermal scan 5 °C over a similar component is NETA Table 100.18 level 2", async () => {
    const r = await as.volunteer.post(`${site()}/components/${componentId}/thermal-scans`, {
      componentTempC: 45,
      similarTempC: 40,
      ambientTempC: 38,
      loadPercent: 60,
      measuredAt: "2026-11-20T11:00:00Z",
    });
    expect(r.status).toBe(201);
    expect(r.body.scan.judgement).toMatchObject({ level: 2, overSimilarC: 5, verdict: "investigate" });
    expect(r.body.scan.judgement.action).toMatch(/repair as time permits/i);
  });

  it("a thermal scan links only a thermal image of this site", async () => {
    const photo = (kind: "thermal" | "as_found") =>
      t.db
        .insertInto("photos")
        .values({
          siteId: fx.siteId,
          boardId,
          componentId,
          kind,
          format: "jpeg",
          width: 640,
          height: 480,
          bytes: 1000,
          originalKey: `o-${kind}`,
          displayKey: `d-${kind}`,
          thumbKey: `t-${kind}`,
        })
        .returning("id")
        .executeTakeFirstOrThrow();
    const scan = (photoId: string) =>
      as.volunteer.post(`${site()}/components/${componentId}/thermal-scans`, {
        componentTempC: 30,
        ambientTempC: 25,
        photoId,
        measuredAt: "2026-11-20T11:00:00Z",
      });
    const thermal = await photo("thermal");
    const ok = await scan(thermal.id);
    expect(ok.status).toBe(201);
    expect(ok.body.scan.photoId).toBe(thermal.id);
    const wrongKind = await scan((await photo("as_found")).id);
    expect(wrongKind.status).toBe(400);
    expect(wrongKind.body.error.fields.photoId).toMatch(/thermal image/);
    expect((await scan("00000000-0000-4000-8000-000000000000")).status).toBe(400);
  });

  it("a ground-lamp check with phase B dark names phase B and the hull; latest returns it", async () => {
    const r = await as.volunteer.post(`${site()}/boards/${boardId}/ground-checks`, {
      energisation: "Section 1 first energisation",
      lineVolts: 450,
      lamps: { A: "bright", B: "dark", C: "bright" },
      measuredAt: "2026-11-22T08:00:00Z",
    });
    expect(r.status).toBe(201);
    expect(r.body.check.judgement.phase).toBe("B");
    expect(r.body.check.judgement.words).toBe(
      "Phase B lamp dark, A and C bright: suspect a ground on phase B — on a vessel, a fault to the hull.",
    );
    const latest = await as.viewer.get(`${site()}/boards/${boardId}/ground-checks/latest`);
    expect(latest.body.check.id).toBe(r.body.check.id);
  });

  it("no reading says 'safe'", async () => {
    const all = await as.viewer.get(`${site()}/boards/${boardId}/readings`);
    expect(JSON.stringify(all.body)).not.toMatch(/\bsafe\b/i);
  });
});

describe("criteria", () => {
  it("a site minimum of 150 MΩ turns 126.4 MΩ from meets to below_minimum, with the curator's source", async () => {
    const { body } = await record("volunteer", { componentId: otherComponentId, megohms: 80, equipmentTempC: 30 });
    expect(body.reading.judgement.verdict).toBe("meets");
    await setCriteria({ minimumMegohms: 150, minimumSource: "Crew rule: 1.5 × NETA for salt-water boards" });
    const list = (await as.viewer.get(`${site()}/components/${otherComponentId}/insulation-readings`)).body.readings;
    expect(list[0].judgement).toMatchObject({
      verdict: "below_minimum",
      minimum: { megohms: 150, from: "site", source: { text: "Crew rule: 1.5 × NETA for salt-water boards" } },
    });
    await resetCriteria();
  });

  it("a manufacturer's value for one component replaces the table for that component only", async () => {
    const { body } = await record("volunteer", { megohms: 60, equipmentTempC: 30 }); // 94.8 MΩ, below 100
    expect(body.reading.judgement.verdict).toBe("below_minimum");
    const put = await as.curator.put(`${site()}/components/${componentId}/reading-override`, {
      minimumMegohms: 50,
      source: "Maker's instruction leaflet (fictional), p. 4",
    });
    expect(put.status).toBe(200);
    const mine = (await as.viewer.get(`${site()}/components/${componentId}/readings`)).body;
    const same = mine.insulation.find((x: { id: string }) => x.id === body.reading.id);
    expect(same.judgement).toMatchObject({ verdict: "meets", minimum: { megohms: 50, from: "manufacturer" } });
    const other = (await as.viewer.get(`${site()}/components/${otherComponentId}/readings`)).body;
    expect(
      other.insulation.every((x: { judgement: { minimum: { from: string } } }) => x.judgement.minimum.from === "table"),
    ).toBe(true);
    expect((await as.curator.del(`${site()}/components/${componentId}/reading-override`)).status).toBe(200);
  });

  it("a wider contact threshold (60 %) clears the 76 µΩ pole", async () => {
    await setCriteria({ contactOutlierPercent: 60 });
    const list = (await as.viewer.get(`${site()}/components/${componentId}/contact-readings`)).body.readings;
    expect(list[0].judgement).toMatchObject({ outliers: [], verdict: "meets", limitMicroOhms: 80 });
    await resetCriteria();
  });

  it("only the curator edits criteria (403 for a volunteer), and a stale version is a 409 with the current criteria", async () => {
    const now = (await as.volunteer.get(`${site()}/readings/criteria`)).body.criteria;
    expect((await as.volunteer.put(`${site()}/readings/criteria`, { ...now, thermalClass: "A" })).status).toBe(403);
    expect(
      (
        await as.volunteer.put(`${site()}/components/${componentId}/reading-override`, {
          minimumMegohms: 1,
          source: "x",
        })
      ).status,
    ).toBe(403);
    const stale = await as.curator.put(`${site()}/readings/criteria`, {
      ...now,
      version: now.version - 1,
      thermalClass: "A",
    });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ version: now.version });
  });

  it("a site minimum without its source is a 400", async () => {
    const now = (await as.curator.get(`${site()}/readings/criteria`)).body.criteria;
    const r = await as.curator.put(`${site()}/readings/criteria`, { ...now, minimumMegohms: 200, minimumSource: "" });
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toHaveProperty("minimumSource");
  });

  it("records every reading and criteria change in the audit log", async () => {
    const rows = await t.db.selectFrom("auditLog").select(["entityType"]).where("siteId", "=", fx.siteId).execute();
    const types = new Set(rows.map((r) => r.entityType));
    for (const e of [
      "insulation_reading",
      "contact_reading",
      "thermal_scan",
      "ground_lamp_check",
      "reading_criteria",
      "component_reading_override",
    ])
      expect(types).toContain(e);
  });
});

describe("what a reading can be recorded against", () => {
  it("the first page counts each board's positions; the board's readings carry its positions in board order", async () => {
    const targets = await as.viewer.get(`${site()}/readings/targets`);
    expect(targets.status).toBe(200);
    const main = targets.body.boards.find((b: { id: string }) => b.id === boardId);
    expect(main).toEqual({ id: boardId, name: "Main switchboard", nominalVolts: 450, positionCount: 2 });
    expect(JSON.stringify(targets.body)).not.toContain("designation");

    const r = await as.viewer.get(`${site()}/boards/${boardId}/readings`);
    expect(r.status).toBe(200);
    expect(r.body.positions).toEqual([
      expect.objectContaining({
        designation: "1-1",
        circuit: "Steering gear",
        componentId,
        kind: "molded_case_breaker",
      }),
      expect.objectContaining({ designation: "1-2", circuit: "Galley", componentId: otherComponentId }),
    ]);
  });

  it("a position whose component was retired is listed without one", async () => {
    const p = await t.db
      .insertInto("positions")
      .values({
        siteId: fx.siteId,
        boardId,
        designation: "1-9",
        kind: "fuse",
        gridRow: 2,
        gridCol: 1,
        circuit: "Spare",
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    await t.db
      .insertInto("components")
      .values({ siteId: fx.siteId, positionId: p.id, kind: "fuse", retiredAt: new Date() })
      .execute();
    const r = await as.viewer.get(`${site()}/boards/${boardId}/readings`);
    expect(r.body.positions.find((x: { positionId: string }) => x.positionId === p.id)).toMatchObject({
      designation: "1-9",
      componentId: null,
    });
    const targets = await as.viewer.get(`${site()}/readings/targets`);
    expect(targets.body.boards.find((b: { id: string }) => b.id === boardId).positionCount).toBe(3);
    await t.db.deleteFrom("components").where("positionId", "=", p.id).execute();
    await t.db.deleteFrom("positions").where("id", "=", p.id).execute();
  });
});

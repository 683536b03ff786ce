/**
 * Idempotency-Key on every create the phone's offline queue sends: a repeat with the
 * same key answers the first result and writes no second row; the same key with another body is
 * 422; a refused first attempt frees the key; two racing repeats never make two rows.
 * The header's meaning follows the IETF HTTPAPI draft "The Idempotency-Key HTTP Header Field"
 * (draft-ietf-httpapi-idempotency-key-header): repeat → first result, reuse with another payload → 422,
 * a request still being processed → 409.
 */
import { randomUUID } from "node:crypto";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Database } from "../../db/types";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let volunteer: Client;
let curator: Client;
let boardId: string;
let positionId: string;
let componentId: string;
let stageId: string;

const site = () => `/api/sites/${fx.siteId}`;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  volunteer = server.client();
  await volunteer.signIn(fx.crew.volunteer.email);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
  const board = await t.db
    .insertInto("boards")
    .values({ siteId: fx.siteId, name: "Main switchboard", nominalVolts: 450 })
    .returning("id")
    .executeTakeFirstOrThrow();
  boardId = board.id;
  const p = await t.db
    .insertInto("positions")
    .values({ siteId: fx.siteId, boardId, designation: "1-1", kind: "molded_case_breaker", gridRow: 1, gridCol: 1 })
    .returning("id")
    .executeTakeFirstOrThrow();
  positionId = p.id;
  componentId = (
    await t.db
      .insertInto("components")
      .values({ siteId: fx.siteId, positionId, kind: "molded_case_breaker", poles: 3 })
      .returning("id")
      .executeTakeFirstOrThrow()
  ).id;
  const stage = await curator.post(`${site()}/boards/${boardId}/return-to-service/stages`, {
    name: "Stage 1 — steering gear",
    positionIds: [positionId],
    supply: "temporary_fused",
    voltageStep: "reduced",
  });
  expect(stage.status, JSON.stringify(stage.body)).toBe(201);
  stageId = stage.body.stage?.id ?? stage.body.id;
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const count = async (table: keyof Database) =>
  Number(
    (
      await t.db
        .selectFrom(table as "photos")
        .select((eb) => eb.fn.countAll().as("n"))
        .executeTakeFirstOrThrow()
    ).n,
  );

const jpeg = () =>
  sharp({ create: { width: 64, height: 48, channels: 3, background: "#3a6b5c" } })
    .jpeg()
    .toBuffer();

/** Every create the offline queue uses: where it goes, the body, and the table that gets the row. */
const CREATES: Array<{
  name: string;
  table: keyof Database;
  path: () => string;
  body: () => unknown | Promise<unknown>;
}> = [
  {
    name: "quick-log inspection",
    table: "inspections",
    path: () => `${site()}/components/${componentId}/inspections`,
    body: () => ({ percentRusted: 3, belowWaterLine: true, contaminants: ["silt"], notes: "Tide mark at 40 mm" }),
  },
  {
    name: "finding (defect raised from the phone)",
    table: "defects",
    path: () => `${site()}/defects`,
    body: () => ({
      boardId,
      positionId,
      componentId,
      title: "Arc chute cracked",
      category: "mechanical",
      severity: "impaired",
    }),
  },
  {
    name: "custody move",
    table: "custodyMoves",
    path: () => `${site()}/components/${componentId}/custody`,
    body: async () => {
      const c = await t.db.selectFrom("components").select("version").where("id", "=", componentId).executeTakeFirst();
      return {
        toState: "removed",
        location: "Bench 2",
        tagNumber: `T-${randomUUID().slice(0, 6)}`,
        version: c!.version,
      };
    },
  },
  {
    name: "insulation reading",
    table: "insulationReadings",
    path: () => `${site()}/boards/${boardId}/insulation-readings`,
    body: () => ({
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
    }),
  },
  {
    name: "contact reading",
    table: "contactReadings",
    path: () => `${site()}/components/${componentId}/contact-readings`,
    body: () => ({ poleMicroOhms: [52, 55, 51], testCurrentA: 100, measuredAt: "2026-11-20T09:10:00Z" }),
  },
  {
    name: "thermal scan",
    table: "thermalScans",
    path: () => `${site()}/components/${componentId}/thermal-scans`,
    body: () => ({
      componentTempC: 31,
      similarTempC: 30,
      ambientTempC: 24,
      loadPercent: 40,
      measuredAt: "2026-11-20T11:00:00Z",
    }),
  },
  {
    name: "ground-lamp check",
    table: "groundLampChecks",
    path: () => `${site()}/boards/${boardId}/ground-checks`,
    body: () => ({
      energisation: "Section 1 first energisation",
      lineVolts: 450,
      lamps: { A: "dim", B: "dim", C: "dim" },
      measuredAt: "2026-11-22T08:00:00Z",
    }),
  },
  {
    name: "trip test",
    table: "tripTests",
    path: () => `${site()}/components/${componentId}/trip-tests`,
    body: () => ({
      test: "inverse_time",
      tripUnit: "thermal_magnetic",
      ratingAmps: 20,
      systemVolts: 240,
      testAmps: 60,
      tripSeconds: 30,
      measuredAt: "2026-11-22T09:00:00Z",
    }),
  },
  {
    name: "step-voltage test",
    table: "stepVoltageTests",
    path: () => `${site()}/boards/${boardId}/step-voltage-tests`,
    body: () => ({
      componentId,
      conductors: "A-G",
      steps: [
        { testVoltsDc: 500, megohms: 1000 },
        { testVoltsDc: 1000, megohms: 950 },
      ],
      measuredAt: "2026-11-22T10:00:00Z",
    }),
  },
  {
    name: "ground-hunt step",
    table: "groundHuntSteps",
    path: () => `${site()}/boards/${boardId}/ground-hunts`,
    body: () => ({
      hunt: "Energisation 1",
      feeder: "1-1",
      positionId,
      action: "opened",
      lamps: { A: "dark", B: "bright", C: "bright" },
      measuredAt: "2026-11-22T11:00:00Z",
    }),
  },
  {
    name: "watch check",
    table: "rtsWatchChecks",
    path: () => `${site()}/return-to-service/stages/${stageId}/watch-checks`,
    body: async () => {
      // Energising goes through hold points and a qualified person's signature (tested in
      // return-to-service.api.test.ts); here the stage is simply put live so watch checks are accepted.
      await t.db.updateTable("rtsStages").set({ status: "energised" }).where("id", "=", stageId).execute();
      return { lamps: "equal", warmToHand: false, note: "Quiet, lamps even" };
    },
  },
  {
    name: "photo upload (to the volunteer's own inspection)",
    table: "photos",
    path: () => `${site()}/photos`,
    body: async () => {
      const i = await volunteer.post(`${site()}/components/${componentId}/inspections`, { percentRusted: 2 });
      const f = new FormData();
      f.set("kind", "as_found");
      f.set("inspectionId", i.body.id);
      f.append("files", new Blob([new Uint8Array(await jpeg())], { type: "image/jpeg" }), "1-1 as found.jpg");
      return f;
    },
  },
];

describe("a repeated Idempotency-Key answers the first result and writes no second row", () => {
  for (const c of CREATES) {
    it(`${c.name}: the repeat gets the same answer, and one row exists`, async () => {
      const key = randomUUID();
      const body = await c.body();
      const before = await count(c.table);
      const first = await volunteer.call("POST", c.path(), body, { "Idempotency-Key": key });
      expect(first.status, JSON.stringify(first.body)).toBe(201);
      expect(await count(c.table)).toBe(before + 1);
      const again = await volunteer.call("POST", c.path(), body, { "Idempotency-Key": key });
      expect(again.status).toBe(201);
      expect(again.headers.get("idempotent-replayed")).toBe("true");
      expect(again.body).toEqual(first.body);
      expect(await count(c.table)).toBe(before + 1);
    });
  }
});

describe("Idempotency-Key edge cases", () => {
  const inspections = () => `${site()}/components/${componentId}/inspections`;
  const body = { percentRusted: 1, belowWaterLine: false, contaminants: [], notes: "" };

  it("without the header, two identical posts make two rows (the forms online are unchanged)", async () => {
    const before = await count("inspections");
    expect((await volunteer.post(inspections(), body)).status).toBe(201);
    expect((await volunteer.post(inspections(), body)).status).toBe(201);
    expect(await count("inspections")).toBe(before + 2);
  });

  it("the same key with a different body is 422 and writes nothing", async () => {
    const key = randomUUID();
    expect((await volunteer.call("POST", inspections(), body, { "Idempotency-Key": key })).status).toBe(201);
    const before = await count("inspections");
    const other = await volunteer.call(
      "POST",
      inspections(),
      { ...body, percentRusted: 9 },
      { "Idempotency-Key": key },
    );
    expect(other.status).toBe(422);
    expect(other.body.error.code).toBe("idempotency_key_reused");
    expect(await count("inspections")).toBe(before);
  });

  it("the same key on another route is 422", async () => {
    const key = randomUUID();
    expect((await volunteer.call("POST", inspections(), body, { "Idempotency-Key": key })).status).toBe(201);
    const r = await volunteer.call("POST", `${site()}/components/${componentId}/contact-readings`, body, {
      "Idempotency-Key": key,
    });
    expect(r.status).toBe(422);
  });

  it("a refused first attempt (400) frees the key: the corrected request with it is recorded once", async () => {
    const key = randomUUID();
    const bad = await volunteer.call(
      "POST",
      inspections(),
      { ...body, percentRusted: 400 },
      { "Idempotency-Key": key },
    );
    expect(bad.status).toBe(400);
    const before = await count("inspections");
    const ok = await volunteer.call("POST", inspections(), body, { "Idempotency-Key": key });
    expect(ok.status).toBe(201);
    expect((await volunteer.call("POST", inspections(), body, { "Idempotency-Key": key })).body).toEqual(ok.body);
    expect(await count("inspections")).toBe(before + 1);
  });

  it("a role that may not create gets 403 with the key, and nothing is kept for it", async () => {
    const viewer = server.client();
    await viewer.signIn(fx.crew.viewer.email);
    const key = randomUUID();
    expect((await viewer.call("POST", inspections(), body, { "Idempotency-Key": key })).status).toBe(403);
    expect(await t.db.selectFrom("idempotencyKeys").select("key").where("key", "=", key).execute()).toEqual([]);
  });

  it("keys belong to their person: another person's same key is a new request", async () => {
    const key = randomUUID();
    const before = await count("inspections");
    expect((await volunteer.call("POST", inspections(), body, { "Idempotency-Key": key })).status).toBe(201);
    const byCurator = await curator.call("POST", inspections(), body, { "Idempotency-Key": key });
    expect(byCurator.status).toBe(201);
    expect(byCurator.headers.get("idempotent-replayed")).toBeNull();
    expect(await count("inspections")).toBe(before + 2);
  });

  it("five racing repeats make exactly one row; each answer is the first result or 409 'in use'", async () => {
    const key = randomUUID();
    const before = await count("inspections");
    const answers = await Promise.all(
      Array.from({ length: 5 }, () => volunteer.call("POST", inspections(), body, { "Idempotency-Key": key })),
    );
    const created = answers.filter((a) => a.status === 201);
    expect(created.length).toBeGreaterThanOrEqual(1);
    for (const a of answers.filter((x) => x.status !== 201)) {
      expect(a.status).toBe(409);
      expect(a.body.error.code).toBe("idempotency_key_in_use");
      expect(a.headers.get("retry-after")).toBe("2");
    }
    for (const a of created) expect(a.body.id).toBe(created[0].body.id);
    expect(await count("inspections")).toBe(before + 1);
  });

  it("a first attempt cut off long ago (still 'running') is 409 'outcome unknown', never a second row", async () => {
    const key = randomUUID();
    expect((await volunteer.call("POST", inspections(), body, { "Idempotency-Key": key })).status).toBe(201);
    // As if the server had stopped between the insert and recording its answer, ten minutes ago.
    await t.db
      .updateTable("idempotencyKeys")
      .set({ state: "running", responseStatus: null, responseBody: null, createdAt: new Date(Date.now() - 600_000) })
      .where("key", "=", key)
      .execute();
    const before = await count("inspections");
    const r = await volunteer.call("POST", inspections(), body, { "Idempotency-Key": key });
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe("idempotency_outcome_unknown");
    expect(await count("inspections")).toBe(before);
  });

  it("a malformed key is a 400 naming the header", async () => {
    const r = await volunteer.call("POST", inspections(), body, { "Idempotency-Key": "short" });
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe("invalid_idempotency_key");
  });
});

/**
 * Edits of existing records the phone sends from its outbox: a defect's fields (PATCH)
 * and a status move, each with the version it was based on. A repeat with the same key answers the
 * first result and changes nothing again; a stale version is 409 with the current record and gives
 * the key back, so the person's choice can go with the same key and the version now current.
 */
describe("edits with a version and an Idempotency-Key", () => {
  const defectAt = async () => {
    const r = await volunteer.post(`${site()}/defects`, {
      boardId,
      positionId,
      title: "Bus bar bolt loose",
      category: "mechanical",
      severity: "impaired",
    });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    return r.body.defect as { id: string; version: number };
  };
  const row = (id: string) =>
    t.db.selectFrom("defects").select(["version", "title", "status"]).where("id", "=", id).executeTakeFirstOrThrow();
  const moves = async (id: string) =>
    Number(
      (
        await t.db
          .selectFrom("defectStatusChanges")
          .select((eb) => eb.fn.countAll().as("n"))
          .where("defectId", "=", id)
          .executeTakeFirstOrThrow()
      ).n,
    );

  it("a repeated defect edit answers the first result and changes the defect once", async () => {
    const d = await defectAt();
    const key = randomUUID();
    const body = { title: "Bus bar bolt loose, phase B", version: d.version };
    const first = await volunteer.call("PATCH", `${site()}/defects/${d.id}`, body, { "Idempotency-Key": key });
    expect(first.status, JSON.stringify(first.body)).toBe(200);
    expect(first.body.defect.version).toBe(d.version + 1);
    const again = await volunteer.call("PATCH", `${site()}/defects/${d.id}`, body, { "Idempotency-Key": key });
    expect(again.status).toBe(200);
    expect(again.headers.get("idempotent-replayed")).toBe("true");
    expect(again.body).toEqual(first.body);
    expect(await row(d.id)).toMatchObject({ version: d.version + 1, title: "Bus bar bolt loose, phase B" });
  });

  it("a repeated status move answers the first result and moves the defect once", async () => {
    const d = await defectAt();
    const key = randomUUID();
    const body = { to: "under_repair", reason: "", version: d.version };
    const first = await volunteer.call("POST", `${site()}/defects/${d.id}/status`, body, { "Idempotency-Key": key });
    expect(first.status, JSON.stringify(first.body)).toBe(200);
    const before = await moves(d.id);
    const again = await volunteer.call("POST", `${site()}/defects/${d.id}/status`, body, { "Idempotency-Key": key });
    expect(again.status).toBe(200);
    expect(again.headers.get("idempotent-replayed")).toBe("true");
    expect(again.body).toEqual(first.body);
    expect(await moves(d.id)).toBe(before);
    expect(await row(d.id)).toMatchObject({ status: "under_repair", version: first.body.defect.version });
  });

  it("an edit based on an old version is 409 with the current defect; the same key then goes with the current version", async () => {
    const d = await defectAt();
    const theirs = await curator.patch(`${site()}/defects/${d.id}`, { severity: "disabling", version: d.version });
    expect(theirs.status, JSON.stringify(theirs.body)).toBe(200);
    const key = randomUUID();
    const mine = { title: "Bus bar bolt sheared", version: d.version };
    const stale = await volunteer.call("PATCH", `${site()}/defects/${d.id}`, mine, { "Idempotency-Key": key });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ id: d.id, version: d.version + 1, severity: "disabling" });
    expect((await row(d.id)).title).toBe("Bus bar bolt loose");
    const chosen = { ...mine, version: stale.body.error.current.version };
    const sent = await volunteer.call("PATCH", `${site()}/defects/${d.id}`, chosen, { "Idempotency-Key": key });
    expect(sent.status, JSON.stringify(sent.body)).toBe(200);
    expect(await row(d.id)).toMatchObject({ title: "Bus bar bolt sheared", version: d.version + 2 });
  });

  // A 409 without the current record is a refusal to the outbox (src/lib/outbox/queue.ts classify), not a conflict.
  it("a status move the role may not make is refused without a record to choose from, and changes nothing", async () => {
    const d = await defectAt();
    const r = await volunteer.call(
      "POST",
      `${site()}/defects/${d.id}/status`,
      { to: "closed", reason: "", version: d.version },
      { "Idempotency-Key": randomUUID() },
    );
    expect([403, 409, 422]).toContain(r.status);
    expect(r.body.error.message).toBeTruthy();
    expect(r.body.error.current).toBeUndefined();
    expect(await row(d.id)).toMatchObject({ status: "raised", version: d.version });
  });
});

import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { recommendationResponse } from "../../src/schemas/inventory";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
let volunteer: Client;
let base: string;
let boardId: string;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
  volunteer = server.client();
  await volunteer.signIn(fx.crew.volunteer.email);
  base = `/api/sites/${fx.siteId}`;
  // 4 rows on a 1600 mm face, water line at 900 mm: rows 3–4 reach below it, rows 1–2 stay above.
  boardId = (
    await curator.post(`${base}/boards`, {
      name: "Survey board",
      gridRows: 4,
      gridCols: 60,
      faceHeightMm: 1600,
      waterLineMm: 900,
    })
  ).body.id;
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

let n = 0;
async function component(kind: string, heritage: "original" | "period" | "modern", gridRow = 4) {
  const r = await curator.post(`${base}/boards/${boardId}/positions`, {
    designation: `S-${++n}`,
    kind,
    gridRow,
    gridCol: (n % 60) + 1,
  }); // one cell per position (a unique cell per board, migration 0220)
  const c = r.body.component;
  const p = await curator.patch(`${base}/components/${c.id}`, { heritage, version: c.version });
  return p.body as { id: string; version: number; positionId: string };
}

describe("before any flood event is recorded", () => {
  it("the recommendation is null with the reason, and any disposition is stored without counting as an override", async () => {
    const c = await component("meter", "original");
    const r = await curator.get(`${base}/components/${c.id}/recommendation`);
    expect(r.status).toBe(200);
    expect(recommendationResponse.parse(r.body).recommendation).toBeNull();
    expect(r.body.assumptions[0]).toMatch(/No flood event/);
    const d = await curator.put(`${base}/components/${c.id}/disposition`, { disposition: "clean", version: c.version });
    expect(d.status).toBe(200);
    expect(d.body.component).toMatchObject({
      disposition: "clean",
      dispositionRecommended: null,
      dispositionOverridden: false,
    });
  });
});

describe("recommendations and dispositions after a salt-water flood", () => {
  beforeAll(async () => {
    const f = await curator.post(`${base}/flood-events`, {
      occurredOn: "2026-10-14",
      waterType: "salt",
      maxDepthM: 1.1,
      hoursSubmerged: 30,
    });
    expect(f.status).toBe(201);
  });

  it.each([
    // Source for each row: src/domain/flood-guidance.ts, Tideline's table from memory of NEMA GD 1 and NFPA 70B (chapter on equipment exposed to water).
    ["molded_case_breaker", "modern", 4, true, "replace"], // NEMA GD 1 (from memory): submerged molded-case breakers are replaced
    ["molded_case_breaker", "original", 4, true, "source"], // same, but an original part cannot be bought new: Tideline's heritage rule → source
    ["power_breaker", "period", 4, true, "rebuild"], // NEMA GD 1 (from memory): power breakers may be reconditioned by qualified people
    ["meter", "modern", 1, false, "rebuild"], // NFPA 70B (from memory): above the line, salt residue is corrosive → recondition, not just clean
  ] as const)(
    "a %s (%s) in row %i (below the line: %s) is recommended %s",
    async (kind, heritage, row, below, expected) => {
      const c = await component(kind, heritage, row);
      await volunteer.post(`${base}/components/${c.id}/inspections`, {
        percentRusted: 0.5,
        belowWaterLine: below,
        contaminants: [],
        insulation: "intact",
      });
      const r = await curator.get(`${base}/components/${c.id}/recommendation`);
      expect(r.body.recommendation.disposition).toBe(expected);
      expect(r.body.recommendation.source).toMatch(/NEMA GD 1/);
      expect(r.body.basis.belowWaterLine).toBe(below);
    },
  );

  it("when nothing says whether it was under water, the board's water line decides (position height vs water line)", async () => {
    const high = await component("molded_case_breaker", "modern", 1); // row 1 bottom edge at 1200 mm, above 900 mm
    const low = await component("molded_case_breaker", "modern", 4); // row 4 bottom edge at 0 mm
    const h = (await curator.get(`${base}/components/${high.id}/recommendation`)).body;
    const l = (await curator.get(`${base}/components/${low.id}/recommendation`)).body;
    expect([h.basis.belowWaterLine, l.basis.belowWaterLine]).toEqual([false, true]);
    expect([h.recommendation.disposition, l.recommendation.disposition]).toEqual(["rebuild", "replace"]);
    expect(h.assumptions.join(" ")).toMatch(/place on the board/);
  });

  it("when the curator follows the recommendation, no reason is needed and it is not an override", async () => {
    const c = await component("molded_case_breaker", "modern");
    const r = await curator.put(`${base}/components/${c.id}/disposition`, {
      disposition: "replace",
      version: c.version,
    });
    expect(r.status).toBe(200);
    expect(r.body.component).toMatchObject({
      disposition: "replace",
      dispositionRecommended: "replace",
      dispositionOverridden: false,
      version: c.version + 1,
    });
    expect(r.body.decision).toMatchObject({
      disposition: "replace",
      recommended: "replace",
      overridden: false,
      decidedByName: "Test curator",
    });
  });

  it("when the curator overrides without a reason, it gets 400 on reason; with one, the override and reason are kept in the history", async () => {
    const c = await component("molded_case_breaker", "original");
    const bare = await curator.put(`${base}/components/${c.id}/disposition`, {
      disposition: "rebuild",
      reason: "  ",
      version: c.version,
    });
    expect(bare.status).toBe(400);
    expect(bare.body.error.fields.reason).toBeDefined();
    const ok = await curator.put(`${base}/components/${c.id}/disposition`, {
      disposition: "rebuild",
      reason: "Keep original fabric; the restorer can rebuild it.",
      version: c.version,
    });
    expect(ok.status).toBe(200);
    expect(ok.body.component).toMatchObject({
      disposition: "rebuild",
      dispositionRecommended: "source",
      dispositionOverridden: true,
      dispositionReason: "Keep original fabric; the restorer can rebuild it.",
    });
    const again = await curator.put(`${base}/components/${c.id}/disposition`, {
      disposition: "source",
      version: ok.body.component.version,
    });
    expect(again.body.component.dispositionOverridden).toBe(false);
    const detail = (await volunteer.get(`${base}/positions/${c.positionId}`)).body;
    expect(detail.dispositions.map((d: any) => [d.disposition, d.overridden])).toEqual([
      ["source", false],
      ["rebuild", true],
    ]);
    const audit = detail.history.filter((h: any) => h.action === "disposition");
    expect(audit[1].after).toMatchObject({
      disposition: "rebuild",
      dispositionOverridden: true,
      recommended: "source",
    });
  });

  it("when a disposition is saved on a stale version, it gets 409 with the component as it is now", async () => {
    const c = await component("fuse", "modern");
    await curator.put(`${base}/components/${c.id}/disposition`, { disposition: "replace", version: c.version });
    const stale = await curator.put(`${base}/components/${c.id}/disposition`, {
      disposition: "rebuild",
      reason: "x",
      version: c.version,
    });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ id: c.id, disposition: "replace" });
  });

  it("when a volunteer tries to decide a disposition or edit a nameplate, it gets 403", async () => {
    const c = await component("fuse", "modern");
    expect(
      (await volunteer.put(`${base}/components/${c.id}/disposition`, { disposition: "replace", version: c.version }))
        .status,
    ).toBe(403);
    expect((await volunteer.patch(`${base}/components/${c.id}`, { maker: "x", version: c.version })).status).toBe(403);
  });

  it("when an inspection is out of range or names an unknown contaminant, it gets 400 with those fields", async () => {
    const c = await component("fuse", "modern");
    const r = await volunteer.post(`${base}/components/${c.id}/inspections`, {
      percentRusted: 101,
      contaminants: ["lava"],
      mechanism: "wobbly",
    });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)).toEqual(
      expect.arrayContaining(["percentRusted", "contaminants.0", "mechanism"]),
    );
  });

  it("when a custody move names the state it is already in, it gets 409 same_state", async () => {
    const c = await component("fuse", "modern");
    const r = await volunteer.post(`${base}/components/${c.id}/custody`, { toState: "in_place", version: c.version });
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe("same_state");
  });
});

describe("made on a phone with no signal, sent later (the outbox's body time and Tideline-Device-Time header)", () => {
  const min = 60_000;
  const send = (path: string, body: Record<string, unknown>, deviceNow: Date) =>
    volunteer.call("POST", path, body, { "Tideline-Device-Time": deviceNow.toISOString() });

  it("an inspection keeps when it was made, corrected by the phone's clock; a phone a day off or a time ahead is refused", async () => {
    const c = await component("fuse", "modern");
    const url = `${base}/components/${c.id}/inspections`;
    // Made 50 minutes ago on a phone whose clock runs 7 minutes fast: stored as made on the server's clock.
    const fast = 7 * min;
    const made = new Date(Date.now() - 50 * min);
    const r = await send(
      url,
      { percentRusted: 10, at: new Date(made.getTime() + fast).toISOString() },
      new Date(Date.now() + fast),
    );
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    const row = await t.db.selectFrom("inspections").selectAll().where("id", "=", r.body.id).executeTakeFirstOrThrow();
    expect(Math.abs(row.inspectedAt.getTime() - made.getTime())).toBeLessThan(5_000);
    expect(row.createdAt.getTime()).toBeGreaterThan(Date.now() - min);
    // An inspection made after it on line is the newest, though the phone's arrived later.
    const online = await volunteer.post(url, { percentRusted: 30 });
    expect(online.status).toBe(201);
    const latest = (await curator.get(`${base}/positions/${c.positionId}`)).body;
    expect(JSON.stringify(latest)).toContain(online.body.id);

    const dayOff = await send(
      url,
      { percentRusted: 10, at: new Date().toISOString() },
      new Date(Date.now() + 26 * 60 * min),
    );
    expect(dayOff.status).toBe(400);
    expect(dayOff.body.error.fields.at).toContain("set the phone's date and time");
    const ahead = await send(url, { percentRusted: 10, at: new Date(Date.now() + 30 * min).toISOString() }, new Date());
    expect(ahead.status).toBe(400);
    expect(ahead.body.error.fields.at).toBe("That time is in the future.");
  });

  it("a custody move is applied in the order it arrives and keeps when it was made beside it", async () => {
    const move = async (at: Date) => {
      const c = await component("fuse", "modern");
      const r = await send(
        `${base}/components/${c.id}/custody`,
        {
          toState: "removed",
          tagNumber: `KL-${++n}-${Date.now().toString(36)}`,
          location: "Bag 4",
          at: at.toISOString(),
          version: c.version,
        },
        new Date(),
      );
      expect(r.status, JSON.stringify(r.body)).toBe(201);
      return r.body.move;
    };
    const made = new Date(Date.now() - 45 * min);
    const late = await move(made);
    expect(Math.abs(Date.parse(late.madeAt) - made.getTime())).toBeLessThan(5_000);
    expect(Date.parse(late.movedAt)).toBeGreaterThan(Date.now() - min);
    // One made a moment ago (on line) keeps no separate time.
    expect((await move(new Date())).madeAt).toBeNull();
  });
});

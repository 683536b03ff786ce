import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";

// Custody follows the tag-and-return chain (src/domain/custody-chain.ts, common
// practice); each forbidden move is 409/422 with its reason; the curator's release is recorded and audited.
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
  boardId = (await curator.post(`${base}/boards`, { name: "Chain board", gridRows: 4, gridCols: 8 })).body.id;
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

let n = 0;
async function component(kind = "molded_case_breaker") {
  const r = await curator.post(`${base}/boards/${boardId}/positions`, {
    designation: `C-${++n}`,
    kind,
    gridRow: Math.ceil(n / 8),
    gridCol: ((n - 1) % 8) + 1,
  });
  return r.body.component as { id: string; version: number };
}
const move = (who: Client, c: { id: string; version: number }, body: Record<string, unknown>) =>
  who.post(`${base}/components/${c.id}/custody`, { version: c.version, ...body });
async function step(c: { id: string; version: number }, toState: string, extra: Record<string, unknown> = {}) {
  const r = await move(volunteer, c, { toState, ...extra });
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  return r.body.component as { id: string; version: number };
}
const decide = async (c: { id: string; version: number }, disposition: string) =>
  (await curator.put(`${base}/components/${c.id}/disposition`, { disposition, version: c.version })).body.component as {
    id: string;
    version: number;
  };
const reading = (componentId: string, megohms: number, conductors = "A-G", measuredAt = "2026-11-20T09:00:00Z") =>
  volunteer.post(`${base}/boards/${boardId}/insulation-readings`, {
    componentId,
    testVoltsDc: 1000,
    megohms,
    conductors,
    equipmentTempC: 20,
    measuredAt,
  });

describe("the custody chain", () => {
  it("a removal without a tag gets 422 tag_required and moves nothing; with a tag it is recorded", async () => {
    const c = await component();
    const r = await move(volunteer, c, { toState: "removed" });
    expect(r.status).toBe(422);
    expect(r.body.error).toMatchObject({ code: "tag_required", fields: { tagNumber: expect.any(String) } });
    expect(r.body.error.message).toMatch(/tag/);
    expect(await t.db.selectFrom("custodyMoves").select("id").where("componentId", "=", c.id).execute()).toHaveLength(
      0,
    );
    expect((await move(volunteer, c, { toState: "removed", tagNumber: "KL-7001" })).status).toBe(201);
  });

  it("a tag already on another component of the site is refused", async () => {
    const a = await component();
    await step(a, "removed", { tagNumber: "KL-7100" });
    const b = await component();
    const r = await move(volunteer, b, { toState: "removed", tagNumber: "KL-7100" });
    expect(r.status).toBe(409);
    expect(r.body.error.fields).toHaveProperty("tagNumber");
  });

  it("a generated tag is the next free T-number of the site", async () => {
    const first = (await volunteer.get(`${base}/tags/next`)).body.tagNumber;
    expect(first).toMatch(/^T-\d{4}$/);
    const c = await component();
    await step(c, "removed", { tagNumber: first });
    const next = (await volunteer.get(`${base}/tags/next`)).body.tagNumber;
    expect(Number(next.slice(2))).toBe(Number(first.slice(2)) + 1);
  });

  it("a refit straight from the workshop: workshop → refitted is refused with every reason (409 not_ready first)", async () => {
    let c = await component();
    c = await step(c, "removed", { tagNumber: "KL-7200" });
    c = await step(c, "in_workshop");
    await volunteer.post(`${base}/components/${c.id}/inspections`, { insulation: "tracking" });
    await reading(c.id, 0.2);
    const r = await move(volunteer, c, { toState: "refitted" });
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe("not_ready");
    expect(r.body.error.current.refusals.map((x: { rule: string }) => x.rule)).toEqual([
      "not_ready",
      "disposition_undecided",
      "condition_unproven",
      "reading_failing",
    ]);
    expect(r.body.error.message).toMatch(/ready to refit/);
  });

  it("ready to refit needs a decided disposition (422), and is allowed once the curator decides", async () => {
    let c = await component("meter");
    c = await step(c, "removed", { tagNumber: "KL-7300" });
    c = await step(c, "in_workshop");
    const r = await move(volunteer, c, { toState: "ready_to_refit" });
    expect(r.status).toBe(422);
    expect(r.body.error.code).toBe("disposition_undecided");
    c = await decide(c, "rebuild");
    c = await step(c, "ready_to_refit");
    await step(c, "refitted"); // a meter needs no insulation reading
  });

  it("a breaker is refitted only after a reading meeting its criterion", async () => {
    let c = await component();
    c = await step(c, "removed", { tagNumber: "KL-7400" });
    c = await decide(c, "rebuild");
    c = await step(c, "in_workshop");
    c = await step(c, "ready_to_refit");
    const none = await move(volunteer, c, { toState: "refitted" });
    expect(none.status).toBe(422);
    expect(none.body.error.code).toBe("reading_required");
    await reading(c.id, 0.5); // below ANSI/NETA MTS-2019 Table 100.1's 100 MΩ for the 600 V class
    expect((await move(volunteer, c, { toState: "refitted" })).body.error.code).toBe("reading_failing");
    expect((await reading(c.id, 500)).status).toBe(201);
    await step(c, "refitted");
  });

  it("phase A below its criterion is not hidden by later readings of phases B and C that meet", async () => {
    let c = await component();
    c = await step(c, "removed", { tagNumber: "KL-7450" });
    c = await decide(c, "rebuild");
    c = await step(c, "in_workshop");
    c = await step(c, "ready_to_refit");
    expect((await reading(c.id, 0.5, "A-G", "2026-11-20T09:00:00Z")).status).toBe(201);
    expect((await reading(c.id, 500, "B-G", "2026-11-20T09:05:00Z")).status).toBe(201);
    expect((await reading(c.id, 500, "C-G", "2026-11-20T09:10:00Z")).status).toBe(201);
    expect((await move(volunteer, c, { toState: "refitted" })).body.error.code).toBe("reading_failing");
    expect((await reading(c.id, 480, "A-G", "2026-11-21T09:00:00Z")).status).toBe(201);
    await step(c, "refitted");
  });

  it("the form's options propose the next sensible move, and nothing after a refit", async () => {
    let c = await component("meter");
    const o1 = (await volunteer.get(`${base}/components/${c.id}/custody-options`)).body;
    expect(o1.proposed).toBe("removed");
    expect(o1.moves.find((m: { to: string }) => m.to === "in_workshop").refusals[0].rule).toBe("off_chain");
    c = await step(c, "removed", { tagNumber: "KL-7500" });
    c = await decide(c, "clean");
    c = await step(c, "ready_to_refit");
    c = await step(c, "refitted");
    expect((await volunteer.get(`${base}/components/${c.id}/custody-options`)).body.proposed).toBeNull();
  });
});

describe("the curator's release", () => {
  it("a volunteer cannot release a refusal (403)", async () => {
    let c = await component();
    c = await step(c, "removed", { tagNumber: "KL-7600" });
    const r = await move(volunteer, c, { toState: "refitted", releaseReason: "Trust me" });
    expect(r.status).toBe(403);
  });

  it("a release needs a reason of a few words (400)", async () => {
    let c = await component();
    c = await step(c, "removed", { tagNumber: "KL-7700" });
    const r = await move(curator, c, { toState: "refitted", releaseReason: "ok" });
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toHaveProperty("releaseReason");
  });

  it("the curator releases with a reason: the move records the released rules and the reason, and the audit trail shows them", async () => {
    let c = await component();
    c = await step(c, "removed", { tagNumber: "KL-7800" });
    const reason = "Refitted for the owner's photo day only; isolated and locked out, not to be energised";
    const r = await move(curator, c, { toState: "refitted", releaseReason: reason });
    expect(r.status).toBe(201);
    expect(r.body.move).toMatchObject({
      toState: "refitted",
      releasedRules: ["not_ready", "disposition_undecided", "reading_required"],
      releaseReason: reason,
    });
    const audit = await t.db
      .selectFrom("auditLog")
      .select(["after", "actorId"])
      .where("entityId", "=", c.id)
      .where("action", "=", "custody")
      .orderBy("id", "desc")
      .executeTakeFirstOrThrow();
    expect(audit.actorId).toBe(fx.crew.curator.id);
    expect(audit.after).toMatchObject({
      custody: "refitted",
      releasedRules: ["not_ready", "disposition_undecided", "reading_required"],
      releaseReason: reason,
    });
    const detail = await volunteer.get(
      `${base}/positions/${(await t.db.selectFrom("components").select("positionId").where("id", "=", c.id).executeTakeFirstOrThrow()).positionId}`,
    );
    expect(detail.body.custodyMoves[0]).toMatchObject({ releaseReason: reason, movedByName: expect.any(String) });
  });

  it("a missing tag is never released", async () => {
    const c = await component();
    const r = await move(curator, c, { toState: "removed", releaseReason: "No tags left in the kit today" });
    expect(r.status).toBe(422);
    expect(r.body.error.code).toBe("tag_required");
  });
});

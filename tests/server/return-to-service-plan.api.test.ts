import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { DEFAULT_TEMPLATE } from "../../src/domain/return-to-service";

// The curator's plan editing: the site's hold-point template, a stage's hold points,
// the stage's supply / protection / qualified person, the overview's sequence and the operations log.
let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let boardId: string;
let sectionId: string;
let breakerId: string;
const as: Record<string, Client> = {};
const site = () => `/api/sites/${fx.siteId}`;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  const board = await t.db
    .insertInto("boards")
    .values({ siteId: fx.siteId, name: "Aft board", nominalVolts: 450 })
    .returning("id")
    .executeTakeFirstOrThrow();
  boardId = board.id;
  const section = await t.db
    .insertInto("sections")
    .values({ siteId: fx.siteId, boardId, name: "Steering" })
    .returning("id")
    .executeTakeFirstOrThrow();
  sectionId = section.id;
  const p = await t.db
    .insertInto("positions")
    .values({
      siteId: fx.siteId,
      boardId,
      sectionId,
      designation: "2-1",
      kind: "molded_case_breaker",
      gridRow: 1,
      gridCol: 1,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  breakerId = (
    await t.db
      .insertInto("components")
      .values({ siteId: fx.siteId, positionId: p.id, kind: "molded_case_breaker", poles: 3, year: 1944 })
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

const newStage = async (name: string, body: Record<string, unknown> = {}) => {
  const r = await as.curator.post(`${site()}/boards/${boardId}/return-to-service/stages`, {
    name,
    sectionIds: [sectionId],
    supply: "temporary_fused",
    voltageStep: "reduced",
    stepVolts: 230,
    protectionDevice: "Fused disconnect",
    protectionRatingA: 20,
    protectionLimitA: 30,
    ...body,
  });
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  return r.body.stage;
};
const stageNow = async (id: string) =>
  (await as.viewer.get(`${site()}/boards/${boardId}/return-to-service`)).body.stages.find((s: any) => s.id === id);

describe("the site's hold-point template", () => {
  it("the curator edits it; new stages take it, stages already planned keep theirs; a stale save gets 409 with the template as it is now", async () => {
    const before = await newStage("Before the template changed");
    const got = await as.volunteer.get(`${site()}/return-to-service/settings`);
    expect(got.status).toBe(200);
    expect(got.body.settings).toMatchObject({ insulationMaxAgeDays: 7, version: 0 });
    const template = [
      ...DEFAULT_TEMPLATE.slice(0, 5),
      { kind: "custom", title: "Shore box earth continuity checked", detail: "Crew's own." },
      ...DEFAULT_TEMPLATE.slice(5),
    ];
    expect(
      (
        await as.volunteer.put(`${site()}/return-to-service/settings`, {
          insulationMaxAgeDays: 5,
          template,
          version: 0,
        })
      ).status,
    ).toBe(403);
    const saved = await as.curator.put(`${site()}/return-to-service/settings`, {
      insulationMaxAgeDays: 5,
      template,
      version: 0,
    });
    expect(saved.status, JSON.stringify(saved.body)).toBe(200);
    expect(saved.body.settings.version).toBe(1);
    const stale = await as.curator.put(`${site()}/return-to-service/settings`, {
      insulationMaxAgeDays: 9,
      template: DEFAULT_TEMPLATE,
      version: 0,
    });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ insulationMaxAgeDays: 5, version: 1 });

    const after = await newStage("After the template changed");
    expect(after.steps.map((s: any) => s.title)).toContain("Shore box earth continuity checked");
    expect(after.steps).toHaveLength(11);
    expect((await stageNow(before.id)).steps).toHaveLength(10);
    for (const s of [after, before]) await as.curator.del(`${site()}/return-to-service/stages/${s.id}`);
    // back to the default for the other tests
    expect(
      (
        await as.curator.put(`${site()}/return-to-service/settings`, {
          insulationMaxAgeDays: 7,
          template: DEFAULT_TEMPLATE,
          version: 1,
        })
      ).status,
    ).toBe(200);
  });
});

describe("a stage's hold points while it is being prepared", () => {
  it("the curator adds one at a place, rewords it (version-checked), moves it and removes it; a signed one stays", async () => {
    const s = await newStage("Steering gear at reduced voltage");
    const added = await as.curator.post(`${site()}/return-to-service/stages/${s.id}/steps`, {
      kind: "custom",
      title: "Hull bonding strap refitted",
      detail: "",
      atIndex: 1,
    });
    expect(added.status, JSON.stringify(added.body)).toBe(201);
    const step = added.body.stage.steps[1];
    expect(step.title).toBe("Hull bonding strap refitted");

    const reworded = await as.curator.patch(`${site()}/return-to-service/steps/${step.id}`, {
      title: "Hull bonding strap refitted and tight",
      version: step.version,
    });
    expect(reworded.status).toBe(200);
    const stale = await as.curator.patch(`${site()}/return-to-service/steps/${step.id}`, {
      title: "Someone else's words",
      version: step.version,
    });
    expect(stale.status).toBe(409);

    const moved = await as.curator.post(`${site()}/return-to-service/steps/${step.id}/move`, { toIndex: 4 });
    expect(moved.status).toBe(200);
    expect((await stageNow(s.id)).steps[4].title).toBe("Hull bonding strap refitted and tight");

    expect((await as.volunteer.del(`${site()}/return-to-service/steps/${step.id}`)).status).toBe(403);
    expect((await as.curator.del(`${site()}/return-to-service/steps/${step.id}`)).status).toBe(204);
    const now = await stageNow(s.id);
    expect(now.steps.map((x: any) => x.title)).not.toContain("Hull bonding strap refitted and tight");
    expect(now.steps.map((x: any) => x.sortOrder)).toEqual(now.steps.map((_: unknown, i: number) => i + 1));

    const isolate = now.steps.find((x: any) => x.kind === "isolate");
    expect(
      (await as.volunteer.post(`${site()}/return-to-service/steps/${isolate.id}/signoffs`, { attempt: 1 })).status,
    ).toBe(201);
    const refused = await as.curator.del(`${site()}/return-to-service/steps/${isolate.id}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toContain("signed");
    expect((await as.curator.del(`${site()}/return-to-service/stages/${s.id}`)).status).toBe(409);
  });
});

describe("a stage's supply, protection and qualified person", () => {
  it("a protection rated above the stage's limit blocks until the curator lowers it; naming a qualified person clears that blocker", async () => {
    const s = await newStage("Fire pump feeder", { protectionRatingA: 63, protectionLimitA: 30 });
    const codes = (x: any) => x.gate.blockers.map((b: any) => b.code);
    expect(codes(s)).toEqual(expect.arrayContaining(["protection_above_limit", "no_qualified_person"]));
    await t.db
      .insertInto("rtsQualifiedPersons")
      .values({ siteId: fx.siteId, userId: fx.crew.curator.id, qualification: "Fictional card", expiresOn: null })
      .execute();
    const r = await as.curator.patch(`${site()}/return-to-service/stages/${s.id}`, {
      protectionRatingA: 20,
      qualifiedPersonId: fx.crew.curator.id,
      version: s.version,
    });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    expect(codes(r.body.stage)).not.toContain("protection_above_limit");
    expect(codes(r.body.stage)).not.toContain("no_qualified_person");
    expect(r.body.stage.qualifiedPerson.userId).toBe(fx.crew.curator.id);
    const stale = await as.curator.patch(`${site()}/return-to-service/stages/${s.id}`, {
      protectionRatingA: 100,
      version: s.version,
    });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current.protectionRatingA).toBe(20);
    expect(
      (await as.volunteer.patch(`${site()}/return-to-service/stages/${s.id}`, { name: "x", version: 2 })).status,
    ).toBe(403);
  });
});

describe("the overview and the operations log", () => {
  it("the overview lists every board's stages in plan order with their states", async () => {
    const r = await as.viewer.get(`${site()}/return-to-service`);
    expect(r.status).toBe(200);
    const b = r.body.boards.find((x: any) => x.boardId === boardId);
    const stages = (await as.viewer.get(`${site()}/boards/${boardId}/return-to-service`)).body.stages;
    expect(b.sequence.map((s: any) => s.id)).toEqual(stages.map((s: any) => s.id));
    expect(b.sequence.map((s: any) => s.state)).toEqual(stages.map((s: any) => s.gate.state));
  });
  it("a board without a plan is listed, in name order among the others, with no stages", async () => {
    const other = await t.db
      .insertInto("boards")
      .values({ siteId: fx.siteId, name: "Aaa shore panel", nominalVolts: 230 })
      .returning("id")
      .executeTakeFirstOrThrow();
    const r = await as.viewer.get(`${site()}/return-to-service`);
    expect(r.body.boards[0]).toEqual({
      boardId: other.id,
      boardName: "Aaa shore panel",
      stages: 0,
      released: 0,
      current: null,
      overdue: false,
      sequence: [],
    });
    expect(r.body.boards.some((b: any) => b.boardId === boardId && b.stages > 0)).toBe(true);
  });
  it("an operation in the log names its breaker, who operated it, why and during which stage", async () => {
    const s = await newStage("Breaker exercise");
    const r = await as.volunteer.post(`${site()}/components/${breakerId}/breaker-operations`, {
      operation: "close",
      stageId: s.id,
      why: "Closed for the stage",
    });
    expect(r.status).toBe(201);
    const ev = (await as.viewer.get(`${site()}/boards/${boardId}/return-to-service`)).body.events.find(
      (e: any) => e.kind === "operation" && e.id === r.body.id,
    );
    expect(ev).toMatchObject({
      componentId: breakerId,
      stageId: s.id,
      stageName: "Breaker exercise",
      by: "Test volunteer",
      detail: "Closed for the stage",
      title: "Closed 2-1",
    });
  });
});

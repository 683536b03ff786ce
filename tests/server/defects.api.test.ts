import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { priorityScore } from "../../src/domain/priority";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { makeBoard } from "./defects-fixtures";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let board: Awaited<ReturnType<typeof makeBoard>>;
const as: Record<string, Client> = {};

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  board = await makeBoard(t.db, fx.siteId);
  for (const role of ["curator", "volunteer", "photographer", "scrounger", "viewer", "outsider"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const url = (p = "") => `/api/sites/${fx.siteId}/defects${p}`;
const raise = (c: Client, over: Record<string, unknown> = {}) =>
  c.post(url(), {
    boardId: board.boardId,
    title: "Arc track on line side",
    category: "insulation",
    severity: "impaired",
    ...over,
  });

describe("raising a defect", () => {
  it("when a volunteer raises one from an inspection, it gets the position, component and section of that inspection", async () => {
    const r = await raise(as.volunteer, { inspectionId: board.inspectionId, effortHours: 3, partsState: "in_hand" });
    expect(r.status).toBe(201);
    const p = board.positions[0];
    expect(r.body.defect).toMatchObject({
      positionId: p.id,
      componentId: p.componentId,
      sectionId: p.sectionId,
      designation: "1-1",
      status: "raised",
      createdBy: fx.crew.volunteer.id,
    });
    // position 1-1's component is original fabric (fixture): 45 + 10 heritage − 16 effort + 10 parts
    const expected = priorityScore({
      severity: "impaired",
      safetyCritical: false,
      blocksEnergisation: false,
      originalFabric: true,
      effortHours: 3,
      partsAvailable: "in_hand",
    }).score;
    expect(r.body.defect.priorityScore).toBe(expected);
    expect(expected).toBe(49);
  });

  it.each(["viewer", "scrounger", "photographer"])("when a %s raises a defect, it gets 403", async (role) => {
    expect((await raise(as[role])).status).toBe(403);
  });

  it("when the body is incomplete, it answers 400 naming the fields", async () => {
    const r = await as.curator.post(url(), { boardId: board.boardId, title: "x" });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)).toEqual(expect.arrayContaining(["title", "category", "severity"]));
  });

  it("when the position belongs to another board, it answers 400", async () => {
    const other = await makeBoard(t.db, fx.siteId, "Emergency board", 1);
    const r = await raise(as.curator, { positionId: other.positions[0].id });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.positionId).toMatch(/another board/);
  });

  it("a volunteer cannot assign while raising (403); the curator can", async () => {
    expect((await raise(as.volunteer, { assigneeId: fx.crew.volunteer.id })).status).toBe(403);
    const r = await raise(as.curator, { assigneeId: fx.crew.volunteer.id });
    expect(r.status).toBe(201);
    expect(r.body.defect.assigneeName).toBe("Test volunteer");
  });

  it("a member of another site gets 404 and a bad id gets 400", async () => {
    expect((await as.outsider.get(url())).status).toBe(404);
    expect((await as.curator.get(url("/not-a-uuid"))).status).toBe(400);
  });
});

describe("editing", () => {
  it("a stale version gets 409 with the current record", async () => {
    const d = (await raise(as.curator)).body.defect;
    expect((await as.curator.patch(url(`/${d.id}`), { title: "First edit", version: d.version })).status).toBe(200);
    const stale = await as.curator.patch(url(`/${d.id}`), { title: "Second edit", version: d.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ id: d.id, title: "First edit", version: d.version + 1 });
  });

  it("when the linked component's heritage changes, its defects are ranked again (original fabric weighs in)", async () => {
    const r = await raise(as.volunteer, { inspectionId: board.inspectionId, effortHours: 3, partsState: "in_hand" });
    const before = r.body.defect.priorityScore;
    const c = await t.db
      .selectFrom("components")
      .select(["id", "version", "heritage"])
      .where("id", "=", r.body.defect.componentId)
      .executeTakeFirstOrThrow();
    expect(c.heritage).toBe("original");
    const patched = await as.curator.patch(`/api/sites/${fx.siteId}/components/${c.id}`, {
      heritage: "modern",
      version: c.version,
    });
    expect(patched.status).toBe(200);
    const after = (await as.curator.get(url(`/${r.body.defect.id}`))).body.defect;
    const expected = priorityScore({
      severity: "impaired",
      safetyCritical: false,
      blocksEnergisation: false,
      originalFabric: false,
      effortHours: 3,
      partsAvailable: "in_hand",
    }).score;
    expect(after.priorityScore).toBe(expected);
    expect(before - after.priorityScore).toBe(10); // the heritage term of src/domain/priority.ts
    // Only the derived score moved: someone holding the defect open can still save it.
    expect(after.version).toBe(r.body.defect.version);
    await as.curator.patch(`/api/sites/${fx.siteId}/components/${c.id}`, {
      heritage: "original",
      version: c.version + 1,
    });
  });

  it("changing severity re-stores the priority score", async () => {
    const d = (await raise(as.curator, { severity: "cosmetic", effortHours: 0 })).body.defect;
    const r = await as.curator.patch(url(`/${d.id}`), {
      severity: "disabling",
      safetyCritical: true,
      version: d.version,
    });
    expect(r.body.defect.priorityScore).toBe(70 + 40 + 10); // disabling + safety + parts none needed; no component
  });

  it("a volunteer cannot edit a defect another person raised", async () => {
    const d = (await raise(as.curator)).body.defect;
    expect((await as.volunteer.patch(url(`/${d.id}`), { title: "Mine now", version: d.version })).status).toBe(403);
  });
});

describe("workflow", () => {
  const move = (c: Client, d: { id: string; version: number }, to: string, extra: Record<string, unknown> = {}) =>
    c.post(url(`/${d.id}/status`), { to, version: d.version, ...extra });

  it("a volunteer carries their own defect to verification; only someone else closes it", async () => {
    let d = (await raise(as.volunteer)).body.defect;
    d = (await move(as.volunteer, d, "under_repair")).body.defect;
    d = (await move(as.volunteer, d, "awaiting_retest")).body.defect;
    expect(d).toMatchObject({ status: "awaiting_retest", repairedBy: fx.crew.volunteer.id });
    const self = await move(as.volunteer, d, "closed");
    expect(self.status).toBe(403);
    // Closing asks for the evidence first
    const bare = await move(as.curator, d, "closed");
    expect(bare.status).toBe(422);
    expect(bare.body.error.code).toBe("evidence_required");
    const reading = await as.volunteer.post(`/api/sites/${fx.siteId}/boards/${d.boardId}/insulation-readings`, {
      circuit: "Feeder 3",
      testVoltsDc: 1000,
      megohms: 500,
      conductors: "A-G",
      equipmentTempC: 20,
      measuredAt: "2026-11-20T09:00:00Z",
    });
    expect(reading.status).toBe(201);
    expect(
      (
        await as.volunteer.post(url(`/${d.id}/readings`), {
          readingKind: "insulation",
          readingId: reading.body.reading.id,
          role: "retest",
        })
      ).status,
    ).toBe(201);
    const closed = await move(as.curator, d, "closed");
    expect(closed.status).toBe(200);
    expect(closed.body.defect).toMatchObject({ status: "closed", verifiedBy: fx.crew.curator.id });
    expect(closed.body.defect.closedAt).not.toBeNull();
    const page = await as.curator.get(url(`/${d.id}`));
    expect(page.body.history.map((h: { toStatus: string }) => h.toStatus)).toEqual([
      "closed",
      "awaiting_retest",
      "under_repair",
      "raised",
    ]);
  });

  it("the curator who did the repair cannot verify it (409 same_person)", async () => {
    let d = (await raise(as.curator)).body.defect;
    d = (await move(as.curator, d, "under_repair")).body.defect;
    d = (await move(as.curator, d, "awaiting_retest", { repairedBy: fx.crew.curator.id })).body.defect;
    const r = await move(as.curator, d, "closed");
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe("same_person");
  });

  it("deferring needs a reason (400) and keeps it", async () => {
    const d = (await raise(as.curator)).body.defect;
    const r = await move(as.curator, d, "deferred");
    expect(r.status).toBe(400);
    expect(r.body.error.fields.reason).toBeTruthy();
    const ok = await move(as.curator, d, "deferred", { reason: "Wait until the board has dried out" });
    expect(ok.body.defect).toMatchObject({ status: "deferred", statusReason: "Wait until the board has dried out" });
  });

  it("a volunteer cannot move a defect someone else raised; a viewer cannot move any", async () => {
    const d = (await raise(as.curator)).body.defect;
    expect((await move(as.volunteer, d, "under_repair")).status).toBe(403);
    expect((await move(as.viewer, d, "scheduled")).status).toBe(403);
  });

  it("only the curator assigns", async () => {
    const d = (await raise(as.volunteer)).body.defect;
    expect(
      (await as.volunteer.post(url(`/${d.id}/assignee`), { assigneeId: fx.crew.volunteer.id, version: d.version }))
        .status,
    ).toBe(403);
    const r = await as.curator.post(url(`/${d.id}/assignee`), { assigneeId: fx.crew.volunteer.id, version: d.version });
    expect(r.body.defect.assigneeId).toBe(fx.crew.volunteer.id);
    const outsider = await as.curator.post(url(`/${d.id}/assignee`), {
      assigneeId: fx.crew.outsider.id,
      version: r.body.defect.version,
    });
    expect(outsider.status).toBe(400);
  });

  it.each(["viewer", "photographer", "scrounger"] as const)(
    "a defect cannot be assigned to a %s (422 with the reason), alone, when raised or in bulk; nothing changes",
    async (role) => {
      const d = (await raise(as.curator)).body.defect;
      const r = await as.curator.post(url(`/${d.id}/assignee`), { assigneeId: fx.crew[role].id, version: d.version });
      expect(r.status).toBe(422);
      expect(r.body.error).toMatchObject({
        code: "not_a_repairer",
        message: expect.stringContaining(`is a ${role} on this site`),
        fields: { assigneeId: expect.any(String) },
      });
      expect((await as.curator.get(url(`/${d.id}`))).body.defect).toMatchObject({
        assigneeId: null,
        version: d.version,
      });
      const raised = await raise(as.curator, { title: `Assigned to a ${role}`, assigneeId: fx.crew[role].id });
      expect(raised.status).toBe(422);
      expect((await as.curator.get(url(`?q=${encodeURIComponent(`Assigned to a ${role}`)}`))).body.total).toBe(0);
      const bulk = await as.curator.post(url("/bulk"), {
        ids: [d.id],
        action: { type: "assign", assigneeId: fx.crew[role].id },
      });
      expect(bulk.status).toBe(409);
      expect(bulk.body.error.fields[d.id]).toMatch(/does repair work/);
    },
  );

  it("the repair is recorded as done only by someone whose role does repair work (422 with the reason; 400 off the crew)", async () => {
    let d = (await raise(as.curator)).body.defect;
    d = (await move(as.curator, d, "under_repair")).body.defect;
    for (const role of ["viewer", "photographer", "scrounger"] as const) {
      const r = await move(as.curator, d, "awaiting_retest", { repairedBy: fx.crew[role].id });
      expect(r.status).toBe(422);
      expect(r.body.error).toMatchObject({
        code: "not_a_repairer",
        message: expect.stringContaining(`is a ${role} on this site`),
        fields: { repairedBy: expect.any(String) },
      });
    }
    const outsider = await move(as.curator, d, "awaiting_retest", { repairedBy: fx.crew.outsider.id });
    expect(outsider.status).toBe(400);
    expect(outsider.body.error.fields.repairedBy).toBeTruthy();
    // Nothing moved, no history written.
    const still = (await as.curator.get(url(`/${d.id}`))).body;
    expect(still.defect).toMatchObject({ status: "under_repair", repairedBy: null, version: d.version });
    expect(still.history.map((h: { toStatus: string }) => h.toStatus)).toEqual(["under_repair", "raised"]);
    const ok = await move(as.curator, d, "awaiting_retest", { repairedBy: fx.crew.volunteer.id });
    expect(ok.status).toBe(200);
    expect(ok.body.defect).toMatchObject({ status: "awaiting_retest", repairedBy: fx.crew.volunteer.id });
  });

  it("the options list every member with their role, so the picker can offer only those who do repairs", async () => {
    const crew = (await as.curator.get(url("/options"))).body.crew as Array<{ id: string; role: string }>;
    expect(crew.find((c) => c.id === fx.crew.viewer.id)?.role).toBe("viewer");
    expect(crew.find((c) => c.id === fx.crew.volunteer.id)?.role).toBe("volunteer");
  });
});

describe("pins", () => {
  it("the curator pins a defect with a reason and the pin is recorded with who and when", async () => {
    const a = (await raise(as.curator, { severity: "cosmetic" })).body.defect;
    const b = (await raise(as.curator, { severity: "disabling" })).body.defect;
    const r = await as.curator.put(url(`/${a.id}/pin`), {
      direction: "above",
      relativeTo: b.id,
      reason: "Same enclosure is open this week",
    });
    expect(r.status).toBe(200);
    expect(r.body.pins[0]).toMatchObject({
      direction: "above",
      relativeTo: b.id,
      relativeRef: b.ref,
      reason: "Same enclosure is open this week",
      pinnedByName: "Test curator",
      removedAt: null,
    });
    expect(r.body.defect.pinned).toBe("above");
    const un = await as.curator.call("DELETE", url(`/${a.id}/pin`), { reason: "Enclosure closed again" });
    expect(un.body.pins[0]).toMatchObject({ removedByName: "Test curator", removedReason: "Enclosure closed again" });
    expect(un.body.defect.pinned).toBeNull();
  });

  it("a volunteer cannot pin (403), and a pin without a reason is a 400", async () => {
    const a = (await raise(as.curator)).body.defect;
    const b = (await raise(as.curator)).body.defect;
    expect(
      (await as.volunteer.put(url(`/${a.id}/pin`), { direction: "below", relativeTo: b.id, reason: "Because" })).status,
    ).toBe(403);
    const r = await as.curator.put(url(`/${a.id}/pin`), { direction: "below", relativeTo: b.id, reason: "" });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.reason).toBeTruthy();
  });
});

describe("bulk actions", () => {
  it("the curator assigns and sets the due date of several defects at once", async () => {
    const ids = [];
    for (let i = 0; i < 3; i++) ids.push((await raise(as.curator)).body.defect.id);
    const r = await as.curator.post(url("/bulk"), {
      ids,
      action: { type: "assign", assigneeId: fx.crew.volunteer.id },
    });
    expect(r.body).toEqual({ updated: 3 });
    await as.curator.post(url("/bulk"), { ids, action: { type: "due", dueOn: "2027-01-15" } });
    const rows = await t.db.selectFrom("defects").select(["assigneeId", "dueOn"]).where("id", "in", ids).execute();
    expect(rows.every((x) => x.assigneeId === fx.crew.volunteer.id && x.dueOn === "2027-01-15")).toBe(true);
  });

  it("when one defect cannot take the change, nothing changes and the answer names it", async () => {
    const ok = (await raise(as.curator)).body.defect;
    const closedOne = (await raise(as.curator)).body.defect;
    await t.db.updateTable("defects").set({ status: "closed" }).where("id", "=", closedOne.id).execute();
    const r = await as.curator.post(url("/bulk"), {
      ids: [ok.id, closedOne.id],
      action: { type: "status", to: "scheduled" },
    });
    expect(r.status).toBe(409);
    expect(r.body.error.fields[closedOne.id]).toMatch(/cannot go from closed/);
    const still = await t.db.selectFrom("defects").select("status").where("id", "=", ok.id).executeTakeFirstOrThrow();
    expect(still.status).toBe("raised");
  });

  it("a volunteer cannot use bulk actions (403)", async () => {
    const d = (await raise(as.volunteer)).body.defect;
    expect((await as.volunteer.post(url("/bulk"), { ids: [d.id], action: { type: "due", dueOn: null } })).status).toBe(
      403,
    );
  });
});

describe("saved views", () => {
  it("each person keeps their own named views; names are unique per person", async () => {
    const r = await as.curator.post(url("/views"), {
      name: "Safety first",
      query: "flag=safety&sort=priority&dir=desc",
    });
    expect(r.status).toBe(201);
    expect((await as.curator.post(url("/views"), { name: "safety FIRST", query: "" })).status).toBe(409);
    expect((await as.viewer.post(url("/views"), { name: "Safety first", query: "status=raised" })).status).toBe(201);
    const mine = await as.curator.get(url("/views"));
    expect(mine.body.views.map((v: { name: string }) => v.name)).toEqual(["Safety first"]);
    expect(mine.body.views[0].query).toBe("flag=safety&sort=priority&dir=desc");
    const upd = await as.curator.put(url(`/views/${r.body.view.id}`), {
      name: "Safety first",
      query: "flag=safety&flag=blocking",
    });
    expect(upd.body.view.version).toBe(2);
    expect((await as.viewer.call("DELETE", url(`/views/${r.body.view.id}`))).status).toBe(404);
    expect((await as.curator.call("DELETE", url(`/views/${r.body.view.id}`))).status).toBe(204);
  });

  it("a view whose filters are not valid is refused with 400", async () => {
    expect((await as.curator.post(url("/views"), { name: "Bad", query: "severity=terrible" })).status).toBe(400);
  });
});

describe("partial edits", () => {
  it("a PATCH naming one field leaves the others as they were", async () => {
    const d = (
      await raise(as.curator, { effortHours: 4, costEstimate: 120, partsNeeded: "Arc chute", description: "Left pole" })
    ).body.defect;
    const r = await as.curator.patch(url(`/${d.id}`), { title: "Arc track, line side pole A", version: d.version });
    expect(r.body.defect).toMatchObject({
      effortHours: 4,
      costEstimate: 120,
      partsNeeded: "Arc chute",
      description: "Left pole",
    });
  });
});

import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { memoryMailer } from "../../server/mail/mailer";
import { BREAKER, makeBoard, makeComponent, makeDefect } from "./parts-fixtures";

// Status workflow and its effects: Tideline's own rules (server/parts/workflow.ts).
let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
const c: Record<string, Client> = {};
const mailer = memoryMailer();

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db, mailer });
  fx = await makeCrew(t.db);
  for (const role of ["curator", "volunteer", "photographer", "scrounger", "viewer", "admin", "outsider"] as const) {
    c[role] = server.client();
    await c[role].signIn(fx.crew[role].email);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const url = (p = "") => `/api/sites/${fx.siteId}/parts${p}`;

async function freshLine(designation: string, withDefect: false | "raised" | "under_repair" = false) {
  const board = await makeBoard(t.db, fx.siteId, `Board ${designation}`);
  const comp = await makeComponent(t.db, fx.siteId, board.id, designation, {
    ...BREAKER,
    model: `M-${designation}`,
    disposition: "replace",
  });
  const defect = withDefect
    ? await makeDefect(t.db, fx.siteId, board.id, comp, { partsNeeded: "", status: withDefect })
    : null;
  const lines = (await c.scrounger.get(url("?status=all"))).body.lines as any[];
  const line = lines.find((l) => l.model === `M-${designation}`);
  return { board, comp, defect, line };
}

describe("status workflow", () => {
  it("recording a lead moves a wanted line to lead found", async () => {
    const { line } = await freshLine("10-1");
    const r = await c.scrounger.post(url(`/${line.id}/leads`), {
      sourceKind: "donor",
      source: "Laid-up sister tender (fictional)",
      contact: "yard office",
      askingPrice: 120,
    });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    const d = await c.viewer.get(url(`/${line.id}`));
    expect(d.body.line.status).toBe("lead_found");
    expect(d.body.leads).toEqual([
      expect.objectContaining({ source: "Laid-up sister tender (fictional)", askingPrice: 120, status: "open" }),
    ]);
    expect(d.body.history.map((h: any) => h.action)).toEqual(
      expect.arrayContaining(["lead_added", "status", "created"]),
    );
  });

  it("moving to acquired without a cost and date answers 400; with them it records the purchase and secures the lead", async () => {
    const { line } = await freshLine("10-2");
    const lead = (await c.scrounger.post(url(`/${line.id}/leads`), { source: "Harbour salvage yard" })).body.lead;
    const v = (await c.scrounger.get(url(`/${line.id}`))).body.line.version;
    const bad = await c.scrounger.post(url(`/${line.id}/status`), { to: "acquired", version: v });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty("acquisition.cost");
    const ok = await c.scrounger.post(url(`/${line.id}/status`), {
      to: "acquired",
      version: v,
      acquisition: { cost: 95.5, acquiredOn: "2026-11-02", leadId: lead.id },
    });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body.line).toMatchObject({ status: "acquired", spent: 95.5 });
    const d = await c.scrounger.get(url(`/${line.id}`));
    expect(d.body.acquisitions).toEqual([
      expect.objectContaining({ cost: 95.5, acquiredOn: "2026-11-02", leadId: lead.id }),
    ]);
    expect(d.body.leads[0].status).toBe("secured");
  });

  async function walk(client: Client, line: { id: string; version: number }, heritageAfter = "period") {
    let v = line.version;
    for (const body of [
      { to: "acquired", acquisition: { cost: 60, acquiredOn: "2026-11-03" } },
      { to: "received", note: "Contacts dressed, insulation fine" },
      { to: "fitted", heritageAfter },
    ]) {
      const r = await client.post(url(`/${line.id}/status`), { ...body, version: v });
      expect(r.status, JSON.stringify(r.body)).toBe(200);
      v = r.body.line.version;
    }
  }
  const defectRow = (id: string) =>
    t.db
      .selectFrom("defects")
      .select(["status", "partsState", "statusReason"])
      .where("id", "=", id)
      .executeTakeFirstOrThrow();
  const statusChanges = (id: string) =>
    t.db
      .selectFrom("defectStatusChanges")
      .select(["fromStatus", "toStatus", "reason", "actorId"])
      .where("defectId", "=", id)
      .orderBy("id")
      .execute();

  it("received puts the component at 'ready to refit'; fitted refits it and sets its heritage, through the inventory's custody move", async () => {
    const { line, comp } = await freshLine("10-3");
    await walk(c.curator, line);
    const comp1 = await t.db
      .selectFrom("components")
      .selectAll()
      .where("id", "=", comp.componentId)
      .executeTakeFirstOrThrow();
    expect(comp1).toMatchObject({ custody: "refitted", heritage: "period" });
    // The custody chain judged both moves: what they skipped is on record, released by the parts workflow.
    const moves = await t.db
      .selectFrom("custodyMoves")
      .select(["fromState", "toState", "releasedRules", "releaseReason"])
      .where("componentId", "=", comp.componentId)
      .orderBy("movedAt")
      .execute();
    expect(moves).toEqual([
      {
        fromState: "in_place",
        toState: "ready_to_refit",
        releasedRules: ["off_chain"],
        releaseReason: "The replacement part from the wanted list was received.",
      },
      {
        fromState: "ready_to_refit",
        toState: "refitted",
        releasedRules: ["reading_required"],
        releaseReason: "The part from the wanted list was fitted.",
      },
    ]);
    const audit = await t.db
      .selectFrom("auditLog")
      .select(["entityType", "action"])
      .where("entityId", "=", comp.componentId)
      .execute();
    expect(audit.filter((a) => a.action === "custody")).toHaveLength(2);
  });

  it("fitting the part for a defect under repair moves it to awaiting re-test through the defect workflow: history row, audit, the curator's notice", async () => {
    const { line, defect } = await freshLine("10-3b", "under_repair");
    // The volunteer is doing the repair; the instance admin records the part (so the curator is not the actor).
    await t.db.updateTable("defects").set({ assigneeId: fx.crew.volunteer.id }).where("id", "=", defect!.id).execute();
    const before = mailer.sent.length;
    await walk(c.admin, line);
    expect(await defectRow(defect!.id)).toMatchObject({
      status: "awaiting_retest",
      partsState: "in_hand",
      statusReason: "Part from the wanted list fitted",
    });
    expect(await statusChanges(defect!.id)).toEqual([
      {
        fromStatus: "under_repair",
        toStatus: "awaiting_retest",
        reason: "Part from the wanted list fitted",
        actorId: fx.crew.admin.id,
      },
    ]);
    const audit = await t.db.selectFrom("auditLog").select(["action"]).where("entityId", "=", defect!.id).execute();
    expect(audit.map((a) => a.action)).toEqual(expect.arrayContaining(["update", "status"]));
    // transition() asked for the "awaiting verification" notice; the route sends it after the commit.
    await server.jobsIdle();
    await expect
      .poll(
        () =>
          mailer.sent
            .slice(before)
            .some((m) => m.to === fx.crew.curator.email && m.subject.includes("Waiting for your check")),
        { timeout: 15_000 },
      )
      .toBe(true);
  });

  it("fitting the part for a defect only raised (the workflow refuses raised → awaiting re-test) leaves its status and records the parts in hand", async () => {
    const { line, defect } = await freshLine("10-3c", "raised");
    await walk(c.curator, line);
    expect(await defectRow(defect!.id)).toMatchObject({ status: "raised", partsState: "in_hand" });
    expect(await statusChanges(defect!.id)).toEqual([]);
  });

  it("a scrounger fitting the part cannot move the defect (not theirs to move): it stays under repair, parts in hand", async () => {
    const { line, defect } = await freshLine("10-3d", "under_repair");
    await walk(c.scrounger, line, "unchanged");
    expect(await defectRow(defect!.id)).toMatchObject({ status: "under_repair", partsState: "in_hand" });
    expect(await statusChanges(defect!.id)).toEqual([]);
  });

  it("fitting with heritage 'unchanged' keeps the component's heritage", async () => {
    const { line, comp } = await freshLine("10-4");
    let v = line.version;
    for (const body of [
      { to: "acquired", acquisition: { cost: 1, acquiredOn: "2026-11-04" } },
      { to: "received" },
      { to: "fitted", heritageAfter: "unchanged" },
    ]) {
      const r = await c.scrounger.post(url(`/${line.id}/status`), { ...body, version: v });
      expect(r.status).toBe(200);
      v = r.body.line.version;
    }
    const row = await t.db
      .selectFrom("components")
      .select(["heritage", "custody"])
      .where("id", "=", comp.componentId)
      .executeTakeFirstOrThrow();
    expect(row).toEqual({ heritage: "original", custody: "refitted" });
  });

  it("fitting without saying what the part makes of the component: a whole component becomes a period replacement, so it no longer counts as original fabric", async () => {
    const { line, comp } = await freshLine("10-9");
    const retained = async () =>
      (await c.viewer.get(`/api/sites/${fx.siteId}/overview`)).body.originalRetainedPercent as number;
    const before = await retained();
    let v = line.version;
    for (const body of [
      { to: "acquired", acquisition: { cost: 1, acquiredOn: "2026-11-04" } },
      { to: "received" },
      { to: "fitted" },
    ]) {
      const r = await c.scrounger.post(url(`/${line.id}/status`), { ...body, version: v });
      expect(r.status, JSON.stringify(r.body)).toBe(200);
      v = r.body.line.version;
    }
    const row = await t.db
      .selectFrom("components")
      .select(["heritage", "custody"])
      .where("id", "=", comp.componentId)
      .executeTakeFirstOrThrow();
    expect(row).toEqual({ heritage: "period", custody: "refitted" });
    // The original-fabric figure follows: one fewer original component on the site.
    expect(await retained()).toBeLessThan(before);
  });

  it("a move the workflow does not allow answers 409 with the line as it is; so does a stale version", async () => {
    const { line } = await freshLine("10-5");
    const skip = await c.scrounger.post(url(`/${line.id}/status`), {
      to: "fitted",
      heritageAfter: "modern",
      version: line.version,
    });
    expect(skip.status).toBe(409);
    expect(skip.body.error.current).toMatchObject({ id: line.id, status: "wanted" });
    const stale = await c.scrounger.post(url(`/${line.id}/status`), {
      to: "cancelled",
      reason: "x",
      version: line.version + 5,
    });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current.version).toBe(line.version);
  });

  it("cancelling needs a reason, and a cancelled line stays cancelled while its component still wants a part", async () => {
    const { line } = await freshLine("10-6");
    const none = await c.scrounger.post(url(`/${line.id}/status`), {
      to: "cancelled",
      reason: "",
      version: line.version,
    });
    expect(none.status).toBe(400);
    const ok = await c.scrounger.post(url(`/${line.id}/status`), {
      to: "cancelled",
      reason: "Rebuilding the original instead",
      version: line.version,
    });
    expect(ok.status).toBe(200);
    const lines = (await c.scrounger.get(url("?status=all"))).body.lines as any[];
    expect(lines.filter((l) => l.model === "M-10-6")).toEqual([
      expect.objectContaining({ status: "cancelled", cancelReason: "Rebuilding the original instead" }),
    ]);
  });
});

describe("edits and budget", () => {
  it("the curator sets the heritage rule; the scrounger may not (403)", async () => {
    const { line } = await freshLine("11-1");
    const no = await c.scrounger.put(url(`/${line.id}/heritage-rule`), {
      heritageRule: "modern_ok",
      version: line.version,
    });
    expect(no.status).toBe(403);
    const yes = await c.curator.put(url(`/${line.id}/heritage-rule`), {
      heritageRule: "modern_ok",
      version: line.version,
    });
    expect(yes.status).toBe(200);
    expect(yes.body.line.heritageRule).toBe("modern_ok");
  });

  it("an edit with a stale version gets 409 with the current line, never overwrites", async () => {
    const { line } = await freshLine("11-2");
    const first = await c.scrounger.patch(url(`/${line.id}`), {
      version: line.version,
      notes: "ask the trust's archivist",
      estimatedUnitCost: 150,
    });
    expect(first.status).toBe(200);
    const second = await c.curator.patch(url(`/${line.id}`), { version: line.version, notes: "overwrite?" });
    expect(second.status).toBe(409);
    expect(second.body.error.current.notes).toBe("ask the trust's archivist");
  });

  it("the budget shows estimated (unit cost × qty) and spent per board and in total", async () => {
    const { line, board } = await freshLine("11-3");
    const e = await c.scrounger.patch(url(`/${line.id}`), { version: line.version, estimatedUnitCost: 200 });
    expect(e.status, JSON.stringify(e.body)).toBe(200);
    const a = await c.scrounger.post(url(`/${line.id}/status`), {
      to: "acquired",
      version: e.body.line.version,
      acquisition: { cost: 175, acquiredOn: "2026-11-05" },
    });
    expect(a.status, JSON.stringify(a.body)).toBe(200);
    const body = (await c.viewer.get(url())).body;
    const row = body.budget.rows.find((r: any) => r.boardId === board.id);
    expect(row).toMatchObject({ boardName: `Board 11-3`, estimated: 200, spent: 175 });
    const sum = body.budget.rows.reduce((s: number, r: any) => s + r.spent, 0);
    expect(body.budget.total.spent).toBeCloseTo(sum, 2);
  });
});

describe("role checks", () => {
  const line = { kind: "fuse", qty: 4, need: "spare cartridges", voltageRating: 500 };
  it.each(["volunteer", "photographer", "viewer"] as const)(
    "when a %s adds a line or a lead, it gets 403; reading is allowed",
    async (role) => {
      expect((await c[role].post(url(), line)).status).toBe(403);
      expect((await c[role].get(url())).status).toBe(200);
      const { line: l } = await freshLine(`12-${role}`);
      expect((await c[role].post(url(`/${l.id}/leads`), { source: "x" })).status).toBe(403);
      expect(
        (await c[role].post(url(`/${l.id}/status`), { to: "cancelled", reason: "x", version: l.version })).status,
      ).toBe(403);
    },
  );
  it.each(["scrounger", "curator", "admin"] as const)("a %s adds a line by hand", async (role) => {
    const r = await c[role].post(url(), line);
    expect(r.status).toBe(201);
    expect(r.body.line).toMatchObject({ qty: 4, origin: "manual", need: "spare cartridges" });
  });
  it("a member of another site gets 404; a signed-out caller 401", async () => {
    expect((await c.outsider.get(url())).status).toBe(404);
    expect((await server.client().get(url())).status).toBe(401);
  });
  it("a scrounger may not set a heritage rule when adding a line (403)", async () => {
    expect((await c.scrounger.post(url(), { ...line, heritageRule: "modern_ok" })).status).toBe(403);
  });
  it("bad input gets a 400 with fields, never a 500", async () => {
    const r = await c.scrounger.post(url(), { kind: "toaster", qty: 0, ratingAmps: -1 });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)).toEqual(expect.arrayContaining(["kind", "qty", "ratingAmps"]));
    expect((await c.scrounger.get(url("/not-a-uuid"))).status).toBe(400);
    expect((await c.scrounger.get(url("?status=lost"))).status).toBe(400);
    expect((await c.scrounger.get(url("/00000000-0000-4000-8000-000000000000"))).status).toBe(404);
  });
});

describe("leads", () => {
  it("editing one field of a lead leaves the others as they were; a stale version gets 409", async () => {
    const { line } = await freshLine("13-1");
    const lead = (
      await c.scrounger.post(url(`/${line.id}/leads`), {
        sourceKind: "collector",
        source: "A collector of marine switchgear",
        contact: "by letter",
        askingPrice: 300,
      })
    ).body.lead;
    const r = await c.scrounger.patch(url(`/leads/${lead.id}`), { version: lead.version, status: "chasing" });
    expect(r.status).toBe(200);
    const d = (await c.scrounger.get(url(`/${line.id}`))).body;
    expect(d.leads[0]).toMatchObject({
      status: "chasing",
      contact: "by letter",
      askingPrice: 300,
      sourceKind: "collector",
    });
    expect((await c.curator.patch(url(`/leads/${lead.id}`), { version: lead.version, status: "dead" })).status).toBe(
      409,
    );
  });
});

import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { FakeSmtp } from "../../server/mail/fake-smtp";
import { smtpMailer, type MailDeps } from "../../server/mail/mailer";
import { notifyAwaitingVerification, notifyDefectAssigned } from "../../server/notifications/service";
import { sendWeeklySummaries } from "../../server/notifications/weekly";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew, makeUser } from "../helpers/fixtures";
import type { Client, TestServer } from "../helpers/http";
import { makeBoard, makeDefect, startMailTestServer } from "../helpers/mail";

let t: TestDb;
let env: Awaited<ReturnType<typeof startMailTestServer>>;
let server: TestServer;
let smtp: FakeSmtp;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let deps: MailDeps;
let board: Awaited<ReturnType<typeof makeBoard>>;
let secondCurator: { id: string; email: string };

beforeAll(async () => {
  t = await createTestDb();
  env = await startMailTestServer(t.db);
  ({ server, smtp } = env);
  fx = await makeCrew(t.db);
  secondCurator = await makeUser(t.db, { siteId: fx.siteId, role: "curator", name: "Second curator" });
  board = await makeBoard(t.db, fx.siteId, "Engine-room board");
  deps = { db: t.db, mailer: smtpMailer({ url: smtp.url }), publicUrl: "http://tideline.example" };
});
afterAll(async () => {
  deps.mailer.close();
  await env.close();
  await t.drop();
});

async function signedIn(email: string): Promise<Client> {
  const c = server.client();
  await c.signIn(email);
  return c;
}
const switchOff = async (email: string, key: string) => {
  const r = await (await signedIn(email)).put(`/api/account/notifications/${key}`, { enabled: false });
  expect(r.status).toBe(200);
};
const switchOn = async (email: string, key: string) =>
  (await signedIn(email)).put(`/api/account/notifications/${key}`, { enabled: true });
const mailFor = (email: string) => smtp.mailbox.list().filter((m) => m.to.includes(email));
/** As an instance admin's suspension leaves the account (server/auth/suspension.ts). */
const suspended = (userId: string) =>
  t.db
    .updateTable("users")
    .set({ suspendedAt: new Date(), suspendedReason: "Left the crew" })
    .where("id", "=", userId)
    .execute();

describe("notification switches", () => {
  it("are all on at first, and a switch turned off stays off", async () => {
    const c = await signedIn(fx.crew.curator.email);
    expect((await c.get("/api/account/notifications")).body.prefs).toEqual([
      { key: "defect_assigned", enabled: true },
      { key: "awaiting_verification", enabled: true },
      { key: "weekly_summary", enabled: true },
      { key: "watch_overdue", enabled: true },
    ]);
    await c.put("/api/account/notifications/weekly_summary", { enabled: false });
    const after = (await c.get("/api/account/notifications")).body.prefs;
    expect(after.find((p: { key: string }) => p.key === "weekly_summary").enabled).toBe(false);
    expect(after.find((p: { key: string }) => p.key === "defect_assigned").enabled).toBe(true);
    await c.put("/api/account/notifications/weekly_summary", { enabled: true });
  });

  // A person is offered only the e-mails one of their roles receives (NOTIFICATION_AUDIENCE).
  it.each([
    ["viewer", []],
    ["photographer", ["defect_assigned"]],
    ["scrounger", ["defect_assigned"]],
    ["volunteer", ["defect_assigned", "watch_overdue"]],
  ] as const)("a %s is offered %j", async (role, keys) => {
    const c = await signedIn(fx.crew[role].email);
    const r = await c.get("/api/account/notifications");
    expect(r.status).toBe(200);
    expect(r.body.prefs.map((p: { key: string }) => p.key)).toEqual(keys);
  });

  it("a switch the person's roles never receive is a 422 that changes nothing", async () => {
    const c = await signedIn(fx.crew.viewer.email);
    const r = await c.put("/api/account/notifications/weekly_summary", { enabled: false });
    expect(r.status).toBe(422);
    expect(r.body.error.code).toBe("not_received");
    const rows = await t.db
      .selectFrom("notificationPrefs")
      .selectAll()
      .where("userId", "=", fx.crew.viewer.id)
      .execute();
    expect(rows).toEqual([]);
  });

  it("someone with two roles on two sites is offered what either receives", async () => {
    const other = await t.db
      .insertInto("sites")
      .values({ name: "Second hulk", kind: "vessel", location: "", description: "" })
      .returning("id")
      .executeTakeFirstOrThrow();
    await t.db
      .insertInto("memberships")
      .values({ siteId: other.id, userId: fx.crew.viewer.id, role: "curator" })
      .execute();
    const c = await signedIn(fx.crew.viewer.email);
    expect((await c.get("/api/account/notifications")).body.prefs).toHaveLength(4);
    await t.db.deleteFrom("memberships").where("siteId", "=", other.id).execute();
  });

  it("need a session (401); an unknown switch or a non-boolean is a 400", async () => {
    expect((await server.client().get("/api/account/notifications")).status).toBe(401);
    const c = await signedIn(fx.crew.viewer.email);
    expect((await c.put("/api/account/notifications/carrier_pigeon", { enabled: false })).status).toBe(400);
    expect((await c.put("/api/account/notifications/weekly_summary", { enabled: "no" })).status).toBe(400);
  });
});

describe("a defect assigned to you", () => {
  it("mails the assignee with the defect, its board and position, and a link", async () => {
    const d = await makeDefect(t.db, {
      siteId: fx.siteId,
      boardId: board.boardId,
      positionId: board.positionId,
      assigneeId: fx.crew.volunteer.id,
      blocksEnergisation: true,
    });
    const r = await notifyDefectAssigned(deps, { defectId: d.id, actorId: fx.crew.curator.id });
    expect(r.sent).toEqual([fx.crew.volunteer.id]);
    const msg = await smtp.mailbox.waitFor(
      (m) => m.to.includes(fx.crew.volunteer.email) && m.subject.startsWith("Assigned to you"),
    );
    expect(msg.text).toContain("Engine-room board, position 2-14");
    expect(msg.text).toContain("Blocks re-energisation");
    expect(msg.text).toContain(`http://tideline.example/sites/${fx.siteId}/defects/${d.id}`);
    expect(msg.html).toContain("Tracking on the line-side terminals");
  });

  it("is not sent when the assignee switched it off, nor when they assigned it to themselves", async () => {
    await switchOff(fx.crew.scrounger.email, "defect_assigned");
    const d = await makeDefect(t.db, { siteId: fx.siteId, boardId: board.boardId, assigneeId: fx.crew.scrounger.id });
    smtp.mailbox.clear();
    expect(await notifyDefectAssigned(deps, { defectId: d.id, actorId: fx.crew.curator.id })).toMatchObject({
      sent: [],
      skipped: [{ reason: "switched_off" }],
    });
    await switchOn(fx.crew.scrounger.email, "defect_assigned");
    expect(await notifyDefectAssigned(deps, { defectId: d.id, actorId: fx.crew.scrounger.id })).toMatchObject({
      sent: [],
      skipped: [{ reason: "is_actor" }],
    });
    expect(mailFor(fx.crew.scrounger.email)).toHaveLength(0);
  });

  it("is not sent to an assignee who has since left the crew", async () => {
    const gone = await makeUser(t.db, { name: "Former volunteer" });
    const d = await makeDefect(t.db, { siteId: fx.siteId, boardId: board.boardId, assigneeId: gone.id });
    expect(await notifyDefectAssigned(deps, { defectId: d.id, actorId: fx.crew.curator.id })).toEqual({
      sent: [],
      skipped: [{ userId: gone.id, reason: "not_on_crew" }],
      failed: [],
    });
    expect(mailFor(gone.email)).toHaveLength(0);
  });

  it("is not sent to an assignee whose account an instance admin has suspended", async () => {
    const away = await makeUser(t.db, { siteId: fx.siteId, role: "volunteer", name: "Suspended volunteer" });
    await suspended(away.id);
    const d = await makeDefect(t.db, { siteId: fx.siteId, boardId: board.boardId, assigneeId: away.id });
    expect(await notifyDefectAssigned(deps, { defectId: d.id, actorId: fx.crew.curator.id })).toEqual({
      sent: [],
      skipped: [{ userId: away.id, reason: "suspended" }],
      failed: [],
    });
    expect(mailFor(away.email)).toHaveLength(0);
  });

  it("does nothing for a defect with no assignee or that does not exist", async () => {
    const d = await makeDefect(t.db, { siteId: fx.siteId, boardId: board.boardId });
    expect(await notifyDefectAssigned(deps, { defectId: d.id, actorId: null })).toEqual({
      sent: [],
      skipped: [],
      failed: [],
    });
    expect(
      await notifyDefectAssigned(deps, { defectId: "00000000-0000-4000-8000-000000000000", actorId: null }),
    ).toEqual({ sent: [], skipped: [], failed: [] });
  });
});

describe("a repair awaiting verification", () => {
  it("mails the site's curators except the one who repaired it", async () => {
    const d = await makeDefect(t.db, {
      siteId: fx.siteId,
      boardId: board.boardId,
      status: "awaiting_retest",
      repairedBy: secondCurator.id,
    });
    smtp.mailbox.clear();
    const r = await notifyAwaitingVerification(deps, { defectId: d.id, actorId: secondCurator.id });
    expect(r.sent).toEqual([fx.crew.curator.id]);
    const msg = await smtp.mailbox.waitFor((m) => m.subject.startsWith("Waiting for your check"));
    expect(msg.to).toContain(fx.crew.curator.email);
    expect(mailFor(secondCurator.email)).toHaveLength(0);
    expect(mailFor(fx.crew.volunteer.email)).toHaveLength(0);
  });

  it("respects a curator's switch", async () => {
    await switchOff(fx.crew.curator.email, "awaiting_verification");
    const d = await makeDefect(t.db, {
      siteId: fx.siteId,
      boardId: board.boardId,
      status: "awaiting_retest",
      repairedBy: fx.crew.volunteer.id,
    });
    const r = await notifyAwaitingVerification(deps, { defectId: d.id, actorId: fx.crew.volunteer.id });
    expect(r.sent).toEqual([secondCurator.id]);
    expect(r.skipped).toEqual([{ userId: fx.crew.curator.id, reason: "switched_off" }]);
    await switchOn(fx.crew.curator.email, "awaiting_verification");
  });
});

describe("the weekly summary", () => {
  it("counts the last seven days for each curator who has it on", async () => {
    const site = fx.otherSiteId; // only the outsider curates it: a clean slate
    const b = await makeBoard(t.db, site, "Aft board");
    const now = new Date("2030-03-10T07:00:00Z");
    const daysAgo = (d: number) => new Date(now.getTime() - d * 86_400_000);
    await t.db
      .insertInto("inspections")
      .values([
        { siteId: site, componentId: b.componentId, positionId: b.positionId, inspectedAt: daysAgo(1) },
        { siteId: site, componentId: b.componentId, positionId: b.positionId, inspectedAt: daysAgo(2) },
        { siteId: site, componentId: b.componentId, positionId: b.positionId, inspectedAt: daysAgo(9) },
      ])
      .execute();
    await makeDefect(t.db, {
      siteId: site,
      boardId: b.boardId,
      positionId: b.positionId,
      title: "Seized operating handle",
      createdAt: daysAgo(3),
      blocksEnergisation: true,
    });
    await makeDefect(t.db, {
      siteId: site,
      boardId: b.boardId,
      positionId: b.positionId,
      title: "Missing arc chute",
      createdAt: daysAgo(20),
      status: "deferred",
      safetyCritical: true,
    });
    await makeDefect(t.db, {
      siteId: site,
      boardId: b.boardId,
      title: "Salt crust on bus",
      createdAt: daysAgo(30),
      status: "closed",
      closedAt: daysAgo(2),
      blocksEnergisation: true,
    });
    // Accepted as is with a reason: the return-to-service gate no longer counts it (server/return-to-service/
    // repository.ts), so the summary does not either.
    await makeDefect(t.db, {
      siteId: site,
      boardId: b.boardId,
      title: "Chipped phenolic barrier",
      createdAt: daysAgo(25),
      status: "accepted_as_is",
      blocksEnergisation: true,
    });
    const silent = await makeUser(t.db, { siteId: site, role: "curator" });
    await switchOff(silent.email, "weekly_summary");
    const away = await makeUser(t.db, { siteId: site, role: "curator" });
    await suspended(away.id);
    smtp.mailbox.clear();

    const r = await sendWeeklySummaries(deps, { now });
    expect(r).toMatchObject({ failed: 0, switchedOff: 1 });
    const msg = await smtp.mailbox.waitFor((m) => m.to.includes(fx.crew.outsider.email));
    // Counted by hand from the rows above ('common practice' arithmetic).
    expect(msg.text).toContain("Surveyed: 2 inspections logged on 1 position");
    expect(msg.text).toContain("Defects opened: 1");
    expect(msg.text).toContain("Defects closed: 1");
    expect(msg.text).toContain("block re-energisation or are safety-critical: 2");
    expect(msg.text).toContain("Seized operating handle — Aft board 2-14 (blocks re-energisation; raised)");
    expect(msg.text).toContain("Missing arc chute — Aft board 2-14 (safety-critical; deferred)");
    expect(msg.text).not.toMatch(/Salt crust on bus — .*\(blocks/);
    expect(msg.text).not.toContain("Chipped phenolic barrier");
    expect(msg.subject).toBe("Tideline weekly: Another crew's site, 2030-03-03 to 2030-03-10 — 2 blockers");
    expect(mailFor(away.email)).toHaveLength(0); // suspended: no e-mail goes to it
    expect(mailFor(silent.email)).toHaveLength(0);
    // Non-curators never get it.
    expect(mailFor(fx.crew.volunteer.email)).toHaveLength(0);
  });
});

/**
 * An account's standing, set by an instance admin. Suspended (a volunteer who has left, a phone lost while signed
 * in) and reinstated: its sessions end at once, it cannot sign in, a reset link or an invitation does not bring it
 * back, no e-mail goes to it, and everything it recorded keeps its name (server/auth/suspension.ts). Made an
 * instance admin and no longer one (server/auth/instance-admins.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { backgroundIdle } from "../../server/mail/background";
import type { FakeSmtp } from "../../server/mail/fake-smtp";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew, makeUser } from "../helpers/fixtures";
import { Client, TEST_PASSWORD, type TestServer } from "../helpers/http";
import { linkIn, startMailTestServer, tokenOf } from "../helpers/mail";

let t: TestDb;
let env: Awaited<ReturnType<typeof startMailTestServer>>;
let server: TestServer;
let smtp: FakeSmtp;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let admin: Client;
let n = 0;
const fresh = () => `suspension-${Date.now()}-${n++}@example.test`;

beforeAll(async () => {
  t = await createTestDb();
  env = await startMailTestServer(t.db);
  ({ server, smtp } = env);
  fx = await makeCrew(t.db);
  admin = server.client();
  await admin.signIn(fx.crew.admin.email);
});
afterAll(async () => {
  await backgroundIdle();
  await server.jobsIdle();
  await env.close();
  await t.drop();
});

const suspend = (userId: string, reason = "Left the crew in November", as = admin) =>
  as.post(`/api/admin/users/${userId}/suspension`, { reason });
const reinstate = (userId: string, as = admin) => as.del(`/api/admin/users/${userId}/suspension`);
const listed = async (userId: string) =>
  (await admin.get("/api/admin/users")).body.users.find((u: { id: string }) => u.id === userId);

describe("suspending an account", () => {
  it("ends its sessions at once, refuses its sign-in with a reason, and lists who suspended it, when and why", async () => {
    const u = await makeUser(t.db, { siteId: fx.siteId, role: "volunteer", name: "Tamsin Quayle", email: fresh() });
    const phone = server.client();
    await phone.signIn(u.email);
    expect((await phone.get(`/api/sites/${fx.siteId}`)).status).toBe(200);

    const r = await suspend(u.id);
    expect(r.status).toBe(200);
    expect(r.body.users.find((x: { id: string }) => x.id === u.id).suspended).toMatchObject({
      byName: "Test user", // the admin of makeCrew
      reason: "Left the crew in November",
    });
    expect(await t.db.selectFrom("sessions").select("id").where("userId", "=", u.id).execute()).toEqual([]);
    expect((await phone.get(`/api/sites/${fx.siteId}`)).status).toBe(401);
    expect((await phone.get("/api/session")).status).toBe(401);

    const again = await server.client().post("/api/auth/sign-in", { email: u.email, password: TEST_PASSWORD });
    expect(again.status).toBe(403);
    expect(again.body.error).toMatchObject({
      code: "account_suspended",
      message: "This account is suspended. Ask your instance's admin if you should have it back.",
    });
    // A wrong password learns nothing more than for any account.
    const wrong = await server.client().post("/api/auth/sign-in", { email: u.email, password: "not-the-password" });
    expect(wrong.status).toBe(401);

    const audit = await t.db
      .selectFrom("auditLog")
      .select(["action", "actorId", "after"])
      .where("entityId", "=", u.id)
      .where("action", "=", "suspended")
      .executeTakeFirstOrThrow();
    expect(audit.actorId).toBe(fx.crew.admin.id);
    expect(audit.after).toEqual({ reason: "Left the crew in November" });

    // The site's curator sees it on the crew list (still a member: the admin decides, the curator may remove).
    const curator = server.client();
    await curator.signIn(fx.crew.curator.email);
    const members = (await curator.get(`/api/sites/${fx.siteId}/members`)).body.members;
    expect(members.find((m: { userId: string }) => m.userId === u.id)).toMatchObject({ suspended: true });
    expect(members.find((m: { userId: string }) => m.userId === fx.crew.volunteer.id)).toMatchObject({
      suspended: false,
    });
  });

  it("a session that raced the suspension does not work either", async () => {
    const u = await makeUser(t.db, { siteId: fx.siteId, role: "viewer", email: fresh() });
    const phone = server.client();
    await phone.signIn(u.email);
    // As if the session were written just after the suspension ended the others.
    await t.db
      .updateTable("users")
      .set({ suspendedAt: new Date(), suspendedReason: "raced" })
      .where("id", "=", u.id)
      .execute();
    expect((await phone.get("/api/session")).status).toBe(401);
  });

  it("keeps the account's name on what it recorded, and reinstating it lets it sign in again", async () => {
    const u = await makeUser(t.db, { siteId: fx.siteId, role: "curator", name: "Bryher Tregothnan", email: fresh() });
    const curator = server.client();
    await curator.signIn(u.email);
    const board = await curator.post(`/api/sites/${fx.siteId}/boards`, {
      name: "Emergency switchboard",
      nominalVolts: 450,
    });
    expect(board.status, JSON.stringify(board.body)).toBe(201);
    expect((await suspend(u.id, "Away until spring")).status).toBe(200);

    const back = await reinstate(u.id);
    expect(back.status).toBe(200);
    expect(back.body.users.find((x: { id: string }) => x.id === u.id).suspended).toBeNull();
    const audit = await t.db
      .selectFrom("auditLog")
      .select(["action", "actorId", "entityType"])
      .where("entityId", "=", u.id)
      .orderBy("at")
      .execute();
    expect(audit.filter((a) => a.entityType === "user").map((a) => a.action)).toEqual([
      "signed_in",
      "suspended",
      "reinstated",
    ]);
    const signIn = await server.client().post("/api/auth/sign-in", { email: u.email, password: TEST_PASSWORD });
    expect(signIn.status).toBe(200);
    // Its board, made before the suspension, still names it in the history.
    const made = await t.db
      .selectFrom("auditLog")
      .select("actorId")
      .where("entityId", "=", board.body.id)
      .executeTakeFirstOrThrow();
    expect(made.actorId).toBe(u.id);
  });

  it("sends no reset link, and a link sent before does not set a password while it is suspended", async () => {
    const u = await makeUser(t.db, { siteId: fx.siteId, role: "volunteer", email: fresh() });
    expect((await server.client().post("/api/auth/password-reset", { email: u.email })).status).toBe(202);
    await backgroundIdle();
    await server.jobsIdle();
    const token = tokenOf(linkIn(await smtp.mailbox.waitFor((m) => m.to.includes(u.email)), server.base));
    smtp.mailbox.clear();

    expect((await suspend(u.id)).status).toBe(200);
    const r = await server.client().post("/api/auth/password-reset", { email: u.email });
    expect(r.status).toBe(202);
    await backgroundIdle();
    await server.jobsIdle();
    expect(smtp.mailbox.list().filter((m) => m.to.includes(u.email))).toEqual([]);

    const used = await server.client().post(`/api/auth/password-reset/${token}`, { password: "a-new-long-password" });
    expect(used.status).toBe(403);
    expect(used.body.error.code).toBe("account_suspended");
    expect((await server.client().get(`/api/auth/password-reset/${token}`)).status).toBe(403);
  });

  it("an invitation is not sent to it, and one sent before does not bring it onto a site", async () => {
    const curator = server.client();
    await curator.signIn(fx.crew.curator.email);
    const u = await makeUser(t.db, { email: fresh() });
    const inv = await curator.post(`/api/sites/${fx.siteId}/invitations`, { email: u.email, role: "volunteer" });
    expect(inv.status).toBe(201);
    const token = tokenOf(linkIn(await smtp.mailbox.waitFor((m) => m.to.includes(u.email)), server.base));

    expect((await suspend(u.id)).status).toBe(200);
    const accepted = await server.client().post(`/api/invitations/${token}/accept`, { password: TEST_PASSWORD });
    expect(accepted.status).toBe(403);
    expect(accepted.body.error.code).toBe("account_suspended");
    expect(await t.db.selectFrom("memberships").select("role").where("userId", "=", u.id).execute()).toEqual([]);

    const other = await makeUser(t.db, { email: fresh() });
    expect((await suspend(other.id)).status).toBe(200);
    const refused = await curator.post(`/api/sites/${fx.siteId}/invitations`, { email: other.email, role: "viewer" });
    expect(refused.status).toBe(409);
    expect(refused.body.error).toMatchObject({ code: "account_suspended", fields: { email: "Account suspended" } });
  });
  it("a stage whose qualified person is suspended is blocked from energising until another is named", async () => {
    const curator = server.client();
    await curator.signIn(fx.crew.curator.email);
    const qp = await makeUser(t.db, {
      siteId: fx.siteId,
      role: "volunteer",
      name: "Loveday Chenoweth",
      email: fresh(),
    });
    const q = await curator.put(`/api/sites/${fx.siteId}/return-to-service/qualified-persons/${qp.id}`, {
      qualification: "Marine electrician (fictional licence)",
      expiresOn: "2099-12-31",
      version: 0,
    });
    expect(q.status, JSON.stringify(q.body)).toBe(200);
    const board = (
      await curator.post(`/api/sites/${fx.siteId}/boards`, { name: "Steering gear panel", nominalVolts: 450 })
    ).body.id;
    const section = await curator.post(`/api/sites/${fx.siteId}/boards/${board}/sections`, { name: "Port side" });
    expect(section.status, JSON.stringify(section.body)).toBe(201);
    const stage = await curator.post(`/api/sites/${fx.siteId}/boards/${board}/return-to-service/stages`, {
      name: "Port steering motor",
      sectionIds: [section.body.id],
      supply: "temporary_fused",
      voltageStep: "full",
      stepVolts: 450,
      qualifiedPersonId: qp.id,
    });
    expect(stage.status, JSON.stringify(stage.body)).toBe(201);
    const codes = async () => {
      const v = (await curator.get(`/api/sites/${fx.siteId}/boards/${board}/return-to-service`)).body;
      return {
        blockers: v.stages[0].gate.blockers.map((b: { code: string }) => b.code),
        listed: v.qualifiedPersons.find((p: { userId: string }) => p.userId === qp.id),
      };
    };
    expect((await codes()).blockers).not.toContain("qualified_person_suspended");
    expect((await suspend(qp.id)).status).toBe(200);
    const after = await codes();
    expect(after.blockers).toContain("qualified_person_suspended");
    expect(after.listed).toMatchObject({ suspended: true, current: true });
    const crew = (await curator.get(`/api/sites/${fx.siteId}/return-to-service/qualified-persons`)).body.people;
    expect(crew.find((p: { userId: string }) => p.userId === qp.id)).toMatchObject({ suspended: true });
  });

  // No e-mail goes to it: tests/server/notifications.api.test.ts (assigned defects, the weekly summary) and
  // return-to-service.api.test.ts (overdue watch checks).
});

describe("what an admin may not do", () => {
  it("suspend their own account, or one already suspended (it says so), or reinstate one not suspended", async () => {
    const own = await suspend(fx.crew.admin.id);
    expect(own.status).toBe(409);
    expect(own.body.error.code).toBe("own_account");

    const u = await makeUser(t.db, { name: "Morwenna Pascoe", email: fresh() });
    expect((await suspend(u.id)).status).toBe(200);
    const twice = await suspend(u.id, "Another reason");
    expect(twice.status).toBe(409);
    expect(twice.body.error.message).toMatch(/^Morwenna Pascoe's account was suspended already/);
    expect((await listed(u.id)).suspended.reason).toBe("Left the crew in November");

    expect((await reinstate(u.id)).status).toBe(200);
    const notSuspended = await reinstate(u.id);
    expect(notSuspended.status).toBe(409);
    expect(notSuspended.body.error.code).toBe("already_reinstated");
  });

  it("another admin can suspend an admin; a curator or anyone signed out cannot suspend anyone", async () => {
    const other = await makeUser(t.db, { isAdmin: true, email: fresh() });
    expect((await suspend(other.id)).status).toBe(200);
    const curator = server.client();
    await curator.signIn(fx.crew.curator.email);
    expect((await suspend(fx.crew.volunteer.id, "x".repeat(10), curator)).status).toBe(403);
    expect((await suspend(fx.crew.volunteer.id, "x".repeat(10), server.client())).status).toBe(401);
    expect((await listed(fx.crew.volunteer.id)).suspended).toBeNull();
  });

  it("bad input is a 400 that says what is wrong, and changes nothing", async () => {
    const u = await makeUser(t.db, { email: fresh() });
    const short = await suspend(u.id, " x ");
    expect(short.status).toBe(400);
    expect(short.body.error.fields.reason).toBe("Say why, for the record (at least 3 characters)");
    expect((await admin.post(`/api/admin/users/${u.id}/suspension`, {})).status).toBe(400);
    expect((await admin.post(`/api/admin/users/${u.id}/suspension`, { reason: "Left", extra: 1 })).status).toBe(400);
    expect((await suspend("not-a-uuid")).status).toBe(400);
    expect((await suspend("00000000-0000-4000-8000-000000000000")).status).toBe(404);
    expect((await listed(u.id)).suspended).toBeNull();
  });
});

describe("making an account an instance admin, and taking it away (server/auth/instance-admins.ts)", () => {
  const setAdmin = (userId: string, isAdmin: unknown, as = admin) =>
    as.put(`/api/admin/users/${userId}/instance-admin`, { isAdmin });

  it("takes effect on the account's next request, is audited, and refuses a repeat or one's own standing", async () => {
    const u = await makeUser(t.db, { siteId: fx.siteId, role: "curator", name: "Kerensa Polglase", email: fresh() });
    const hers = server.client();
    await hers.signIn(u.email);
    expect((await hers.get("/api/admin/users")).status).toBe(403);

    const made = await setAdmin(u.id, true);
    expect(made.status).toBe(200);
    expect(made.body.users.find((x: { id: string }) => x.id === u.id).isAdmin).toBe(true);
    expect((await hers.get("/api/admin/users")).status).toBe(200);
    const again = await setAdmin(u.id, true);
    expect(again.status).toBe(409);
    expect(again.body.error.message).toBe(
      "Kerensa Polglase is an instance admin already: another admin made them one a moment ago.",
    );

    // Not her own standing: another admin takes it away.
    expect((await setAdmin(u.id, false, hers)).body.error.code).toBe("own_account");
    expect((await setAdmin(u.id, false)).status).toBe(200);
    expect((await hers.get("/api/admin/users")).status).toBe(403);
    // Still the site's curator.
    expect((await hers.get(`/api/sites/${fx.siteId}/members`)).status).toBe(200);
    const audit = await t.db
      .selectFrom("auditLog")
      .select(["action", "actorId"])
      .where("entityId", "=", u.id)
      .where("action", "in", ["admin_granted", "admin_removed"])
      .orderBy("at")
      .execute();
    expect(audit).toEqual([
      { action: "admin_granted", actorId: fx.crew.admin.id },
      { action: "admin_removed", actorId: fx.crew.admin.id },
    ]);
  });

  it("does not make a suspended account an instance admin (reinstate first), but takes the standing away", async () => {
    const u = await makeUser(t.db, { siteId: fx.siteId, role: "viewer", name: "Tamsin Rowe", email: fresh() });
    expect((await suspend(u.id)).status).toBe(200);
    const refused = await setAdmin(u.id, true);
    expect(refused.status).toBe(409);
    expect(refused.body.error).toMatchObject({
      code: "account_suspended",
      message: "Tamsin Rowe's account is suspended: reinstate it first, then make them an instance admin.",
    });
    expect((await listed(u.id)).isAdmin).toBe(false);

    const w = await makeUser(t.db, { siteId: fx.siteId, role: "viewer", email: fresh() });
    expect((await setAdmin(w.id, true)).status).toBe(200);
    expect((await suspend(w.id)).status).toBe(200);
    expect((await setAdmin(w.id, false)).status).toBe(200);
    expect((await listed(w.id)).isAdmin).toBe(false);
    expect((await reinstate(u.id)).status).toBe(200);
    expect((await setAdmin(u.id, true)).status).toBe(200);
  });

  it("a curator cannot, bad input is a 400 and an unknown account a 404", async () => {
    const curator = server.client();
    await curator.signIn(fx.crew.curator.email);
    expect((await setAdmin(fx.crew.curator.id, true, curator)).status).toBe(403);
    expect((await setAdmin(fx.crew.viewer.id, "yes")).status).toBe(400);
    expect((await admin.put(`/api/admin/users/${fx.crew.viewer.id}/instance-admin`, {})).status).toBe(400);
    expect((await setAdmin("00000000-0000-4000-8000-000000000000", true)).status).toBe(404);
    expect((await listed(fx.crew.viewer.id)).isAdmin).toBe(false);
  });
});

describe("signing out everywhere else (server/auth/other-sessions.ts)", () => {
  it("counts the places the account is signed in, ends all but this one, and says how many", async () => {
    const u = await makeUser(t.db, { siteId: fx.siteId, role: "volunteer", email: fresh() });
    const [here, phone, laptop] = [server.client(), server.client(), server.client()];
    for (const c of [here, phone, laptop]) await c.signIn(u.email);
    expect((await here.get("/api/account/sessions")).body).toEqual({ places: 3 });

    const r = await here.post("/api/account/sessions/sign-out-others");
    expect(r.status).toBe(200);
    expect(r.body).toEqual({ ended: 2, places: 1 });
    expect((await phone.get("/api/session")).status).toBe(401);
    expect((await laptop.get("/api/session")).status).toBe(401);
    expect((await here.get("/api/session")).status).toBe(200);
    expect((await here.post("/api/account/sessions/sign-out-others")).body).toEqual({ ended: 0, places: 1 });
    // Another account's sessions are not touched.
    expect((await admin.get("/api/session")).status).toBe(200);
    const audit = await t.db
      .selectFrom("auditLog")
      .select(["action", "after"])
      .where("entityId", "=", u.id)
      .where("action", "=", "signed_out_elsewhere")
      .orderBy("at")
      .execute();
    expect(audit.map((a) => a.after)).toEqual([{ ended: 2 }, { ended: 0 }]);
  });

  it("asks for a session", async () => {
    expect((await server.client().get("/api/account/sessions")).status).toBe(401);
    expect((await server.client().post("/api/account/sessions/sign-out-others")).status).toBe(401);
  });
});

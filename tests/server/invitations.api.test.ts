import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashToken } from "../../server/one-time-token";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew, makeUser } from "../helpers/fixtures";
import { Client, TEST_PASSWORD, type TestServer } from "../helpers/http";
import { linkIn, startMailTestServer, tokenOf } from "../helpers/mail";
import type { FakeSmtp } from "../../server/mail/fake-smtp";

let t: TestDb;
let env: Awaited<ReturnType<typeof startMailTestServer>>;
let server: TestServer;
let smtp: FakeSmtp;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
let n = 0;
const fresh = () => `invitee-${Date.now()}-${n++}@example.test`;

beforeAll(async () => {
  t = await createTestDb();
  env = await startMailTestServer(t.db);
  ({ server, smtp } = env);
  fx = await makeCrew(t.db);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
});
afterAll(async () => {
  await env.close();
  await t.drop();
});

/** Invites `email` and returns the token from the e-mail the fake server received. */
async function invite(email: string, role = "volunteer") {
  const r = await curator.post(`/api/sites/${fx.siteId}/invitations`, { email, role });
  expect(r.status).toBe(201);
  const msg = await smtp.mailbox.waitFor((m) => m.to.includes(email));
  return { r, msg, token: tokenOf(linkIn(msg, server.base)) };
}

describe("inviting someone new", () => {
  it("sends one e-mail with HTML and text parts, a named sender and a single-use link; the token is stored only as its SHA-256", async () => {
    const email = fresh();
    const { r, msg, token } = await invite(email, "photographer");
    expect(r.body.outcome).toBe("invited");
    // Queued in the outbox with the invitation; the job delivers it and the list then says sent.
    expect(r.body.invitation).toMatchObject({ email, role: "photographer", sendStatus: "pending", expired: false });
    await server.jobsIdle();
    const listed = (await curator.get(`/api/sites/${fx.siteId}/invitations`)).body.invitations.find(
      (i: { email: string }) => i.email === email,
    );
    expect(listed).toMatchObject({ sendStatus: "sent", sendError: null });
    expect(smtp.mailbox.list().filter((m) => m.to.includes(email))).toHaveLength(1);
    expect(msg.from).toBe('"Test curator via Tideline" <no-reply@tideline.invalid>');
    expect(msg.subject).toContain("Test hulk");
    expect(msg.html).toContain(`${server.base}/invite/${token}`);
    expect(msg.text).toContain(`${server.base}/invite/${token}`);
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/); // 32 random bytes, base64url
    const row = await t.db.selectFrom("invitations").selectAll().where("email", "=", email).executeTakeFirstOrThrow();
    expect(row.tokenHash).toBe(hashToken(token));
    expect(row.tokenHash).not.toContain(token);
    const days = (row.expiresAt.getTime() - Date.now()) / 86_400_000;
    expect(days).toBeGreaterThan(6.99);
    expect(days).toBeLessThanOrEqual(7);
  });

  it("the invitee sees site and role, sets a name and password, is signed in and on the crew", async () => {
    const email = fresh();
    const { token } = await invite(email, "scrounger");
    const invitee = server.client();
    const preview = await invitee.get(`/api/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(preview.body.invitation).toMatchObject({
      siteName: "Test hulk",
      role: "scrounger",
      email,
      accountExists: false,
      invitedByName: "Test curator",
    });
    const accepted = await invitee.post(`/api/invitations/${token}/accept`, {
      name: "Nell Ashgrove",
      password: "a-long-enough-secret",
    });
    expect(accepted.status).toBe(200);
    expect(accepted.body).toEqual({ siteId: fx.siteId });
    const session = await invitee.get("/api/session");
    expect(session.body.user).toMatchObject({ email, name: "Nell Ashgrove" });
    expect(session.body.memberships).toEqual([{ siteId: fx.siteId, siteName: "Test hulk", role: "scrounger" }]);
    const again = server.client();
    await again.signIn(email, "a-long-enough-secret");
    const pending = await curator.get(`/api/sites/${fx.siteId}/invitations`);
    expect(pending.body.invitations.map((i: { email: string }) => i.email)).not.toContain(email);
  });

  it("a used link is refused (410) when looked at and when accepted again", async () => {
    const email = fresh();
    const { token } = await invite(email);
    expect(
      (
        await server
          .client()
          .post(`/api/invitations/${token}/accept`, { name: "Once", password: "a-long-enough-secret" })
      ).status,
    ).toBe(200);
    const look = await server.client().get(`/api/invitations/${token}`);
    expect(look.status).toBe(410);
    expect(look.body.error.code).toBe("invitation_used");
    const twice = await server
      .client()
      .post(`/api/invitations/${token}/accept`, { name: "Twice", password: "another-long-secret" });
    expect(twice.status).toBe(410);
    expect(await t.db.selectFrom("users").select("name").where("email", "=", email).execute()).toEqual([
      { name: "Once" },
    ]);
  });

  it("two acceptances of one link at the same moment make one account", async () => {
    const email = fresh();
    const { token } = await invite(email);
    const [a, b] = await Promise.all([
      server.client().post(`/api/invitations/${token}/accept`, { name: "A", password: "a-long-enough-secret" }),
      server.client().post(`/api/invitations/${token}/accept`, { name: "B", password: "a-long-enough-secret" }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 410]);
    expect(await t.db.selectFrom("users").select("id").where("email", "=", email).execute()).toHaveLength(1);
  });

  it("an expired link is refused with 410 invitation_expired", async () => {
    const email = fresh();
    const { token } = await invite(email);
    await t.db
      .updateTable("invitations")
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where("email", "=", email)
      .execute();
    const r = await server
      .client()
      .post(`/api/invitations/${token}/accept`, { name: "Late", password: "a-long-enough-secret" });
    expect(r.status).toBe(410);
    expect(r.body.error.code).toBe("invitation_expired");
    const listed = await curator.get(`/api/sites/${fx.siteId}/invitations`);
    expect(listed.body.invitations.find((i: { email: string }) => i.email === email)).toMatchObject({ expired: true });
  });

  it("an unknown or malformed link is 404 or 400, never 500", async () => {
    expect((await server.client().get(`/api/invitations/${"x".repeat(43)}`)).status).toBe(404);
    expect((await server.client().get("/api/invitations/not%20a%20token")).status).toBe(400);
  });

  it("a weak password or a missing name is a 400 with the field named", async () => {
    const { token } = await invite(fresh());
    const r = await server.client().post(`/api/invitations/${token}/accept`, { name: "", password: "short" });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)).toEqual(expect.arrayContaining(["name", "password"]));
  });
});

describe("resend and revoke", () => {
  it("resend sends a new link and the old one stops working", async () => {
    const email = fresh();
    const { r, token } = await invite(email);
    smtp.mailbox.clear();
    const again = await curator.post(`/api/sites/${fx.siteId}/invitations/${r.body.invitation.id}/resend`);
    expect(again.status).toBe(200);
    const msg = await smtp.mailbox.waitFor((m) => m.to.includes(email));
    const newToken = tokenOf(linkIn(msg, server.base));
    expect(newToken).not.toBe(token);
    expect((await server.client().get(`/api/invitations/${token}`)).status).toBe(404);
    expect((await server.client().get(`/api/invitations/${newToken}`)).status).toBe(200);
  });

  it("inviting the same address again renews the one pending invitation instead of adding a second", async () => {
    const email = fresh();
    await invite(email, "viewer");
    await invite(email, "photographer");
    const rows = await t.db.selectFrom("invitations").select("role").where("email", "=", email).execute();
    expect(rows).toEqual([{ role: "photographer" }]);
  });

  it("a revoked link is refused (410) and leaves the pending list; revoking twice is 409", async () => {
    const email = fresh();
    const { r, token } = await invite(email);
    const del = await curator.del(`/api/sites/${fx.siteId}/invitations/${r.body.invitation.id}`);
    expect(del.status).toBe(200);
    expect(del.body.invitations.map((i: { email: string }) => i.email)).not.toContain(email);
    const look = await server.client().get(`/api/invitations/${token}`);
    expect(look.status).toBe(410);
    expect(look.body.error.code).toBe("invitation_revoked");
    expect((await curator.del(`/api/sites/${fx.siteId}/invitations/${r.body.invitation.id}`)).status).toBe(409);
  });

  it("each change is in the audit trail", async () => {
    const rows = await t.db
      .selectFrom("auditLog")
      .select("action")
      .where("entityType", "=", "invitation")
      .where("siteId", "=", fx.siteId)
      .execute();
    expect(new Set(rows.map((r) => r.action))).toEqual(
      new Set(["invited", "reinvited", "resent", "revoked", "accepted"]),
    );
  });
});

describe("addresses that already have an account", () => {
  it("an address with an account gets the same answer and the same kind of invitation as a new one; it joins only by accepting", async () => {
    const other = await makeUser(t.db, { email: fresh(), name: "Already Here" });
    const newcomer = fresh();
    const a = await curator.post(`/api/sites/${fx.siteId}/invitations`, {
      email: other.email.toUpperCase(),
      role: "viewer",
    });
    const b = await curator.post(`/api/sites/${fx.siteId}/invitations`, { email: newcomer, role: "viewer" });
    expect(a.status).toBe(201);
    expect(b.status).toBe(201);
    const shape = (r: typeof a) => ({
      outcome: r.body.outcome,
      keys: Object.keys(r.body.invitation).sort(),
      sendStatus: r.body.invitation.sendStatus,
    });
    expect(shape(a)).toEqual(shape(b));
    expect(a.body.outcome).toBe("invited");
    const none = await t.db
      .selectFrom("memberships")
      .select("role")
      .where("siteId", "=", fx.siteId)
      .where("userId", "=", other.id)
      .executeTakeFirst();
    expect(none).toBeUndefined();
    const msg = await smtp.mailbox.waitFor((x) => x.to.includes(other.email));
    expect(msg.subject).toContain("invited");
    const token = tokenOf(linkIn(msg, server.base));
    const invitee = server.client();
    expect((await invitee.post(`/api/invitations/${token}/accept`, { password: TEST_PASSWORD })).status).toBe(200);
    const m = await t.db
      .selectFrom("memberships")
      .select("role")
      .where("siteId", "=", fx.siteId)
      .where("userId", "=", other.id)
      .executeTakeFirst();
    expect(m).toEqual({ role: "viewer" });
    const audit = await t.db
      .selectFrom("auditLog")
      .select(["action", "actorId"])
      .where("entityType", "=", "membership")
      .where("entityId", "=", other.id)
      .execute();
    expect(audit).toEqual([{ action: "add", actorId: other.id }]);
  });

  it("there is no way to add an existing account directly (POST /members is gone)", async () => {
    const other = await makeUser(t.db, { email: fresh() });
    const r = await curator.post(`/api/sites/${fx.siteId}/members`, { email: other.email, role: "viewer" });
    expect(r.status).toBe(404);
  });

  it("inviting someone already on the crew is a 409", async () => {
    const r = await curator.post(`/api/sites/${fx.siteId}/invitations`, {
      email: fx.crew.viewer.email,
      role: "viewer",
    });
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe("already_member");
  });

  it("when the address got an account after the invitation, accepting needs that account's password", async () => {
    const email = fresh();
    const { token } = await invite(email, "photographer");
    await makeUser(t.db, { email, name: "Signed Up Elsewhere" });
    const invitee = server.client();
    expect((await invitee.get(`/api/invitations/${token}`)).body.invitation.accountExists).toBe(true);
    const wrong = await invitee.post(`/api/invitations/${token}/accept`, { password: "not-the-password" });
    expect(wrong.status).toBe(401);
    const ok = await invitee.post(`/api/invitations/${token}/accept`, { password: TEST_PASSWORD });
    expect(ok.status).toBe(200);
    expect((await invitee.get("/api/session")).body.memberships).toEqual([
      { siteId: fx.siteId, siteName: "Test hulk", role: "photographer" },
    ]);
  });
});

describe("who may invite", () => {
  it("a volunteer gets 403 for inviting and for the list; an outsider gets 404", async () => {
    const v = server.client();
    await v.signIn(fx.crew.volunteer.email);
    expect((await v.post(`/api/sites/${fx.siteId}/invitations`, { email: fresh(), role: "viewer" })).status).toBe(403);
    expect((await v.get(`/api/sites/${fx.siteId}/invitations`)).status).toBe(403);
    const o = server.client();
    await o.signIn(fx.crew.outsider.email);
    expect((await o.get(`/api/sites/${fx.siteId}/invitations`)).status).toBe(404);
  });

  it("a bad address or role is a 400 with the fields named", async () => {
    const r = await curator.post(`/api/sites/${fx.siteId}/invitations`, { email: "nope", role: "captain" });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)).toEqual(expect.arrayContaining(["email", "role"]));
  });

  it("a resend for another site's invitation id is 404", async () => {
    const r = await curator.post(`/api/sites/${fx.siteId}/invitations/00000000-0000-4000-8000-000000000000/resend`);
    expect(r.status).toBe(404);
  });
});

describe("the dev mailbox", () => {
  it("an admin reads the fake server's messages; a curator gets 403; signed out 401", async () => {
    const a = server.client();
    await a.signIn(fx.crew.admin.email);
    const r = await a.get("/api/admin/mailbox");
    expect(r.status).toBe(200);
    expect(r.body.messages.length).toBeGreaterThan(0);
    expect(r.body.messages[0]).toEqual(
      expect.objectContaining({ subject: expect.any(String), text: expect.any(String), html: expect.any(String) }),
    );
    expect((await curator.get("/api/admin/mailbox")).status).toBe(403);
    expect((await server.client().get("/api/admin/mailbox")).status).toBe(401);
  });
});

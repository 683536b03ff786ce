import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { backgroundIdle } from "../../server/mail/background";
import type { FakeSmtp } from "../../server/mail/fake-smtp";
import { hashToken } from "../../server/one-time-token";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeUser } from "../helpers/fixtures";
import { Client, TEST_PASSWORD, type TestServer } from "../helpers/http";
import { linkIn, startMailTestServer, tokenOf } from "../helpers/mail";

let t: TestDb;
let env: Awaited<ReturnType<typeof startMailTestServer>>;
let server: TestServer;
let smtp: FakeSmtp;
let n = 0;
const fresh = () => `reset-${Date.now()}-${n++}@example.test`;

beforeAll(async () => {
  t = await createTestDb();
  env = await startMailTestServer(t.db);
  ({ server, smtp } = env);
});
afterAll(async () => {
  await backgroundIdle();
  await server.jobsIdle();
  await env.close();
  await t.drop();
});

async function requestLink(email: string) {
  const r = await server.client().post("/api/auth/password-reset", { email });
  expect(r.status).toBe(202);
  await backgroundIdle();
  await server.jobsIdle();
  const msg = await smtp.mailbox.waitFor((m) => m.to.includes(email));
  return { msg, token: tokenOf(linkIn(msg, server.base)) };
}

describe("asking for a reset", () => {
  it("gives the same status and body for a known and an unknown address, and mails only the known one", async () => {
    const known = await makeUser(t.db, { email: fresh() });
    const unknown = fresh();
    smtp.mailbox.clear();
    const a = await server.client().post("/api/auth/password-reset", { email: known.email });
    const b = await server.client().post("/api/auth/password-reset", { email: unknown });
    expect(a.status).toBe(202);
    expect(b.status).toBe(a.status);
    expect(b.body).toEqual(a.body);
    expect(a.headers.get("set-cookie")).toBe(b.headers.get("set-cookie"));
    await backgroundIdle();
    await server.jobsIdle();
    const to = smtp.mailbox.list().map((m) => m.to);
    expect(to).toEqual([known.email]);
  });

  it("the e-mail has text and HTML parts with a one-hour link whose token is stored only hashed", async () => {
    const u = await makeUser(t.db, { email: fresh(), name: "Orla Penhallow" });
    const { msg, token } = await requestLink(u.email);
    expect(msg.from).toBe('"Tideline" <no-reply@tideline.invalid>');
    expect(msg.text).toContain("Hello Orla Penhallow");
    expect(msg.html).toContain(`/reset-password/${token}`);
    const row = await t.db
      .selectFrom("passwordResets")
      .selectAll()
      .where("userId", "=", u.id)
      .executeTakeFirstOrThrow();
    expect(row.tokenHash).toBe(hashToken(token));
    const minutes = (row.expiresAt.getTime() - Date.now()) / 60_000;
    expect(minutes).toBeGreaterThan(59);
    expect(minutes).toBeLessThanOrEqual(60);
  });

  it("a malformed address is a 400 (that says nothing about accounts)", async () => {
    expect((await server.client().post("/api/auth/password-reset", { email: "nope" })).status).toBe(400);
  });

  it("after three links in an hour, a fourth is not sent, with the same answer", async () => {
    const u = await makeUser(t.db, { email: fresh() });
    for (let i = 0; i < 4; i++)
      expect((await server.client().post("/api/auth/password-reset", { email: u.email })).status).toBe(202);
    await backgroundIdle();
    await server.jobsIdle();
    expect(smtp.mailbox.list().filter((m) => m.to.includes(u.email))).toHaveLength(3);
  });
});

describe("using the link", () => {
  it("sets the new password, ends every other session, and signs this browser in", async () => {
    const u = await makeUser(t.db, { email: fresh() });
    const elsewhere = server.client();
    await elsewhere.signIn(u.email);
    const { token } = await requestLink(u.email);
    const browser = server.client();
    expect((await browser.get(`/api/auth/password-reset/${token}`)).body).toEqual({ email: u.email });
    const r = await browser.post(`/api/auth/password-reset/${token}`, { password: "a-brand-new-secret" });
    expect(r.status).toBe(200);
    expect((await browser.get("/api/session")).status).toBe(200);
    expect((await elsewhere.get("/api/session")).status).toBe(401);
    expect((await server.client().post("/api/auth/sign-in", { email: u.email, password: TEST_PASSWORD })).status).toBe(
      401,
    );
    await new Client(server.base).signIn(u.email, "a-brand-new-secret");
  });

  it("a used link is refused (410), and so is every other link sent before it", async () => {
    const u = await makeUser(t.db, { email: fresh() });
    const first = await requestLink(u.email);
    smtp.mailbox.clear();
    const second = await requestLink(u.email);
    expect(
      (await server.client().post(`/api/auth/password-reset/${second.token}`, { password: "a-brand-new-secret" }))
        .status,
    ).toBe(200);
    const again = await server
      .client()
      .post(`/api/auth/password-reset/${second.token}`, { password: "yet-another-secret" });
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe("reset_used");
    expect(
      (await server.client().post(`/api/auth/password-reset/${first.token}`, { password: "yet-another-secret" }))
        .status,
    ).toBe(410);
  });

  it("an expired link is refused (410 reset_expired) and the password stays", async () => {
    const u = await makeUser(t.db, { email: fresh() });
    const { token } = await requestLink(u.email);
    await t.db
      .updateTable("passwordResets")
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where("userId", "=", u.id)
      .execute();
    const r = await server.client().post(`/api/auth/password-reset/${token}`, { password: "a-brand-new-secret" });
    expect(r.status).toBe(410);
    expect(r.body.error.code).toBe("reset_expired");
    await server.client().signIn(u.email, TEST_PASSWORD);
  });

  it("a short password is a 400 and spends nothing; an unknown link is a 404", async () => {
    const u = await makeUser(t.db, { email: fresh() });
    const { token } = await requestLink(u.email);
    const r = await server.client().post(`/api/auth/password-reset/${token}`, { password: "short" });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.password).toBeTruthy();
    expect((await server.client().get(`/api/auth/password-reset/${token}`)).status).toBe(200);
    expect((await server.client().get(`/api/auth/password-reset/${"y".repeat(43)}`)).status).toBe(404);
  });
});

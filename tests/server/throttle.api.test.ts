import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { backgroundIdle } from "../../server/mail/background";
import { memoryMailer } from "../../server/mail/mailer";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, TEST_PASSWORD, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
const mailer = memoryMailer();

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db, mailer });
  fx = await makeCrew(t.db);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const wrong = (email: string) => server.client().post("/api/auth/sign-in", { email, password: "not-the-password" });

describe("sign-in throttle (rate-limiter-flexible, counters in PostgreSQL)", () => {
  it("after 10 wrong passwords for one account, the 11th attempt — even the right password — gets 429 with Retry-After, and the owner gets one e-mail", async () => {
    const email = fx.crew.viewer.email;
    for (let i = 0; i < 10; i++) expect((await wrong(email)).status).toBe(401);
    const blocked = await wrong(email);
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe("too_many_requests");
    expect(blocked.body.error.message).toMatch(/Try again in \d+ minutes?/);
    const retry = Number(blocked.headers.get("retry-after"));
    expect(retry).toBeGreaterThan(0);
    expect(retry).toBeLessThanOrEqual(15 * 60);
    const right = await server.client().post("/api/auth/sign-in", { email, password: TEST_PASSWORD });
    expect(right.status).toBe(429);
    expect(right.headers.getSetCookie()).toEqual([]);
    for (let i = 0; i < 3; i++) await wrong(email);
    await backgroundIdle();
    await server.jobsIdle(); // the alert goes out through the e-mail outbox
    const alerts = mailer.sent.filter((m) => m.to === email);
    expect(alerts).toHaveLength(1);
    expect(alerts[0].subject).toMatch(/failed sign-ins/);
    expect(alerts[0].text).toContain("10 sign-in attempts");
  });

  it("the counters live in the database (rate_limits), so another server instance sees them", async () => {
    const rows = await t.db
      .selectFrom("rateLimits")
      .select(["key", "points"])
      .where("key", "like", "signin_acct:%")
      .execute();
    expect(rows.find((r) => r.key === `signin_acct:${fx.crew.viewer.email}`)?.points).toBeGreaterThanOrEqual(10);
    const second = await startTestServer({ db: t.db, mailer: memoryMailer() });
    try {
      const r = await second
        .client()
        .post("/api/auth/sign-in", { email: fx.crew.viewer.email, password: TEST_PASSWORD });
      expect(r.status).toBe(429);
    } finally {
      await second.close();
    }
  });

  it("an unknown address is throttled the same way and no e-mail goes anywhere", async () => {
    const ghost = "nobody-here@example.test";
    for (let i = 0; i < 10; i++) expect((await wrong(ghost)).status).toBe(401);
    expect((await wrong(ghost)).status).toBe(429);
    await backgroundIdle();
    await server.jobsIdle(); // the alert goes out through the e-mail outbox
    expect(mailer.sent.filter((m) => m.to === ghost)).toEqual([]);
  });

  it("a success clears the account's count of failures", async () => {
    const email = fx.crew.scrounger.email;
    for (let i = 0; i < 9; i++) await wrong(email);
    expect((await server.client().post("/api/auth/sign-in", { email, password: TEST_PASSWORD })).status).toBe(200);
    for (let i = 0; i < 9; i++) expect((await wrong(email)).status).toBe(401);
  });

  it("a successful sign-in is audited with who and when", async () => {
    await server.client().signIn(fx.crew.photographer.email);
    const row = await t.db
      .selectFrom("auditLog")
      .selectAll()
      .where("entityId", "=", fx.crew.photographer.id)
      .where("action", "=", "signed_in")
      .executeTakeFirst();
    expect(row).toMatchObject({ siteId: null, entityType: "user", actorId: fx.crew.photographer.id });
    expect(row!.at).toBeInstanceOf(Date);
  });
});

describe("password-reset and invitation throttles", () => {
  it("a sixth reset request for one address within the hour gets 429 with Retry-After", async () => {
    const email = "reset-me@example.test";
    for (let i = 0; i < 5; i++)
      expect((await server.client().post("/api/auth/password-reset", { email })).status).toBe(202);
    const r = await server.client().post("/api/auth/password-reset", { email });
    expect(r.status).toBe(429);
    expect(Number(r.headers.get("retry-after"))).toBeGreaterThan(0);
  });

  it("accepting invitations is throttled per address: after 20 attempts in 15 minutes, 429", async () => {
    const c = server.client();
    const token = "x".repeat(43);
    let last = 0;
    for (let i = 0; i < 21; i++)
      last = (await c.post(`/api/invitations/${token}/accept`, { password: "whatever-password" })).status;
    expect(last).toBe(429);
  });
});

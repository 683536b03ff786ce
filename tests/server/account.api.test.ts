import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { backgroundIdle } from "../../server/mail/background";
import type { FakeSmtp } from "../../server/mail/fake-smtp";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew, makeSite, makeUser } from "../helpers/fixtures";
import { TEST_PASSWORD, type TestServer } from "../helpers/http";
import { startMailTestServer } from "../helpers/mail";

// Changing one's password while signed in, and the site's currency.
let t: TestDb;
let env: Awaited<ReturnType<typeof startMailTestServer>>;
let server: TestServer;
let smtp: FakeSmtp;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let n = 0;
const fresh = () => `change-${Date.now()}-${n++}@example.test`;

beforeAll(async () => {
  t = await createTestDb();
  env = await startMailTestServer(t.db);
  ({ server, smtp } = env);
  fx = await makeCrew(t.db);
});
afterAll(async () => {
  await backgroundIdle();
  await server.jobsIdle();
  await env.close();
  await t.drop();
});

describe("changing one's password while signed in", () => {
  it("needs the current password; then this browser stays signed in, every other session ends, the change is audited and mailed", async () => {
    const u = await makeUser(t.db, { email: fresh(), name: "Mirren Stoat" });
    const here = server.client();
    const phone = server.client();
    await here.signIn(u.email);
    await phone.signIn(u.email);
    smtp.mailbox.clear();

    const r = await here.post("/api/account/password", {
      currentPassword: TEST_PASSWORD,
      newPassword: "a longer harbour phrase",
    });
    expect(r.status).toBe(200);
    expect((await here.get("/api/session")).status).toBe(200); // renewed cookie
    expect((await phone.get("/api/session")).status).toBe(401); // the other session ended

    const old = await server.client().post("/api/auth/sign-in", { email: u.email, password: TEST_PASSWORD });
    expect(old.status).toBe(401);
    await server.client().signIn(u.email, "a longer harbour phrase");

    const audit = await t.db
      .selectFrom("auditLog")
      .select(["action", "actorId", "entityType"])
      .where("entityId", "=", u.id)
      .where("action", "=", "password_changed")
      .execute();
    expect(audit).toEqual([{ action: "password_changed", actorId: u.id, entityType: "user" }]);

    await server.jobsIdle();
    const msg = await smtp.mailbox.waitFor((m) => m.to.includes(u.email));
    expect(msg.subject).toBe("Your Tideline password was changed");
    expect(msg.text).toContain("Hello Mirren Stoat");
    expect(msg.text).toContain("signed out");
    expect(msg.text).toContain("/reset-password");
    expect(msg.text).not.toContain("a longer harbour phrase");
    // No site: the time is UTC's, named.
    expect(msg.text).toMatch(/changed while signed in, at \d{4}-\d{2}-\d{2} \d{2}:\d{2} UTC\./);
  });

  it("writes the time of the change on the clock of the person's sites when they keep one zone, named", async () => {
    // Reference: the platform's Intl.DateTimeFormat (ICU's zone data), not Tideline's own formatter. Chatham is
    // UTC+13:45 in December, so an hour-only offset would show.
    const zone = "Pacific/Chatham";
    const site = await makeSite(t.db, "Chatham test hulk");
    await t.db.updateTable("sites").set({ timeZone: zone }).where("id", "=", site.id).execute();
    const u = await makeUser(t.db, { email: fresh(), siteId: site.id, role: "volunteer" });
    const c = server.client();
    await c.signIn(u.email);
    smtp.mailbox.clear();
    const icu = new Intl.DateTimeFormat("en-CA", {
      timeZone: zone,
      hourCycle: "h23",
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
    });
    const minute = (d: Date) => icu.format(d).replace(",", "");
    const before = minute(new Date());
    expect(
      (await c.post("/api/account/password", { currentPassword: TEST_PASSWORD, newPassword: "chatham islands phrase" }))
        .status,
    ).toBe(200);
    const after = minute(new Date());
    await server.jobsIdle();
    const msg = await smtp.mailbox.waitFor((m) => m.to.includes(u.email));
    const said = /changed while signed in, at (\d{4}-\d{2}-\d{2} \d{2}:\d{2}) Pacific\/Chatham\./.exec(msg.text)?.[1];
    expect([before, after]).toContain(said);

    // On a second site in another zone: UTC, named.
    const other = await makeSite(t.db, "Lisbon test hulk");
    await t.db.updateTable("sites").set({ timeZone: "Europe/Lisbon" }).where("id", "=", other.id).execute();
    await t.db.insertInto("memberships").values({ siteId: other.id, userId: u.id, role: "viewer" }).execute();
    smtp.mailbox.clear();
    expect(
      (
        await c.post("/api/account/password", {
          currentPassword: "chatham islands phrase",
          newPassword: "lisbon harbour phrase",
        })
      ).status,
    ).toBe(200);
    await server.jobsIdle();
    const second = await smtp.mailbox.waitFor((m) => m.to.includes(u.email));
    expect(second.text).toMatch(/changed while signed in, at \d{4}-\d{2}-\d{2} \d{2}:\d{2} UTC\./);
  });

  it("a wrong current password is a 400 naming the field, and changes nothing", async () => {
    const u = await makeUser(t.db, { email: fresh() });
    const c = server.client();
    await c.signIn(u.email);
    const before = await t.db.selectFrom("users").select("passwordHash").where("id", "=", u.id).executeTakeFirst();
    const r = await c.post("/api/account/password", {
      currentPassword: "not it at all",
      newPassword: "another phrase 2",
    });
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe("wrong_current_password");
    expect(r.body.error.fields.currentPassword).toBeTruthy();
    const after = await t.db.selectFrom("users").select("passwordHash").where("id", "=", u.id).executeTakeFirst();
    expect(after).toEqual(before);
    expect((await c.get("/api/session")).status).toBe(200); // still signed in
  });

  it.each([
    [{ currentPassword: TEST_PASSWORD, newPassword: "short" }, "newPassword"],
    [{ currentPassword: TEST_PASSWORD, newPassword: TEST_PASSWORD }, "newPassword"],
    [{ currentPassword: "", newPassword: "a fine long phrase" }, "currentPassword"],
    [{ newPassword: "a fine long phrase" }, "currentPassword"],
  ])("bad input %j is a 400 on %s", async (body, field) => {
    const u = await makeUser(t.db, { email: fresh() });
    const c = server.client();
    await c.signIn(u.email);
    const r = await c.post("/api/account/password", body);
    expect(r.status).toBe(400);
    expect(r.body.error.fields[field]).toBeTruthy();
  });

  it("needs a session", async () => {
    const r = await server.client().post("/api/account/password", {
      currentPassword: TEST_PASSWORD,
      newPassword: "a fine long phrase",
    });
    expect(r.status).toBe(401);
  });

  it("two changes at once: one wins, the other is told (never a silent overwrite)", async () => {
    const u = await makeUser(t.db, { email: fresh() });
    const a = server.client();
    const b = server.client();
    await a.signIn(u.email);
    await b.signIn(u.email);
    const [ra, rb] = await Promise.all([
      a.post("/api/account/password", { currentPassword: TEST_PASSWORD, newPassword: "first new phrase" }),
      b.post("/api/account/password", { currentPassword: TEST_PASSWORD, newPassword: "second new phrase" }),
    ]);
    const statuses = [ra.status, rb.status].sort();
    // Either both checked the old hash (one 200, one 409) or the second saw the new one (400 wrong current).
    expect(statuses[0]).toBe(200);
    expect([400, 409]).toContain(statuses[1]);
    const winner = ra.status === 200 ? "first new phrase" : "second new phrase";
    await server.client().signIn(u.email, winner);
  });
});

describe("the site's currency", () => {
  const base = () => `/api/sites/${fx.siteId}`;

  it("is USD until the curator sets it; every site answer carries it", async () => {
    const c = server.client();
    await c.signIn(fx.crew.viewer.email);
    expect((await c.get(base())).body.site.currency).toBe("USD");
  });

  it("the curator sets an ISO 4217 code (lower case accepted), audited; the answer is the site", async () => {
    const c = server.client();
    await c.signIn(fx.crew.curator.email);
    const r = await c.put(`${base()}/currency`, { currency: "eur", from: "USD" });
    expect(r.status).toBe(200);
    expect(r.body.site.currency).toBe("EUR");
    const audit = await t.db
      .selectFrom("auditLog")
      .select(["before", "after"])
      .where("entityId", "=", fx.siteId)
      .where("entityType", "=", "site")
      .execute();
    expect(audit).toContainEqual({ before: { currency: "USD" }, after: { currency: "EUR" } });
    const v = server.client();
    await v.signIn(fx.crew.viewer.email);
    expect((await v.get("/api/sites")).body.sites.find((s: { id: string }) => s.id === fx.siteId).currency).toBe("EUR");
  });

  it("a stale form (from no longer matches) is a 409 with the site as it is", async () => {
    const c = server.client();
    await c.signIn(fx.crew.curator.email);
    const r = await c.put(`${base()}/currency`, { currency: "NOK", from: "USD" });
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe("currency_changed");
    expect(r.body.error.current.currency).toBe("EUR");
  });

  it.each([["EURO"], ["XQQ"], [""], [42]])("%j is a 400 that changes nothing", async (currency) => {
    const c = server.client();
    await c.signIn(fx.crew.curator.email);
    const r = await c.put(`${base()}/currency`, { currency });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.currency).toBeTruthy();
    expect((await c.get(base())).body.site.currency).toBe("EUR");
  });

  it("a scrounger may not set it (403)", async () => {
    const c = server.client();
    await c.signIn(fx.crew.scrounger.email);
    expect((await c.put(`${base()}/currency`, { currency: "GBP" })).status).toBe(403);
  });
});

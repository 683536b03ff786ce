import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sessionKey } from "../../server/auth/session-repository";
import { createDb } from "../../server/db";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

describe("health", () => {
  it("answers 200 with the database up", async () => {
    const r = await server.client().get("/api/health");
    expect(r.status).toBe(200);
    expect(r.body).toEqual({ ok: true, db: "up" });
  });

  it("answers 503 db:down when the database cannot be reached", async () => {
    const deadDb = createDb("postgres://postgres@127.0.0.1:1/nothing", 1);
    const dead = await startTestServer({ db: deadDb });
    const r = await dead.client().get("/api/health");
    expect(r.status).toBe(503);
    expect(r.body).toEqual({ ok: false, db: "down" });
    await dead.close();
    await deadDb.destroy();
  });
});

describe("sign-in", () => {
  it("when the password is right, it sets an httpOnly SameSite=Lax session cookie and /api/session answers", async () => {
    const c = server.client();
    const r = await c.post("/api/auth/sign-in", { email: fx.crew.curator.email, password: "correct-horse-battery" });
    expect(r.status).toBe(200);
    const cookie = r.headers.getSetCookie().find((x) => x.startsWith("tideline_session="))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i); // plain http here; Secure only over https
    const s = await c.get("/api/session");
    expect(s.status).toBe(200);
    expect(s.body.user).toMatchObject({ email: fx.crew.curator.email, isAdmin: false });
    expect(s.body.memberships).toEqual([{ siteId: fx.siteId, siteName: "Test hulk", role: "curator" }]);
  });

  it("when the e-mail is typed in another case, it still signs in", async () => {
    const r = await server
      .client()
      .post("/api/auth/sign-in", { email: fx.crew.viewer.email.toUpperCase(), password: "correct-horse-battery" });
    expect(r.status).toBe(200);
  });

  it("when the password is wrong or the e-mail unknown, it answers 401 with the same message", async () => {
    const wrong = await server
      .client()
      .post("/api/auth/sign-in", { email: fx.crew.curator.email, password: "nope-nope-nope" });
    const unknown = await server
      .client()
      .post("/api/auth/sign-in", { email: "nobody@example.test", password: "nope-nope-nope" });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error.message).toBe(unknown.body.error.message);
    expect(
      wrong.headers
        .getSetCookie()
        .some((x) => x.startsWith("tideline_session=") && !x.startsWith("tideline_session=;")),
    ).toBe(false);
  });

  it("when the body is malformed, it answers 400 with the offending fields, never 500", async () => {
    const c = server.client();
    const r = await c.post("/api/auth/sign-in", { email: "not-an-email" });
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe("invalid_input");
    expect(Object.keys(r.body.error.fields)).toEqual(expect.arrayContaining(["email", "password"]));
    const bad = await c.call("POST", "/api/auth/sign-in", "{not json", { "content-type": "application/json" });
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).not.toMatch(/at .*\.(ts|js)/);
  });
});

describe("session lifetime", () => {
  it("after sign-out, the old cookie no longer opens the session", async () => {
    const c = server.client();
    await c.signIn(fx.crew.volunteer.email);
    const old = c.cookie;
    expect((await c.post("/api/auth/sign-out")).status).toBe(200);
    const again = new Client(server.base);
    again.cookie = old;
    expect((await again.get("/api/session")).status).toBe(401);
  });

  it("when the session has expired, /api/session answers 401", async () => {
    const c = server.client();
    await c.signIn(fx.crew.photographer.email);
    const id = c.cookie.split("=")[1];
    await t.db
      .updateTable("sessions")
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where("id", "=", sessionKey(id))
      .execute(); // stored hashed
    expect((await c.get("/api/session")).status).toBe(401);
  });

  it("without a cookie, /api/session answers 401 JSON", async () => {
    const r = await server.client().get("/api/session");
    expect(r.status).toBe(401);
    expect(r.body.error.code).toBe("unauthenticated");
  });
});

describe("roles", () => {
  it("when a viewer asks for the curator-only crew list, it gets 403", async () => {
    const c = server.client();
    await c.signIn(fx.crew.viewer.email);
    const r = await c.get(`/api/sites/${fx.siteId}/members`);
    expect(r.status).toBe(403);
    expect(r.body.error.code).toBe("forbidden");
  });

  it("the curator gets the crew list", async () => {
    const c = server.client();
    await c.signIn(fx.crew.curator.email);
    const r = await c.get(`/api/sites/${fx.siteId}/members`);
    expect(r.status).toBe(200);
    expect(r.body.members).toHaveLength(5);
  });

  it("a member of another site gets 404 for this site", async () => {
    const c = server.client();
    await c.signIn(fx.crew.outsider.email);
    expect((await c.get(`/api/sites/${fx.siteId}`)).status).toBe(404);
  });

  it("a non-admin cannot create sites (403); an admin can (201)", async () => {
    const c = server.client();
    await c.signIn(fx.crew.curator.email);
    expect((await c.post("/api/sites", { name: "X", kind: "plant" })).status).toBe(403);
    const a = server.client();
    await a.signIn(fx.crew.admin.email);
    const r = await a.post("/api/sites", { name: "Pump house", kind: "plant" });
    expect(r.status).toBe(201);
    expect(r.body.site.name).toBe("Pump house");
  });

  it("the instance admin lists every account with its sites and roles, no password; anyone else gets 403", async () => {
    const c = server.client();
    await c.signIn(fx.crew.curator.email);
    expect((await c.get("/api/admin/users")).status).toBe(403);
    const a = server.client();
    await a.signIn(fx.crew.admin.email);
    const made = await a.post("/api/admin/users", {
      email: "Listed.Person@Example.test",
      name: "Listed Person",
      password: "a-long-enough-one",
    });
    expect(made.status).toBe(201);
    const r = await a.get("/api/admin/users");
    expect(r.status).toBe(200);
    const users = r.body.users as Array<Record<string, unknown>>;
    expect(users.map((u) => u.email)).toEqual(
      expect.arrayContaining([fx.crew.admin.email, fx.crew.curator.email, "listed.person@example.test"]),
    );
    const curator = users.find((u) => u.email === fx.crew.curator.email)!;
    expect(curator).toMatchObject({
      isAdmin: false,
      sites: [{ siteId: fx.siteId, siteName: "Test hulk", role: "curator" }],
    });
    expect(users.find((u) => u.email === fx.crew.admin.email)).toMatchObject({ isAdmin: true });
    expect(users.find((u) => u.email === "listed.person@example.test")).toMatchObject({
      name: "Listed Person",
      sites: [],
    });
    expect(new Date(String(curator.createdAt)).toISOString()).toBe(curator.createdAt);
    for (const u of users)
      expect(Object.keys(u).sort()).toEqual(["createdAt", "email", "id", "isAdmin", "name", "sites", "suspended"]);
    // By name, whatever the case.
    const names = users.map((u) => String(u.name).toLowerCase());
    expect(names).toEqual([...names].sort());
  });

  it("a bad site id is a 400, not a 500", async () => {
    const c = server.client();
    await c.signIn(fx.crew.curator.email);
    expect((await c.get("/api/sites/not-a-uuid")).status).toBe(400);
  });

  it("a change of a member's role, and their removal, hold from their next request on the same session", async () => {
    const site = await t.db
      .insertInto("sites")
      .values({ name: "Standing", kind: "plant", location: "", description: "" })
      .returning("id")
      .executeTakeFirstOrThrow();
    const who = fx.crew.viewer;
    await t.db.insertInto("memberships").values({ siteId: site.id, userId: who.id, role: "curator" }).execute();
    const c = server.client();
    await c.signIn(who.email);
    expect((await c.get(`/api/sites/${site.id}/members`)).status).toBe(200);
    await t.db.updateTable("memberships").set({ role: "viewer" }).where("siteId", "=", site.id).execute();
    expect((await c.get(`/api/sites/${site.id}/members`)).status).toBe(403);
    expect((await c.get(`/api/sites/${site.id}`)).status).toBe(200);
    await t.db.deleteFrom("memberships").where("siteId", "=", site.id).execute();
    expect((await c.get(`/api/sites/${site.id}`)).status).toBe(404);
    expect((await c.get(`/api/sites/${fx.siteId}`)).status).toBe(200); // their other site is untouched
  });

  it("the last curator cannot be demoted (409)", async () => {
    const c = server.client();
    await c.signIn(fx.crew.curator.email);
    const r = await c.patch(`/api/sites/${fx.siteId}/members/${fx.crew.curator.id}`, { role: "viewer" });
    expect(r.status).toBe(409);
  });
});

describe("origin check", () => {
  it("a cross-site POST is refused with 403 even with a valid session", async () => {
    const c = server.client();
    await c.signIn(fx.crew.admin.email);
    const evil = new Client(server.base, "https://evil.example");
    evil.cookie = c.cookie;
    const r = await evil.post("/api/sites", { name: "Forged", kind: "plant" });
    expect(r.status).toBe(403);
    expect(r.body.error.code).toBe("bad_origin");
    const none = new Client(server.base, "");
    none.cookie = c.cookie;
    expect((await none.post("/api/sites", { name: "Forged", kind: "plant" })).status).toBe(403);
  });
});

describe("unknown routes", () => {
  it("answer 404 JSON", async () => {
    const r = await server.client().get("/api/nothing-here");
    expect(r.status).toBe(404);
    expect(r.body.error.code).toBe("not_found");
  });
});

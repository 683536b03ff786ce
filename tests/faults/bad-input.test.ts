/**
 * Property-based bad input over HTTP (fast-check): every write route of the app's own route
 * table gets hostile JSON bodies, and every read route hostile query strings, as an instance
 * admin (who passes every role guard, so the input reaches the schemas and the database).
 * The answer is never a 500 and never carries a stack trace. Ids in the paths are real
 * records of a small board, so requests get past "not found" to the code that stores.
 * In the faults part: about a thousand requests take a minute or two on a loaded machine.
 */
import { randomUUID } from "node:crypto";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApp } from "../../server/app";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { makeBoard, makeDefect } from "../helpers/mail";
import { nastyBody, nastyQuery } from "../helpers/nasty";
import { listRoutes } from "../helpers/routes";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let admin: Client;
const ids: Record<string, string> = {};

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  admin = server.client();
  await admin.signIn(fx.crew.admin.email);
  const b = await makeBoard(t.db, fx.siteId);
  const d = await makeDefect(t.db, { siteId: fx.siteId, boardId: b.boardId, positionId: b.positionId });
  const photo = await t.db
    .insertInto("photos")
    .values({
      siteId: fx.siteId,
      boardId: b.boardId,
      positionId: b.positionId,
      originalName: "p.jpg",
      format: "jpeg",
      width: 1,
      height: 1,
      bytes: 1,
      originalKey: "o",
      displayKey: "d",
      thumbKey: "t",
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  const section = await t.db
    .insertInto("sections")
    .values({ siteId: fx.siteId, boardId: b.boardId, name: "Feeder panel" })
    .returning("id")
    .executeTakeFirstOrThrow();
  const line = await admin.post(`/api/sites/${fx.siteId}/parts`, { kind: "ground_lamp", voltageRating: 250, qty: 2 });
  expect(line.status).toBe(201);
  Object.assign(ids, {
    boardId: b.boardId,
    positionId: b.positionId,
    componentId: b.componentId,
    defectId: d.id,
    photoId: photo.id,
    sectionId: section.id,
    userId: fx.crew.viewer.id,
    lineId: line.body.line.id,
  });
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const fill = (path: string) =>
  path
    .replace(":siteId", fx.siteId)
    .replace(/:token\b/, "A".repeat(43))
    .replace(/:key\b/, "weekly_summary")
    .replace(/:rendition\b/, "thumb")
    .replace(/:([A-Za-z]+)/g, (_m, name: string) => ids[name] ?? randomUUID());

function judge(what: string, r: { status: number; body: unknown }) {
  const text = typeof r.body === "string" ? r.body : JSON.stringify(r.body ?? "");
  expect(r.status, `${what} → ${r.status} ${text.slice(0, 300)}`).toBeLessThan(500);
  expect(text, `${what}: a stack trace in the body`).not.toMatch(/\bat .+\.(ts|js):\d+|node_modules/);
}

async function stillSignedIn() {
  if ((await admin.get("/api/session")).status === 401) await admin.signIn(fx.crew.admin.email);
}

const routes = () =>
  listRoutes(createApp({ db: t.db })).filter((r) => r.path.startsWith("/api/") && r.path !== "/api/auth/sign-out");

describe("hostile input never gets a 500 (fast-check over the route table)", () => {
  it("every write route, hostile JSON bodies", async () => {
    const writes = routes().filter((r) => r.method !== "GET");
    expect(writes.length).toBeGreaterThan(50);
    for (const r of writes) {
      await fc.assert(
        fc.asyncProperty(nastyBody, async (body) => {
          judge(
            `${r.method} ${r.path} ${JSON.stringify(body).slice(0, 200)}`,
            await admin.call(r.method, fill(r.path), body),
          );
        }),
        { numRuns: 12 },
      );
      await stillSignedIn();
    }
  }, 900_000);

  it("every read route, hostile query strings (NUL in search text, ?today=9999-99-99, raw invalid UTF-8)", async () => {
    const reads = routes().filter((r) => r.method === "GET");
    for (const r of reads) {
      await fc.assert(
        fc.asyncProperty(nastyQuery, async (q) => {
          judge(`GET ${r.path}?${q}`, await admin.get(`${fill(r.path)}?${q}`));
        }),
        { numRuns: 6, examples: [["q=%00"], ["today=9999-99-99"], ["q=%ED%A0%80"], ["page=2147483648&size=-1"]] },
      );
    }
  }, 900_000);

  it("the examples from the report stay 400 with the field named", async () => {
    const base = `/api/sites/${fx.siteId}`;
    const cases: Array<[string, string, unknown, string]> = [
      ["POST", `${base}/flood-events`, { occurredOn: "2026-13-45", waterType: "salt" }, "occurredOn"],
      ["POST", `${base}/flood-events`, { occurredOn: "0000-01-01", waterType: "salt" }, "occurredOn"],
      ["POST", `${base}/boards`, { name: "Main\u0000board" }, "name"],
      ["POST", `${base}/boards`, { name: "Main \ud800 board" }, "name"],
      ["PATCH", `${base}/defects/${ids.defectId}`, { version: 2147483648, title: "Longer title" }, "version"],
    ];
    for (const [method, path, body, field] of cases) {
      const r = await admin.call(method, path, body);
      expect(r.status, `${method} ${path} ${JSON.stringify(body)}`).toBe(400);
      expect(Object.keys(r.body.error.fields ?? {})).toContain(field);
    }
    const q = await admin.get(`${base}/defects?today=9999-99-99`);
    expect(q.status).toBe(400);
    expect(q.body.error.fields).toHaveProperty("today");
    expect((await admin.get(`${base}/defects?q=verdigris%00`)).status).toBe(400);
  });
});

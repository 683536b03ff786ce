/**
 * Ten CSV exports that are never read must not stall anyone else.
 * The server's pool here has 5 connections (createTestDb), so exports that held one each
 * while waiting on their readers would leave boards, sign-in and health waiting for the
 * pool's 5 s acquire timeout and answering errors. Timings are asserted generously: the
 * check is that the answers are 200, not how fast they came.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import pg from "pg";
import { inject } from "vitest";
import { request } from "node:http";
import { poolOf } from "../../server/db";
import { exportSpoolFiles, runningExports } from "../../server/export-stream";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew, makeUser } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";
import { adminClient, backendsOf, bulkDefects, openDownload, sleep, waitFor, type Download } from "./helpers";

let tdb: TestDb;
let server: TestServer;
let admin: pg.Client;
let fx: Awaited<ReturnType<typeof makeCrew>>;
const WRITE_TIMEOUT_MS = 25_000; // long enough for the checks below on a loaded machine
const saved = { timeout: process.env.EXPORT_WRITE_TIMEOUT_MS, cap: process.env.EXPORTS_PER_PERSON };

beforeAll(async () => {
  process.env.EXPORT_WRITE_TIMEOUT_MS = String(WRITE_TIMEOUT_MS);
  delete process.env.EXPORTS_PER_PERSON; // the default cap of 2
  tdb = await createTestDb();
  fx = await makeCrew(tdb.db);
  await bulkDefects(tdb.db, fx.siteId, 5000); // about 22 MB per export
  server = await startTestServer({ db: tdb.db });
  admin = await adminClient(inject("adminUrl"));
});

afterAll(async () => {
  process.env.EXPORT_WRITE_TIMEOUT_MS = saved.timeout;
  if (saved.cap === undefined) delete process.env.EXPORTS_PER_PERSON;
  else process.env.EXPORTS_PER_PERSON = saved.cap;
  await server?.close();
  await admin?.end();
  await tdb?.drop();
});

async function timed<T>(f: () => Promise<T>) {
  const t = Date.now();
  const value = await f();
  return { value, ms: Date.now() - t };
}

describe("ten CSV exports that are never read", () => {
  it("leave boards, sign-in and health answering for everyone, cap each person at two, and are dropped after the write timeout", async () => {
    const viewers: Client[] = [];
    for (let i = 0; i < 5; i++) {
      const u = await makeUser(tdb.db, { siteId: fx.siteId, role: "viewer" });
      const c = server.client();
      await c.signIn(u.email);
      viewers.push(c);
    }
    const url = `${server.base}/api/sites/${fx.siteId}/defects.csv`;
    const stalled: Download[] = await Promise.all(
      viewers.flatMap((v) => [
        openDownload(url, v.cookie, { paused: true }),
        openDownload(url, v.cookie, { paused: true }),
      ]),
    );
    expect(stalled.map((d) => d.res.statusCode)).toEqual(Array(10).fill(200));

    // A third at once from the same person is refused, with a time to come back.
    const third = await viewers[0].get(`/api/sites/${fx.siteId}/defects.csv`);
    expect(third.status).toBe(429);
    expect(third.body.error.code).toBe("too_many_exports");
    expect(Number(third.headers.get("retry-after"))).toBeGreaterThan(0);

    // Once the exports are blocked on their sockets, none holds a connection.
    let quiet = 0;
    await waitFor(
      "the exports to block on their readers",
      async () => {
        quiet = (await backendsOf(admin, tdb.name, "state <> 'idle'")).length === 0 ? quiet + 1 : 0;
        return quiet >= 3;
      },
      60_000,
      300,
    );
    expect([...runningExports().values()].reduce((a, b) => a + b, 0)).toBe(10);

    // Everyone else is served: the curator's boards and register, a fresh sign-in, health.
    const curator = server.client();
    const signIn = await timed(() =>
      curator.post("/api/auth/sign-in", { email: fx.crew.curator.email, password: "correct-horse-battery" }),
    );
    const boards = await timed(() => curator.get(`/api/sites/${fx.siteId}/boards`));
    const register = await timed(() => curator.get(`/api/sites/${fx.siteId}/defects?size=25`));
    const health = await timed(() => curator.get("/api/health"));
    for (const r of [signIn, boards, register, health]) {
      expect(r.value.status).toBe(200);
      expect(r.ms).toBeLessThan(4500); // generous; the stall this guards against waited out the pool's 5 s
    }
    expect(health.value.body).toEqual({ ok: true, db: "up" });
    expect([...runningExports().values()].reduce((a, b) => a + b, 0)).toBe(10); // still stalled while the others were served

    // Nobody read: after the write timeout the server drops each stalled download and frees its slot
    // (the reader, once it reads again, finds the body cut short).
    await waitFor(
      "the server to drop the stalled downloads",
      async () => runningExports().size === 0,
      WRITE_TIMEOUT_MS + 60_000,
      250,
    );
    await expect(stalled[0].readAll()).rejects.toThrow();
    for (const d of stalled) d.destroy();
    const again = await viewers[0].get(`/api/sites/${fx.siteId}/defects.csv?size=1&q=no-such-defect`);
    expect(again.status).toBe(200);
  });
});

describe("a download whose reader leaves", () => {
  const busyBackends = async () => (await backendsOf(admin, tdb.name, "state <> 'idle'")).length;
  const nothingLeft = async () => {
    await waitFor("the download to end on the server", async () => runningExports().size === 0, 30_000, 100);
    await waitFor("its statement to end", async () => (await busyBackends()) === 0, 30_000, 100);
    const pool = poolOf(tdb.db)!;
    await waitFor("its connection to be back in the pool", async () => pool.totalCount === pool.idleCount);
    expect(exportSpoolFiles()).toEqual([]);
  };

  it("while its file is still being read from the database: the read stops, the connection and the file are let go", async () => {
    const viewer = server.client();
    await viewer.signIn(fx.crew.viewer.email);
    const locker = new pg.Client({ connectionString: tdb.url });
    locker.on("error", () => {});
    await locker.connect();
    await locker.query("BEGIN");
    await locker.query("LOCK TABLE defects IN ACCESS EXCLUSIVE MODE");
    const req = request(`${server.base}/api/sites/${fx.siteId}/defects.csv`, {
      headers: { cookie: viewer.cookie },
      agent: false,
    });
    req.on("error", () => {});
    req.end();
    await waitFor("the export's query to wait on the lock", async () =>
      (await backendsOf(admin, tdb.name, "wait_event_type = 'Lock'")).length ? true : null,
    );
    expect(exportSpoolFiles()).toHaveLength(1);
    req.destroy(); // the reader leaves before a byte was sent
    await sleep(300);
    await locker.query("ROLLBACK");
    await locker.end();
    await nothingLeft();
  });

  it("while its file is being sent: the file is deleted and the slot freed", async () => {
    const viewer = server.client();
    await viewer.signIn(fx.crew.viewer.email);
    const dl = await openDownload(`${server.base}/api/sites/${fx.siteId}/defects.csv`, viewer.cookie, { paused: true });
    expect(dl.res.statusCode).toBe(200);
    expect(Number(dl.res.headers["content-length"])).toBeGreaterThan(20_000_000);
    expect(exportSpoolFiles()).toHaveLength(1);
    dl.destroy();
    await dl.closed;
    await nothingLeft();
  });
});

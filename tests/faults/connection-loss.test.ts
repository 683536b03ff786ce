/**
 * A database connection in use drops (pg_terminate_backend), and the
 * process keeps serving. Runs in the vitest worker: an unhandled 'error' from a pg client
 * would end the worker and fail this file.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import pg from "pg";
import { inject } from "vitest";
import { exportSpoolFiles, runningExports } from "../../server/export-stream";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";
import { adminClient, backendsOf, bulkDefects, openDownload, sleep, terminate, waitFor } from "./helpers";

let tdb: TestDb;
let server: TestServer;
let admin: pg.Client;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;

beforeAll(async () => {
  tdb = await createTestDb();
  fx = await makeCrew(tdb.db);
  server = await startTestServer({ db: tdb.db });
  admin = await adminClient(inject("adminUrl"));
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
});

afterAll(async () => {
  await server?.close();
  await admin?.end();
  await tdb?.drop();
});

const flood = (notes: string) => ({ occurredOn: "2026-11-20", waterType: "salt", notes });

describe("when the backend of an in-flight request is terminated", () => {
  it("that request answers 503 with a clear message, and the next one is served on a fresh connection", async () => {
    const locker = new pg.Client({ connectionString: tdb.url });
    locker.on("error", () => {});
    await locker.connect();
    await locker.query("BEGIN");
    await locker.query("LOCK TABLE flood_events IN ACCESS EXCLUSIVE MODE");
    const pending = curator.post(`/api/sites/${fx.siteId}/flood-events`, flood("terminated while waiting"));
    const pids = await waitFor("the request's backend to wait on the lock", async () => {
      const p = await backendsOf(admin, tdb.name, "wait_event_type = 'Lock'");
      return p.length ? p : null;
    });
    await terminate(admin, pids);
    const r = await pending;
    expect(r.status).toBe(503);
    expect(r.body.error.code).toBe("db_unavailable");
    expect(r.body.error.message).toMatch(/database cannot be reached/i);
    expect(r.headers.get("retry-after")).toBeTruthy();
    await locker.query("ROLLBACK");
    await locker.end();

    expect((await curator.get("/api/health")).body).toEqual({ ok: true, db: "up" });
    const again = await curator.post(`/api/sites/${fx.siteId}/flood-events`, flood("after the drop"));
    expect(again.status).toBe(201);
    const rows = await tdb.db.selectFrom("floodEvents").select("notes").where("siteId", "=", fx.siteId).execute();
    expect(rows.map((x) => x.notes)).toEqual(["after the drop"]);
  });

  it("a transaction whose connection dies between two statements fails alone; the pool reconnects", async () => {
    // pg raises 'error' on a client that holds no running query when its backend goes away;
    // without a listener on every checked-out client, that ends the process.
    await expect(
      tdb.db.transaction().execute(async (trx) => {
        const { rows } = await sql<{ pid: number }>`select pg_backend_pid() as pid`.execute(trx);
        await terminate(admin, [rows[0].pid]);
        await sleep(300); // the FATAL message and the socket's end arrive while no query runs
        await sql`select 1`.execute(trx);
      }),
    ).rejects.toThrow();
    const { rows } = await sql<{ one: number }>`select 1 as one`.execute(tdb.db);
    expect(rows).toEqual([{ one: 1 }]);
  });

  it("every idle connection of the pool terminated at once: the next requests reconnect", async () => {
    await Promise.all([
      curator.get("/api/health"),
      curator.get(`/api/sites/${fx.siteId}/boards`),
      curator.get("/api/health"),
    ]);
    await terminate(admin, await backendsOf(admin, tdb.name));
    await sleep(200);
    const r = await curator.get(`/api/sites/${fx.siteId}/boards`);
    expect(r.status).toBe(200);
  });
});

describe("when the database connection drops during a streaming CSV export", () => {
  let boardId: string;
  beforeAll(async () => {
    boardId = await bulkDefects(tdb.db, fx.siteId, 5000); // about 22 MB of CSV: more than loopback's socket buffers hold
  });

  it("an export waiting on a slow reader holds no connection: its backends can all go, and the file still comes out whole", async () => {
    const url = `${server.base}/api/sites/${fx.siteId}/defects.csv?board=${boardId}`;
    const reference = await (await openDownload(url, curator.cookie)).readAll();
    expect(reference.length).toBeGreaterThan(8_000_000);

    const dl = await openDownload(url, curator.cookie, { paused: true });
    expect(dl.res.statusCode).toBe(200);
    // The server fills the socket buffers, then waits for them to drain: from then on no
    // connection of its pool is in a query or a transaction (sampled until steady).
    let quiet = 0;
    await waitFor(
      "the export to block on the socket",
      async () => {
        quiet = (await backendsOf(admin, tdb.name, "state <> 'idle'")).length === 0 ? quiet + 1 : 0;
        return quiet >= 5;
      },
      60_000,
      300,
    );
    await terminate(admin, await backendsOf(admin, tdb.name));
    const body = await dl.readAll();
    expect(body.equals(reference)).toBe(true);
  });

  it("the export's query killed before its file is complete answers 503, never a short file, leaves no file, and the server serves on", async () => {
    const url = `${server.base}/api/sites/${fx.siteId}/defects.csv?board=${boardId}`;
    const locker = new pg.Client({ connectionString: tdb.url });
    locker.on("error", () => {});
    await locker.connect();
    await locker.query("BEGIN");
    await locker.query("LOCK TABLE defects IN ACCESS EXCLUSIVE MODE");
    // The file is sent only once the database read is over: the answer's headers wait for it.
    const answer = fetch(url, { headers: { cookie: curator.cookie } });
    const pids = await waitFor("the export's query to wait on the lock", async () => {
      const p = await backendsOf(admin, tdb.name, "wait_event_type = 'Lock'");
      return p.length ? p : null;
    });
    await terminate(admin, pids);
    const r = await answer;
    expect(r.status).toBe(503);
    expect(r.headers.get("content-type")).toMatch(/^application\/json/);
    expect(r.headers.get("content-disposition")).toBeNull();
    expect(((await r.json()) as { error: { code: string } }).error.code).toBe("db_unavailable");
    await locker.query("ROLLBACK");
    await locker.end();
    expect(exportSpoolFiles()).toEqual([]);
    await waitFor("the download's slot to be given back", async () => runningExports().size === 0);
    expect((await curator.get("/api/health")).status).toBe(200);
    expect((await curator.get(`/api/sites/${fx.siteId}/defects?board=${boardId}&size=5`)).body.total).toBe(5000);
    // The next download is whole.
    const again = await fetch(url, { headers: { cookie: curator.cookie } });
    expect(again.status).toBe(200);
    expect((await again.arrayBuffer()).byteLength).toBe(Number(again.headers.get("content-length")));
  });
});

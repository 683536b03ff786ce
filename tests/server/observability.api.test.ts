/**
 * Observability: request ids on every response, error body and log line;
 * liveness and readiness probes; Prometheus metrics for admins or a bearer token.
 * The text format is parsed by prom-client's own registry output format (Prometheus
 * exposition format 0.0.4), so the assertions read it as a scraper would.
 */
import { mkdtemp, rm } from "node:fs/promises";
import { request, type IncomingMessage } from "node:http";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Writable } from "node:stream";
import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createLogger, log, requestContext } from "../../server/log";
import { newRequestId } from "../../server/observability/http";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { form, makeBoard, noisyJpeg } from "../helpers/photo-fixtures";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let dir: string;
let storageDown = false;
const lines: Array<Record<string, unknown>> = [];
const as = {} as Record<"admin" | "curator" | "photographer" | "volunteer", Client>;
const TOKEN = "scraper-secret-for-tests";

beforeAll(async () => {
  t = await createTestDb();
  dir = await mkdtemp(join(tmpdir(), "tideline-obs-"));
  const disk = new LocalDiskStorage(dir);
  // The real store, whose readiness probe the test can make fail.
  const storage = Object.assign(Object.create(disk), {
    check: async () => {
      if (storageDown) throw new Error("store unreachable");
      return disk.check();
    },
  });
  const sink = new Writable({
    write(chunk, _enc, cb) {
      for (const l of String(chunk).split("\n").filter(Boolean)) lines.push(JSON.parse(l));
      cb();
    },
  });
  server = await startTestServer({
    db: t.db,
    photoStorage: storage,
    logger: createLogger({ level: "debug" }, sink),
    metricsToken: TOKEN,
  });
  fx = await makeCrew(t.db);
  for (const who of ["admin", "curator", "photographer", "volunteer"] as const) {
    as[who] = server.client();
    await as[who].signIn(fx.crew[who].email);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
  await rm(dir, { recursive: true, force: true });
});

describe("request ids", () => {
  it("every answer carries X-Request-Id, and an error body names the same id", async () => {
    const ok = await as.curator.get(`/api/sites/${fx.siteId}/boards`);
    expect(ok.headers.get("x-request-id")).toMatch(/^[2-9a-z]{12}$/);
    const bad = await as.curator.post(`/api/sites/${fx.siteId}/boards`, { name: "" });
    expect(bad.status).toBe(400);
    expect(bad.body.error.requestId).toBe(bad.headers.get("x-request-id"));
    const missing = await as.curator.get("/api/no-such-route");
    expect(missing.status).toBe(404);
    expect(missing.body.error.requestId).toBe(missing.headers.get("x-request-id"));
    expect(missing.body.error.requestId).not.toBe(bad.body.error.requestId);
  });

  it("a refused host (421) still gets an id", async () => {
    const r = await new Promise<IncomingMessage>((resolve, reject) =>
      request(`${server.base}/api/sites`, { headers: { host: "rebound.example" } }, resolve)
        .on("error", reject)
        .end(),
    );
    r.resume();
    expect(r.statusCode).toBe(421);
    expect(r.headers["x-request-id"]).toMatch(/^[2-9a-z]{12}$/);
  });

  it("an id sent by the client is not taken over unless a trusted proxy sent it (TRUST_PROXY)", async () => {
    const r = await fetch(`${server.base}/api/health/live`, { headers: { "x-request-id": "lb-0123456789" } });
    expect(r.headers.get("x-request-id")).not.toBe("lb-0123456789");
  });

  it("every log line written while a request is answered carries its id, as JSON", async () => {
    lines.length = 0;
    const r = await as.curator.post(`/api/sites/${fx.siteId}/boards`, { name: "" });
    const id = r.headers.get("x-request-id");
    await new Promise((res) => setTimeout(res, 50));
    const mine = lines.filter((l) => l.reqId === id);
    expect(mine.length).toBeGreaterThan(0);
    const done = mine.find((l) => l.status === 400);
    expect(done).toMatchObject({ method: "POST", path: `/api/sites/${fx.siteId}/boards`, level: 40 });
    expect(typeof done!.responseTime).toBe("number");
    expect(JSON.stringify(lines)).not.toContain("tideline_session="); // cookies never reach the log
    // The request and response objects are neither logged nor serialized (no req/res key on any line).
    expect(mine.every((l) => !("req" in l) && !("res" in l))).toBe(true);
  });

  it("request ids use only the 31 readable characters, each of them, and do not repeat", () => {
    const ids = Array.from({ length: 3000 }, () => newRequestId());
    expect(ids.every((id) => /^[23456789abcdefghjkmnpqrstuvwxyz]{12}$/.test(id))).toBe(true);
    expect(new Set(ids).size).toBe(ids.length);
    // 36,000 characters drawn: each of the 31 should appear about 1,161 times; none may be missing or dominate.
    const counts = new Map<string, number>();
    for (const c of ids.join("")) counts.set(c, (counts.get(c) ?? 0) + 1);
    expect(counts.size).toBe(31);
    for (const n of counts.values()) expect(n).toBeGreaterThan(900);
    for (const n of counts.values()) expect(n).toBeLessThan(1450);
  });

  it("API answers carry no ETag (they are no-store; nothing would revalidate it)", async () => {
    const r = await as.curator.get(`/api/sites/${fx.siteId}/boards`);
    expect(r.headers.get("cache-control")).toBe("no-store");
    expect(r.headers.get("etag")).toBeNull();
  });

  it("a line logged by the plain logger inside a request (a service, a job enqueue) gets the request's id too", () => {
    const got: Array<Record<string, unknown>> = [];
    const logger = createLogger({ level: "info" }, { write: (s: string) => void got.push(JSON.parse(s)) });
    requestContext.run({ reqId: "abc234def567" }, () => logger.info("deep in a service"));
    logger.info("outside any request");
    requestContext.run({ reqId: "abc234def567" }, () => logger.child({ reqId: "abc234def567" }).info("bound once"));
    expect(got[0]).toMatchObject({ reqId: "abc234def567", msg: "deep in a service", service: "tideline" });
    expect(got[1].reqId).toBeUndefined();
    // A child that already binds the id does not print it twice (pino would write the key twice).
    expect(JSON.stringify(got[2]).match(/reqId/g)).toHaveLength(1);
    expect(log.level).toBeDefined();
  });
});

describe("health probes", () => {
  it("/api/health/live answers while the process runs; /api/health/ready checks database, migrations, store and queue", async () => {
    const live = await as.curator.get("/api/health/live");
    expect(live).toMatchObject({ status: 200, body: { ok: true } });
    const ready = await fetch(`${server.base}/api/health/ready`);
    expect(ready.status).toBe(200);
    expect(await ready.json()).toEqual({
      ok: true,
      db: "up",
      migrations: "current",
      storage: "up",
      queue: "running",
      pool: "accepting",
    });
  });

  it("a load balancer addressing the instance by IP is answered (no 421 on probes)", async () => {
    const r = await new Promise<IncomingMessage>((resolve, reject) =>
      request(`${server.base}/api/health/ready`, { headers: { host: "10.1.2.3:3000" } }, resolve)
        .on("error", reject)
        .end(),
    );
    r.resume();
    expect(r.statusCode).toBe(200);
  });

  it("health and readiness answer on a connection of their own while every connection of the app's pool is busy", async () => {
    // Twelve statements of 2 s on the app's pool of ten: all ten busy, two waiting.
    const busy = Array.from({ length: 12 }, () => sql`select pg_sleep(2)`.execute(t.db));
    await new Promise((r) => setTimeout(r, 300));
    const a = performance.now();
    const health = await fetch(`${server.base}/api/health`);
    const ready = await fetch(`${server.base}/api/health/ready`);
    const ms = performance.now() - a;
    expect(await health.json()).toEqual({ ok: true, db: "up" });
    expect(ready.status).toBe(200);
    // Through the app's pool both would have waited behind the sleeps (2 s or more).
    expect(ms).toBeLessThan(1500);
    await Promise.all(busy);
  });

  it("when the photo store cannot be reached, ready says which part is down and answers 503; live stays 200", async () => {
    storageDown = true;
    try {
      const r = await fetch(`${server.base}/api/health/ready`);
      expect(r.status).toBe(503);
      expect(await r.json()).toMatchObject({ ok: false, db: "up", storage: "down" });
      expect((await fetch(`${server.base}/api/health/live`)).status).toBe(200);
    } finally {
      storageDown = false;
    }
  });
});

describe("metrics (Prometheus text format)", () => {
  it("only an admin, or a scraper with the bearer token, reads them", async () => {
    expect((await server.client().get("/api/metrics")).status).toBe(401);
    expect((await as.curator.get("/api/metrics")).status).toBe(403);
    const wrong = await fetch(`${server.base}/api/metrics`, { headers: { authorization: "Bearer nope" } });
    expect(wrong.status).toBe(401);
    const scraper = await fetch(`${server.base}/api/metrics`, { headers: { authorization: `Bearer ${TOKEN}` } });
    expect(scraper.status).toBe(200);
    expect(scraper.headers.get("content-type")).toMatch(/^text\/plain; version=0\.0\.4/);
    expect((await as.admin.get("/api/metrics")).status).toBe(200);
  });

  it("count requests and time them by route template (never by concrete id), and show pool, queue and photo processing", async () => {
    const board = await makeBoard(t.db, fx.siteId, ["1-1"]);
    for (let i = 0; i < 3; i++) await as.curator.get(`/api/sites/${fx.siteId}/boards/${board.boardId}`);
    const up = await as.photographer.call(
      "POST",
      `/api/sites/${fx.siteId}/photos`,
      form([{ name: "IMG_1.jpg", data: await noisyJpeg(320, 240) }], { positionId: board.positions["1-1"].id }),
    );
    expect(up.status).toBe(201);
    await server.jobsIdle();
    const text = (await as.admin.get("/api/metrics")).body as string;
    const route = "/api/sites/:siteId/boards/:boardId";
    const count = text.match(
      new RegExp(`^tideline_http_requests_total\\{method="GET",route="${route}",status="200"\\} (\\d+)`, "m"),
    );
    expect(Number(count?.[1])).toBeGreaterThanOrEqual(3);
    expect(text).toMatch(
      new RegExp(
        `^tideline_http_request_duration_seconds_bucket\\{le="0.5",method="GET",route="${route}"\\} \\d+`,
        "m",
      ),
    );
    expect(text).not.toContain(board.boardId); // ids never become labels
    expect(text).toMatch(/^tideline_db_pool_connections\{state="total"\} \d+/m);
    expect(text).toMatch(/^tideline_db_pool_connections\{state="waiting"\} 0/m);
    expect(text).toMatch(/^tideline_jobs\{queue="mail\.send",state="waiting"\} \d+/m);
    expect(text).toMatch(/^tideline_jobs_finished_total\{queue="photo\.renditions",outcome="ok"\} 1/m);
    expect(text).toMatch(/^tideline_photo_processing_seconds_count 1/m);
    expect(text).toMatch(/^tideline_job_worker_running 1/m);
    expect(text).toMatch(/^tideline_process_resident_memory_bytes \d+/m);
  });
});

/**
 * `npm run bench`: Tideline measured from outside, each figure beside a baseline taken
 * in the same run.
 *
 * - A realistic generated site on a scratch database of the test cluster (server/bench/site.ts):
 *   100 boards, 20,000 positions by default (`-- --large`: 200,000; `-- --positions=N`), one photo
 *   row per position, inspections, dispositions, nameplates, defects on ~30 % of positions, pins
 *   and the wanted list.
 * - The server runs as its own process (`server/index.ts`, production mode, the app's pool of
 *   DATABASE_POOL_MAX), so its memory and event loop are its own.
 * - Endpoints: each list and summary endpoint over HTTP (signed in, asking for compression as a browser does, body
 *   read and decompressed in full; bytes on the wire reported) against the
 *   same statements replayed with the bare pg driver (server/bench/replay.ts); per run the p50 of
 *   each, and their ratio; printed as median [min–max] over BENCH_RUNS runs (default 3).
 * - Load: `--clients=N` (BENCH_CLIENTS, default 50) clients on the register (default view, search,
 *   deep page) for BENCH_SECONDS each, with /api/health timed every 50 ms on its own connection,
 *   the server's event-loop delay read from its /api/metrics (prom-client's perf_hooks histogram),
 *   an idle canary process's own delay (the machine's share), and the CPU the server and PostgreSQL
 *   spent per request (/proc); then as many workers replaying the same statements on a pool of the
 *   server's size: requests/s ratio (server/bench/load.ts).
 * - CSV export of every defect against `COPY (the same SELECT) TO STDOUT` through psql, with the
 *   server process's peak RSS growth (VmRSS from /proc, sampled every 10 ms).
 * - Page paint on a phone profile with a 4 × slower CPU (server/bench/paint.ts) against a static page.
 * - Then the condition survey report's case (server/cli/bench-report.ts; BENCH_REPORT=0 skips it),
 *   the board, fleet and photo-ingest cases (bench-board.ts, bench-fleet.ts, bench-ingest.ts; BENCH_BOARD=0,
 *   BENCH_FLEET=0, BENCH_INGEST=0 skip them).
 *
 * Options (environment): BENCH_RUNS, BENCH_N (timed requests per case per run, default 15),
 * BENCH_CLIENTS, BENCH_SECONDS (default 8), BENCH_ENDPOINTS=0 (no endpoint or load case) or =load (the load case
 * alone), BENCH_CASES=<regular expression> (only the endpoint cases whose label it matches, e.g. "one board"),
 * BENCH_CSV=0, BENCH_PAINT=0, BENCH_REPORT=0, BENCH_KEEP=1 (keep the scratch database), BENCH_DATABASE=<kept
 * name> (measure it again without generating), BENCH_PROFILE=1 (the server writes a V8 CPU profile to
 * .data/bench-profile/ when it stops; open it in chromium's DevTools).
 * A script, not a test: `npm test` never runs it.
 */
import "../bench/quiet";
import { spawn, spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { readFileSync } from "node:fs";
import type { AddressInfo } from "node:net";
import { createServer } from "node:net";
import { cpus, totalmem } from "node:os";
import { join } from "node:path";
import { Agent, request } from "node:http";
import { monitorEventLoopDelay } from "node:perf_hooks";
import { brotliDecompressSync, gunzipSync, inflateSync } from "node:zlib";
import pg from "pg";
import { openLocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";
import { ensureDatabase, pgBin, projectRoot } from "../../db/pg";
import { createApp } from "../app";
import { appPoolMax, createDb, MAINTENANCE_DB_OPTIONS } from "../db";
import { CSV_COLUMNS, inlineParameters } from "../defects/csv";
import { applySort, registerBase } from "../defects/list-repository";
import {
  FLOOR_PAGE,
  measurePaint,
  openBrowser,
  STATIC_PAGE,
  writeFloorPage,
  writeStaticPage,
  type PaintFigures,
} from "../bench/paint";
import { EVENT_LOOP_RESOLUTION_MS } from "../observability/metrics";
import {
  clusterCpu,
  cpuBetween,
  cpuSecondsOf,
  eventLoopDelay,
  parentOf,
  startCanary,
  startHealthProber,
} from "../bench/load";
import type { FloorPath } from "../bench/floor-server";
import { capturingDb, planReplay, replay, type Replay } from "../bench/replay";
import { BENCH_PASSWORD, describeSite, generateSite, type BenchSite } from "../bench/site";
import { median, percentile, spread, table } from "../bench/stats";
import { BOARD_LATER_PAGE, BOARD_PAGE } from "../../src/schemas/inventory";
import { buildClient } from "./prepare";
import { startFloor } from "../bench/floor";
import { benchBoard } from "./bench-board";
import { benchFleet } from "./bench-fleet";
import { benchIngest } from "./bench-ingest";
import { benchReport } from "./bench-report";

const arg = (name: string) => process.argv.find((a) => a === `--${name}` || a.startsWith(`--${name}=`));
const POSITIONS = arg("positions")
  ? Number(arg("positions")!.split("=")[1])
  : arg("large")
    ? 200_000
    : Number(process.env.BENCH_POSITIONS ?? 20_000);
const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const N = Number(process.env.BENCH_N ?? 15);
/** Concurrent clients of the load phase: `-- --clients=N`, else BENCH_CLIENTS, else 50 (the issue's figure). */
const CLIENTS = arg("clients") ? Number(arg("clients")!.split("=")[1]) : Number(process.env.BENCH_CLIENTS ?? 50);
/** The server process's metrics token: the load phase reads its event-loop delay from /api/metrics. */
const METRICS_TOKEN = randomBytes(16).toString("hex");
const SECONDS = Number(process.env.BENCH_SECONDS ?? 8);
const TODAY = "2027-02-01";

const say = (s: string) => console.log(s);

async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, "127.0.0.1", () => r()));
  const port = (s.address() as AddressInfo).port;
  await new Promise((r) => s.close(r));
  return port;
}

/** The server as its own process, as `npm start` runs it after set-up. */
async function startServer(url: string) {
  const port = await freePort();
  const child = spawn(
    process.execPath,
    [
      ...(process.env.BENCH_PROFILE
        ? ["--cpu-prof", `--cpu-prof-dir=${join(projectRoot, ".data", "bench-profile")}`]
        : []),
      "--import",
      "tsx",
      "server/index.ts",
    ],
    {
      cwd: projectRoot,
      env: {
        ...process.env,
        DATABASE_URL: url,
        PORT: String(port),
        NODE_ENV: "production",
        TIDELINE_WORKER: "off",
        SMTP_PORT: String(await freePort()),
        PHOTO_DIR: join(projectRoot, ".data", "photos-bench"),
        LOG_LEVEL: "warn",
        METRICS_TOKEN,
      },
      stdio: ["ignore", "pipe", "pipe"],
    },
  );
  let out = "";
  const keep = (d: Buffer) => (out = (out + d.toString()).slice(-20_000));
  child.stdout!.on("data", keep);
  child.stderr!.on("data", keep);
  let stopping = false;
  child.once("exit", (code, signal) => {
    if (!stopping)
      console.error(`\n!! the server process exited (code ${code}, signal ${signal}); its last output:\n${out}`);
  });
  const base = `http://127.0.0.1:${port}`;
  for (let i = 0; ; i++) {
    if (child.exitCode !== null) throw new Error(`the server exited: ${out}`);
    const ok = await fetch(`${base}/api/health`)
      .then((r) => r.ok)
      .catch(() => false);
    if (ok) break;
    if (i > 300) throw new Error(`the server did not answer /api/health: ${out}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  return {
    child,
    base,
    stop: async () => {
      stopping = true;
      if (child.exitCode !== null || child.signalCode !== null) return;
      child.kill("SIGTERM");
      await new Promise((r) => child.once("exit", r));
    },
  };
}

function rssOf(pid: number): number {
  try {
    const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Number(m[1]) * 1024 : NaN;
  } catch {
    return NaN; // the process is gone; its exit is reported by startServer's listener
  }
}

async function signIn(base: string, email: string) {
  const r = await fetch(`${base}/api/auth/sign-in`, {
    method: "POST",
    headers: { "content-type": "application/json", origin: base },
    body: JSON.stringify({ email, password: BENCH_PASSWORD }),
  });
  if (!r.ok) throw new Error(`sign-in answered ${r.status}`);
  return r.headers.getSetCookie()[0].split(";")[0];
}

interface Case {
  label: string;
  path: string;
  /** Read one after the other as one case (a board page by page); `path` is the first of them. */
  paths?: string[];
  group: "register" | "summary";
  plan?: Replay;
  bytes?: number;
  /** Bytes on the wire and the encoding the server chose, from the measured server's last answer. */
  wire?: number;
  encoding?: string;
}

/**
 * The paths of the largest board read page by page to its end, as the client reads it: the first page with the
 * board (its default size), then each page after the key the one before gave (`tiles?after=…`, the client's size).
 */
async function boardPagePaths(base: string, cookie: string, site: BenchSite) {
  const at = `/api/sites/${site.siteId}/boards/${site.largestBoard.id}`;
  const paths = [at];
  for (;;) {
    const path = paths[paths.length - 1];
    const r = await fetch(`${base}${path}`, { headers: { cookie } });
    if (!r.ok) throw new Error(`${path} answered ${r.status}`);
    const { next } = (await r.json()) as { next: string | null };
    if (!next) return paths;
    paths.push(`${at}/tiles?after=${encodeURIComponent(next)}&size=${BOARD_LATER_PAGE}`);
  }
}

function cases(site: BenchSite, deepPage: number, boardPages: string[]): Case[] {
  const s = `/api/sites/${site.siteId}`;
  return [
    { group: "register", label: "register: ranked (default)", path: `${s}/defects?today=${TODAY}` },
    { group: "register", label: "register: by due date", path: `${s}/defects?sort=dueOn&dir=asc&today=${TODAY}` },
    {
      group: "register",
      label: "register: raised+scheduled, disabling",
      path: `${s}/defects?status=raised&status=scheduled&severity=disabling&today=${TODAY}`,
    },
    { group: "register", label: "register: search 'verdigris'", path: `${s}/defects?q=verdigris&today=${TODAY}` },
    {
      group: "register",
      label: `register: page ${deepPage} by title`,
      path: `${s}/defects?sort=title&page=${deepPage}&today=${TODAY}`,
    },
    { group: "summary", label: "overview", path: `${s}/overview` },
    { group: "summary", label: "board list", path: `${s}/boards` },
    // What a person waits for on opening the largest board: its head and first page of tiles…
    {
      group: "summary",
      label: `one board: first page (${Math.min(BOARD_PAGE, site.largestBoard.positions)} of ${site.largestBoard.positions} positions)`,
      path: boardPages[0],
    },
    // …and, so that figure misleads nobody, the whole board read page by page to the end, one request after another.
    {
      group: "summary",
      label: `one board: all ${site.largestBoard.positions} positions, ${boardPages.length === 1 ? "1 page" : `${boardPages.length} pages in turn`}`,
      path: boardPages[0],
      paths: boardPages,
    },
    { group: "summary", label: "wanted list, first page", path: `${s}/parts` },
    // Where a photo can be filed: the boards (what the photo pages read first), and one board's positions.
    { group: "summary", label: "photo targets: the boards", path: `${s}/photo-targets` },
    {
      group: "summary",
      label: `photo targets: one board (${site.largestBoard.positions} positions)`,
      path: `${s}/boards/${site.largestBoard.id}/photo-targets`,
    },
  ];
}

const keepAlive = new Agent({ keepAlive: true, maxSockets: 1 });
/** The bare-HTTP side's client: a kept-alive connection of its own, as the endpoint's. */
const floorAgent = new Agent({ keepAlive: true, maxSockets: 1 });

/**
 * Every request of the bench asks for compression as a browser does (a browser always sends Accept-Encoding), so
 * the endpoint and load cases carry the server's compression and the client's decompression, and count the bytes
 * that crossed the wire beside the JSON's own.
 */
const ACCEPT_ENCODING = "gzip, deflate, br";

/**
 * Decodes a body sent with a Content-Encoding the bench asked for (an answer sent as it is comes back as it is), in
 * one call once the body is whole. The decoding's CPU is the client's and is charged to the endpoint, as a browser's
 * is; a decompression stream would also charge a round trip to this process's thread pool per chunk, which a
 * browser, decoding on its network thread as the bytes arrive, does not wait for (measured in DEVELOPERS.md "Whole
 * answers compressed in one call").
 */
function decode(encoding: string, body: Buffer): Buffer {
  if (encoding === "br") return brotliDecompressSync(body);
  if (encoding === "gzip") return gunzipSync(body);
  if (encoding === "deflate") return inflateSync(body);
  return body;
}

interface Got {
  ms: number;
  /** The body's own bytes (after decompression). */
  bytes: number;
  /** The bytes that crossed the wire (the body as sent, compressed or not; headers not counted). */
  wire: number;
  /** The Content-Encoding the server chose ("identity" when none). */
  encoding: string;
  /** The body, decoded. */
  body?: Buffer;
}

/**
 * GET with node:http on a keep-alive agent (one connection per agent = one client); the body is read whole and
 * decompressed, and the time runs until it is decoded, as a browser's fetch resolves its JSON.
 */
function timedGet(base: string, path: string, cookie: string | null, agent: Agent = keepAlive) {
  const a = performance.now();
  return new Promise<Got>((resolve, reject) => {
    const headers: Record<string, string> = { "accept-encoding": ACCEPT_ENCODING };
    if (cookie) headers.cookie = cookie;
    const req = request(`${base}${path}`, { agent, headers }, (res) => {
      const encoding = String(res.headers["content-encoding"] ?? "identity");
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("error", reject);
      res.on("end", () => {
        const sent = Buffer.concat(chunks);
        let body: Buffer;
        try {
          body = decode(encoding, sent);
        } catch (e) {
          return reject(e);
        }
        if (res.statusCode === 200)
          resolve({ ms: performance.now() - a, bytes: body.length, wire: sent.length, encoding, body });
        else reject(new Error(`${path} answered ${res.statusCode}: ${body.toString().slice(0, 200)}`));
      });
    });
    req.on("error", reject);
    req.end();
  });
}

/** A case's GET, or its GETs one after the other: their time and bytes summed (the last answer's encoding). */
async function timedCase(base: string, c: Case, cookie: string | null, agent: Agent = keepAlive): Promise<Got> {
  const sum: Got = { ms: 0, bytes: 0, wire: 0, encoding: "identity" };
  for (const path of c.paths ?? [c.path]) {
    const r = await timedGet(base, path, cookie, agent);
    sum.ms += r.ms;
    sum.bytes += r.bytes;
    sum.wire += r.wire;
    sum.encoding = r.encoding;
  }
  return sum;
}

async function main() {
  say(
    `Tideline bench — ${new Date().toISOString().slice(0, 16)}Z, ${cpus().length} × ${cpus()[0]?.model.trim()}, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}`,
  );
  say(`(the machine is shared: other processes ran beside this one; read the ratios, which are taken side by side)`);
  const local = await openLocalDatabase("test", "postgres");
  const reuse = process.env.BENCH_DATABASE;
  const name = reuse ?? `tideline_bench_${randomBytes(4).toString("hex")}`;
  // Measured as the app runs: through its own role, which owns the database (a kept one is handed over).
  await ensureDatabase(local.adminUrl, name, { fresh: !reuse, owner: local.appRole });
  const url = local.url.replace(/\/postgres$/, `/${name}`);
  const setup = createDb(url, { ...MAINTENANCE_DB_OPTIONS, max: 4 });
  // The server's pool (DATABASE_POOL_MAX, else its default for this database): the raw side runs on as many.
  const POOL = appPoolMax(url);
  const raw = new pg.Pool({ connectionString: url, max: POOL });
  let server: Awaited<ReturnType<typeof startServer>> | undefined;
  let stopFloor: (() => Promise<void>) | undefined;
  let removeStatic = () => {};
  let generated = false;
  let failed = true;
  try {
    await migrateToLatest(setup);
    let site: BenchSite;
    if (reuse) {
      site = await describeSite(setup);
      say(`\nReusing the generated site in ${name} (BENCH_DATABASE)`);
    } else {
      say(`\nGenerating a site of ${POSITIONS.toLocaleString("en")} positions on ${name}…`);
      site = await generateSite(setup, POSITIONS, say);
      generated = true;
    }
    say(
      `seeded in ${(site.seedMs / 1000).toFixed(1)} s: ${Object.entries(site.counts)
        .map(([k, v]) => `${v.toLocaleString("en")} ${k.replace(/_/g, " ")}`)
        .join(", ")}`,
    );
    const clientDir = buildClient();
    removeStatic = writeStaticPage(clientDir);
    if (process.env.BENCH_PAINT !== "0") {
      // The client floor (React and React Router alone) beside the static page, removed with it.
      const removeStaticPage = removeStatic;
      const removeFloorPage = await writeFloorPage(clientDir);
      removeStatic = () => {
        removeStaticPage();
        removeFloorPage();
      };
    }
    server = await startServer(url);
    const { child, base } = server;
    const cookie = await signIn(base, site.curatorEmail);

    const defects = site.counts.defects;
    // BENCH_ENDPOINTS=0 skips the endpoint and load cases (to re-measure the CSV alone on a kept database);
    // BENCH_ENDPOINTS=load skips the endpoints' timing and keeps the load case (its statements are still captured).
    if (process.env.BENCH_ENDPOINTS !== "0") {
      // Capture each endpoint's statements on an in-process copy of the app (same database, same session).
      const capture = capturingDb(url);
      const capAgent = new Agent({ keepAlive: false });
      const app = createApp({ db: capture.db }).listen(0, "127.0.0.1");
      await new Promise((r) => app.once("listening", r));
      const capBase = `http://127.0.0.1:${(app.address() as AddressInfo).port}`;
      app.requestTimeout = 0; // a slow endpoint on a very large site is measured, never cut off
      app.headersTimeout = 0;
      // BENCH_CASES=<regular expression> keeps the endpoint cases whose label it matches (e.g. "one board");
      // the load case then runs only if its register cases are among them.
      const only = process.env.BENCH_CASES ? new RegExp(process.env.BENCH_CASES, "i") : null;
      const all = cases(
        site,
        Math.max(1, Math.floor(defects / 25) - 5),
        await boardPagePaths(base, cookie, site),
      ).filter((c) => !only || only.test(c.label));
      const skipped: string[] = [];
      for (const c of all) {
        // A case that fails here (twice) is reported and left out; the others are still measured.
        for (let attempt = 1; !c.plan; attempt++) {
          try {
            await timedCase(capBase, c, cookie, capAgent); // warm (plans, caches)
            capture.take();
            c.bytes = (await timedCase(capBase, c, cookie, capAgent)).bytes;
            c.plan = planReplay(capture.take());
          } catch (e) {
            say(`  capture of "${c.label}" failed (attempt ${attempt}): ${(e as Error).message}`);
            if (attempt >= 2) {
              skipped.push(c.label);
              break;
            }
          }
        }
      }
      const list = all.filter((c) => c.plan);
      if (skipped.length) say(`  left out (capture failed): ${skipped.join(", ")}`);
      // The bare-HTTP side needs each path's own statements and answer (a case read page by page has several).
      const floorPaths: Record<string, FloorPath> = {};
      if (process.env.BENCH_FLOOR !== "0")
        for (const c of list)
          for (const path of c.paths ?? [c.path]) {
            capture.take();
            const got = await timedGet(capBase, path, cookie, capAgent);
            floorPaths[path] = { plan: planReplay(capture.take()), body: got.body!.toString("utf8") };
          }
      app.closeAllConnections();
      app.close();
      await capture.close();
      const floor = Object.keys(floorPaths).length ? await startFloor(url, floorPaths, POOL) : null;
      stopFloor = floor?.stop;

      // 1. Endpoints against their statements replayed raw.
      const perCase = new Map<
        string,
        { http: number[]; raw: number[]; ratio: number[]; bare: number[]; bareRatio: number[]; over: number[] }
      >();
      for (const c of list) perCase.set(c.label, { http: [], raw: [], ratio: [], bare: [], bareRatio: [], over: [] });
      const timeEndpoints = process.env.BENCH_ENDPOINTS !== "load";
      for (let run = 0; timeEndpoints && run < RUNS; run++) {
        for (const c of list) {
          const http: number[] = [];
          const rawMs: number[] = [];
          const bareMs: number[] = [];
          try {
            for (let i = 0; i < N + 2; i++) {
              const h = await timedCase(base, c, cookie);
              c.wire = h.wire;
              c.encoding = h.encoding;
              const b = floor ? (await timedCase(floor.base, c, null, floorAgent)).ms : NaN;
              const a = performance.now();
              await replay(raw, c.plan!);
              const r = performance.now() - a;
              if (i >= 2) {
                http.push(h.ms);
                rawMs.push(r);
                bareMs.push(b);
              }
            }
          } catch (e) {
            say(`  "${c.label}" failed in run ${run + 1}: ${(e as Error).message} (this run left out)`);
            continue;
          }
          const f = perCase.get(c.label)!;
          f.http.push(median(http));
          f.raw.push(median(rawMs));
          f.ratio.push(median(http) / median(rawMs));
          f.bare.push(median(bareMs));
          f.bareRatio.push(median(bareMs) / median(rawMs));
          f.over.push(median(http) / median(bareMs));
        }
      }
      if (timeEndpoints) {
        say(
          `\n1. Endpoints vs the same statements replayed raw (pg) — p50 per run of ${N} requests; median [min–max] over ${RUNS} runs; every request sends Accept-Encoding: ${ACCEPT_ENCODING} as a browser does, times the body read and decompressed whole; "wire kB" is the body as sent and the encoding the server chose`,
        );
        say(
          table(
            ["endpoint", "stmts", "JSON kB", "wire kB", "endpoint p50 ms", "raw SQL p50 ms", "ratio"],
            list.map((c) => {
              const f = perCase.get(c.label)!;
              return [
                c.label,
                String(c.plan!.count),
                (c.bytes! / 1024).toFixed(0),
                c.wire === undefined ? "–" : `${(c.wire / 1024).toFixed(1)} ${c.encoding}`,
                spread(f.http),
                spread(f.raw),
                spread(f.ratio, 2),
              ];
            }),
          ),
        );
        if (floor) {
          say(
            `\n1b. The same statements and answers over bare HTTP (server/bench/floor-server.ts: node:http alone, the statements replayed with bare pg, the endpoint's answer stringified and compressed as the server does; no Express, session logic, logging or validation), timed in the same loop: what HTTP on Node costs at the least, and what Tideline adds on top`,
          );
          say(
            table(
              ["endpoint", "bare HTTP p50 ms", "bare HTTP ÷ raw", "endpoint ÷ bare HTTP"],
              list.map((c) => {
                const f = perCase.get(c.label)!;
                return [c.label, spread(f.bare), spread(f.bareRatio, 2), spread(f.over, 2)];
              }),
            ),
          );
        }
      }

      // 2. Concurrency on the register (default view, search, deep page in turn), with /api/health timed
      // throughout on a connection of its own, the server's event-loop delay from its own metrics, a canary's, and
      // the CPU the server and PostgreSQL spent; then as many workers replaying the same statements raw on a pool
      // of the server's size. The order of the two halves alternates run by run, so a change in the machine's
      // load meets both.
      const reg = list.filter((c) => /ranked \(default\)|search|by title/.test(c.label));
      if (reg.length) await loadCase(reg, floor ?? undefined);
    }
    async function loadCase(reg: Case[], bare?: { base: string; pid: number }) {
      const pgPid = (await raw.query<{ pid: number }>("select pg_backend_pid() as pid")).rows[0].pid;
      const postmaster = parentOf(pgPid);
      const f2 = {
        rps: [] as number[],
        rawRps: [] as number[],
        ratio: [] as number[],
        errors: [] as number[],
        p95: [] as number[],
        rawP95: [] as number[],
        hp50: [] as number[],
        hp95: [] as number[],
        hmax: [] as number[],
        lp50: [] as number[],
        lp95: [] as number[],
        eldP99: [] as number[],
        eldMax: [] as number[],
        canaryP99: [] as number[],
        canaryMax: [] as number[],
        serverCpu: [] as number[],
        serverCores: [] as number[],
        pgCpuHttp: [] as number[],
        pgCpuRaw: [] as number[],
        hp95InProc: [] as number[],
        benchCpuHttp: [] as number[],
        benchCpuRaw: [] as number[],
        benchEldMax: [] as number[],
        bareRps: [] as number[],
        bareRatio: [] as number[],
        bareCpu: [] as number[],
        pgCpuBare: [] as number[],
        benchCpuBare: [] as number[],
      };
      const errorKinds = new Map<string, number>();
      const httpHalf = async () => {
        const agents = Array.from({ length: CLIENTS }, () => new Agent({ keepAlive: true, maxSockets: 1 }));
        await eventLoopDelay(base, METRICS_TOKEN); // resets the server's histogram
        const canary = startCanary();
        const cpu0 = cpuSecondsOf(child.pid!);
        const pg0 = clusterCpu(postmaster);
        const until = performance.now() + SECONDS * 1000;
        let done = 0;
        let errors = 0;
        const lat: number[] = [];
        const hl: number[] = [];
        // /api/health is timed from a process of its own: timed in this one, its answer also waited for this
        // process's event loop to read it among the 50 clients' answers. BENCH_HEALTH_INPROC=1 also times it here,
        // as the bench did before 2026-12-03 17:50 UTC, to show the difference.
        const prober = startHealthProber(base, 50, ["/api/health", "/api/health/live"]);
        const hlIn: number[] = [];
        const healthAgent = new Agent({ keepAlive: true, maxSockets: 1 });
        const inProc = (async () => {
          while (process.env.BENCH_HEALTH_INPROC === "1" && performance.now() < until) {
            const a = performance.now();
            await timedGet(base, "/api/health", null, healthAgent).catch(() => undefined);
            hlIn.push(performance.now() - a);
            await new Promise((r) => setTimeout(r, 50));
          }
        })();
        // What the load generator itself costs: its CPU and its own event loop's delay.
        const benchLoop = monitorEventLoopDelay({ resolution: EVENT_LOOP_RESOLUTION_MS });
        benchLoop.enable();
        const benchCpu0 = process.cpuUsage();
        const t0 = performance.now();
        await Promise.all(
          Array.from({ length: CLIENTS }, async (_, k) => {
            for (let i = k; performance.now() < until; i++) {
              try {
                lat.push((await timedGet(base, reg[i % reg.length].path, cookie, agents[k])).ms);
                done++;
              } catch (e) {
                errors++;
                const kind = (e as Error).message.replace(/^\S+ /, "").slice(0, 220); // status and the body's first 200 characters
                errorKinds.set(kind, (errorKinds.get(kind) ?? 0) + 1);
              }
            }
          }),
        );
        const secs = (performance.now() - t0) / 1000;
        const benchCpu = process.cpuUsage(benchCpu0);
        benchLoop.disable();
        const [probed, live] = await prober.stop();
        hl.push(...probed);
        await inProc;
        const cpu = cpuSecondsOf(child.pid!) - cpu0;
        const pgCpu = cpuBetween(pg0, clusterCpu(postmaster));
        const e = await eventLoopDelay(base, METRICS_TOKEN);
        const c = await canary.stop();
        for (const ag of agents) ag.destroy();
        healthAgent.destroy();
        f2.rps.push(done / secs);
        f2.errors.push(errors);
        f2.p95.push(percentile(lat, 95));
        f2.hp50.push(percentile(hl, 50));
        f2.hp95.push(percentile(hl, 95));
        f2.hmax.push(Math.max(...hl));
        f2.lp50.push(percentile(live, 50));
        f2.lp95.push(percentile(live, 95));
        f2.eldP99.push(e.p99);
        f2.eldMax.push(e.max);
        f2.canaryP99.push(c.p99);
        f2.canaryMax.push(c.max);
        f2.serverCpu.push((cpu * 1000) / Math.max(1, done));
        f2.serverCores.push(cpu / secs);
        f2.pgCpuHttp.push((pgCpu * 1000) / Math.max(1, done));
        f2.benchCpuHttp.push((benchCpu.user + benchCpu.system) / 1000 / Math.max(1, done));
        f2.benchEldMax.push(Math.max(0, benchLoop.max / 1e6 - EVENT_LOOP_RESOLUTION_MS));
        if (hlIn.length) f2.hp95InProc.push(percentile(hlIn, 95));
      };
      const rawHalf = async () => {
        let rawDone = 0;
        const rawLat: number[] = [];
        const pg0 = clusterCpu(postmaster);
        const rawUntil = performance.now() + SECONDS * 1000;
        const benchCpu0 = process.cpuUsage();
        const r0 = performance.now();
        await Promise.all(
          Array.from({ length: CLIENTS }, async (_, k) => {
            for (let i = k; performance.now() < rawUntil; i++) {
              const a = performance.now();
              await replay(raw, reg[i % reg.length].plan!);
              rawLat.push(performance.now() - a);
              rawDone++;
            }
          }),
        );
        f2.rawRps.push(rawDone / ((performance.now() - r0) / 1000));
        f2.rawP95.push(percentile(rawLat, 95));
        f2.pgCpuRaw.push((cpuBetween(pg0, clusterCpu(postmaster)) * 1000) / Math.max(1, rawDone));
        const benchCpu = process.cpuUsage(benchCpu0);
        f2.benchCpuRaw.push((benchCpu.user + benchCpu.system) / 1000 / Math.max(1, rawDone));
      };
      // The same clients against the bare-HTTP side (the statements on bare pg, the answers by node:http alone).
      const bareHalf = async () => {
        if (!bare) return;
        const agents = Array.from({ length: CLIENTS }, () => new Agent({ keepAlive: true, maxSockets: 1 }));
        const cpu0 = cpuSecondsOf(bare.pid);
        const pg0 = clusterCpu(postmaster);
        const benchCpu0 = process.cpuUsage();
        let bareDone = 0;
        const until = performance.now() + SECONDS * 1000;
        const b0 = performance.now();
        await Promise.all(
          Array.from({ length: CLIENTS }, async (_, k) => {
            for (let i = k; performance.now() < until; i++) {
              await timedGet(bare.base, reg[i % reg.length].path, null, agents[k]);
              bareDone++;
            }
          }),
        );
        for (const ag of agents) ag.destroy();
        f2.bareRps.push(bareDone / ((performance.now() - b0) / 1000));
        f2.bareCpu.push(((cpuSecondsOf(bare.pid) - cpu0) * 1000) / Math.max(1, bareDone));
        f2.pgCpuBare.push((cpuBetween(pg0, clusterCpu(postmaster)) * 1000) / Math.max(1, bareDone));
        const benchCpu = process.cpuUsage(benchCpu0);
        f2.benchCpuBare.push((benchCpu.user + benchCpu.system) / 1000 / Math.max(1, bareDone));
      };
      for (let run = 0; run < RUNS; run++) {
        if (run % 2 === 0) {
          await httpHalf();
          await rawHalf();
          await bareHalf();
        } else {
          await bareHalf();
          await rawHalf();
          await httpHalf();
        }
        f2.ratio.push(f2.rps[run] / f2.rawRps[run]);
        if (bare) f2.bareRatio.push(f2.bareRps[run] / f2.rawRps[run]);
      }
      say(
        `\n2. ${CLIENTS} clients on the register (${reg.map((c) => c.label.replace("register: ", "")).join(", ")} in turn) for ${SECONDS} s; raw = ${CLIENTS} workers replaying the same statements on a pool of ${POOL} (the server's pool: DATABASE_POOL_MAX, else its default); median [min–max] over ${RUNS} runs`,
      );
      say(
        table(
          ["figure", "median [min–max]"],
          [
            ["requests/s over HTTP", spread(f2.rps)],
            ["requests/s raw SQL", spread(f2.rawRps)],
            ["ratio HTTP / raw (target ≥ 0.8)", spread(f2.ratio, 2)],
            ...(bare
              ? [
                  ["requests/s over bare HTTP (1b's side)", spread(f2.bareRps)],
                  ["ratio bare HTTP / raw", spread(f2.bareRatio, 2)],
                ]
              : []),
            ["errors (target 0)", spread(f2.errors, 0)],
            ["register p95 ms (HTTP)", spread(f2.p95)],
            ["register p95 ms (raw)", spread(f2.rawP95)],
            ["/api/health p50 ms", spread(f2.hp50)],
            ["/api/health p95 ms (target < 100)", spread(f2.hp95)],
            ["/api/health max ms", spread(f2.hmax)],
            ["/api/health/live p50 ms (the process alone, no database)", spread(f2.lp50)],
            ["/api/health/live p95 ms", spread(f2.lp95)],
            [`server event-loop delay beyond its ${EVENT_LOOP_RESOLUTION_MS} ms resolution, p99 ms`, spread(f2.eldP99)],
            ["server event-loop delay beyond resolution, max ms (target ≤ 50)", spread(f2.eldMax)],
            ["idle canary's delay beyond resolution, p99 ms", spread(f2.canaryP99)],
            ["idle canary's delay beyond resolution, max ms", spread(f2.canaryMax)],
            ["server CPU ms per request", spread(f2.serverCpu, 2)],
            ...(bare ? [["bare HTTP side's CPU ms per request", spread(f2.bareCpu, 2)]] : []),
            ["server CPU used, cores (1 = its one thread busy)", spread(f2.serverCores, 2)],
            ["PostgreSQL CPU ms per request (HTTP)", spread(f2.pgCpuHttp, 2)],
            ["PostgreSQL CPU ms per request (raw)", spread(f2.pgCpuRaw, 2)],
            ...(bare ? [["PostgreSQL CPU ms per request (bare HTTP)", spread(f2.pgCpuBare, 2)]] : []),
            ["load generator's (this process's) CPU ms per request (HTTP)", spread(f2.benchCpuHttp, 2)],
            ["load generator's (this process's) CPU ms per request (raw)", spread(f2.benchCpuRaw, 2)],
            ...(bare
              ? [["load generator's (this process's) CPU ms per request (bare HTTP)", spread(f2.benchCpuBare, 2)]]
              : []),
            ["load generator's own event-loop delay beyond resolution, max ms (HTTP)", spread(f2.benchEldMax)],
            ...(f2.hp95InProc.length
              ? [["/api/health p95 ms timed in the load generator's process", spread(f2.hp95InProc)]]
              : []),
          ],
        ),
      );
      if (errorKinds.size) say(`  errors: ${[...errorKinds].map(([k, n]) => `${n} × ${k}`).join("; ")}`);
    }
    // BENCH_CSV=0 skips it.
    if (process.env.BENCH_CSV !== "0") {
      // 3. CSV export of every defect vs COPY of the same SELECT.
      // The export's own columns and order: COPY writes the same rows the CSV holds (it once selected every
      // register column, ids included: 30 MB against the export's 13).
      const compiled = applySort(registerBase(setup, site.siteId).select(CSV_COLUMNS), "priority", "desc").compile();
      const copySql = `COPY (${inlineParameters(compiled.sql, compiled.parameters)}) TO STDOUT WITH (FORMAT csv, HEADER)`;
      const csv = {
        secs: [] as number[],
        copy: [] as number[],
        ratio: [] as number[],
        mb: [] as number[],
        rss: [] as number[],
      };
      for (let run = 0; run < RUNS; run++) {
        const pid = child.pid!;
        const rss0 = rssOf(pid);
        let peak = rss0;
        const sampler = setInterval(() => (peak = Math.max(peak, rssOf(pid))), 10);
        const a = performance.now();
        const res = await fetch(`${base}/api/sites/${site.siteId}/defects.csv?sort=priority`, { headers: { cookie } });
        if (res.status !== 200) throw new Error(`the CSV export answered ${res.status}: ${await res.text()}`);
        let bytes = 0;
        for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) bytes += chunk.length;
        const secs = (performance.now() - a) / 1000;
        clearInterval(sampler);
        const b = performance.now();
        const psql = spawnSync(join(pgBin(), "psql"), [url, "-X", "-q", "-c", copySql], {
          maxBuffer: 1 << 30,
          encoding: "buffer",
        });
        if (psql.status !== 0) throw new Error(`COPY failed: ${psql.stderr}`);
        const copySecs = (performance.now() - b) / 1000;
        csv.secs.push(secs);
        csv.copy.push(copySecs);
        csv.ratio.push(secs / copySecs);
        csv.mb.push(bytes / 1e6);
        csv.rss.push((peak - rss0) / 1e6);
      }
      say(
        `\n3. CSV export of all ${defects.toLocaleString("en")} defects vs COPY (same SELECT) TO STDOUT through psql`,
      );
      say(
        table(
          ["figure", "median [min–max]"],
          [
            ["export s", spread(csv.secs, 2)],
            ["COPY s", spread(csv.copy, 2)],
            ["ratio export / COPY", spread(csv.ratio, 2)],
            ["export MB", spread(csv.mb, 2)],
            ["server peak RSS growth MB", spread(csv.rss)],
          ],
        ),
      );
    }
    // 4. Page paint on a phone with a 4 × slower CPU.
    if (process.env.BENCH_PAINT !== "0") {
      const browser = await openBrowser();
      // [label, path, signed in, a row of the page's list (its "rows" column: when the first was drawn)]
      const pages: Array<[string, string, boolean, string | null]> = [
        ["static page (baseline)", `/${STATIC_PAGE}`, false, null],
        ["React + React Router alone (the floor)", `/${FLOOR_PAGE}`, false, null],
        ["sign-in page", "/sign-in", false, null],
        ["overview", `/sites/${site.siteId}`, true, 'section[aria-label="By board"] li'],
        [
          `board (${site.largestBoard.positions} positions)`,
          `/sites/${site.siteId}/boards/${site.largestBoard.id}`,
          true,
          "[data-position-id]",
        ],
        ["defect register", `/sites/${site.siteId}/defects`, true, "[data-testid=defect-card]"],
        ["wanted list", `/sites/${site.siteId}/parts`, true, "[data-testid=part-row]"],
      ];
      const figures = new Map<string, PaintFigures[]>();
      try {
        for (let run = 0; run < RUNS; run++)
          for (const [label, path, signed, rows] of pages)
            figures.set(label, [
              ...(figures.get(label) ?? []),
              await measurePaint(browser, base, path, signed ? cookie : null, rows),
            ]);
      } finally {
        await browser.close();
      }
      const staticLcp = median(figures.get(pages[0][0])!.map((f) => f.lcp));
      const floorLcp = median(figures.get(pages[1][0])!.map((f) => f.lcp));
      say(
        `\n4. Page paint, phone profile (360 × 740, 2 × density, touch), CPU 4 × slower, cold cache; ${RUNS} loads each; the floor is the static page's heading and paragraph rendered by React and React Router alone (src/bench-floor.ts), what any client-rendered page on this stack costs before Tideline's own code`,
      );
      say(
        table(
          ["page", "LCP ms", "LCP / static", "LCP / floor", "rows drawn ms", "CLS", "longest task ms", "blocking ms"],
          pages.map(([label]) => {
            const f = figures.get(label)!;
            return [
              label,
              spread(
                f.map((x) => x.lcp),
                0,
              ),
              (median(f.map((x) => x.lcp)) / staticLcp).toFixed(2),
              (median(f.map((x) => x.lcp)) / floorLcp).toFixed(2),
              f[0].rows == null
                ? "—"
                : spread(
                    f.map((x) => x.rows ?? 0),
                    0,
                  ),
              spread(
                f.map((x) => x.cls),
                3,
              ),
              spread(
                f.map((x) => x.longestTask),
                0,
              ),
              spread(
                f.map((x) => x.blocking),
                0,
              ),
            ];
          }),
        ),
      );
    }
    failed = false;
    say(
      "\n(endpoint = over HTTP from this process to the server process, signed in, asking for gzip, deflate or br as a browser does, whole body read and decompressed; raw = the statements the endpoint issued, captured from an in-process copy of the app, replayed with pg; ratio = endpoint p50 / raw p50 of the same run)",
    );
  } finally {
    removeStatic();
    await stopFloor?.();
    await server?.stop();
    await raw.end();
    await setup.destroy();
    if (process.env.BENCH_KEEP || reuse) say(`kept ${name} (BENCH_KEEP / BENCH_DATABASE)`);
    else if (failed && generated)
      say(`kept ${name}: the run failed after generating; measure it again with BENCH_DATABASE=${name}`);
    else {
      const c = new pg.Client({ connectionString: local.adminUrl });
      await c.connect();
      await c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
      await c.end();
      say(`dropped ${name}`);
    }
    local.stop();
  }
}

await main();
// The condition survey report's case runs on its own scratch database.
if (process.env.BENCH_REPORT !== "0") await benchReport();
// The board page's long tasks, windowed against drawn whole: server/cli/bench-board.ts.
if (process.env.BENCH_BOARD !== "0") await benchBoard();
// One web instance against two: server/cli/bench-fleet.ts; BENCH_FLEET=0 skips it.
if (process.env.BENCH_FLEET !== "0") await benchFleet();
// Photo ingest against bare sharp: server/cli/bench-ingest.ts; BENCH_INGEST=0 skips it.
if (process.env.BENCH_INGEST !== "0") await benchIngest();

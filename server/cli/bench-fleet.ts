/**
 * `npm run bench`, the fleet case: requests per second and p95 of the defect register
 * (first ranked page), of a realistic read mix (register, overview, board list, one board, wanted list,
 * session, in turn) and of a photo upload (one 640 × 480 JPEG), with ONE web instance against
 * TWO, on this machine. Both instances are real processes (`node --import tsx server/index.ts`) on
 * one scratch database of the test cluster and one photo folder; A runs the worker (renditions),
 * B is web-only. "One instance" sends every request to A; "two" alternates A and B, as a load
 * balancer does. BENCH_CLIENTS clients (default 8) for BENCH_FLEET_SECONDS (default 6) per case;
 * each figure is median [min–max] over BENCH_RUNS runs (default 3), with the two-over-one ratio
 * taken within each run. On a 2-core machine two instances share the same two cores (and the
 * database's): the ratio says what a second process buys here, not on a larger host.
 * BENCH_FLEET=0 skips it.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { Agent, request } from "node:http";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import sharp from "sharp";
import { openLocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";
import { ensureDatabase, projectRoot } from "../../db/pg";
import { BENCH_PASSWORD, generateSite } from "../bench/site";
import { percentile, spread, table } from "../bench/stats";
import { createDb, MAINTENANCE_DB_OPTIONS } from "../db";

const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const CLIENTS = Number(process.env.BENCH_CLIENTS ?? 8);
const SECONDS = Number(process.env.BENCH_FLEET_SECONDS ?? 6);

const freePort = () =>
  new Promise<number>((resolve) => {
    const s = createServer().listen(0, "127.0.0.1", () => {
      const p = (s.address() as { port: number }).port;
      s.close(() => resolve(p));
    });
  });

async function startInstance(env: Record<string, string>) {
  const port = await freePort();
  const child: ChildProcess = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    cwd: projectRoot,
    env: { ...process.env, ...env, PORT: String(port), NODE_ENV: "production", LOG_LEVEL: "warn" },
    stdio: ["ignore", "ignore", "pipe"],
  });
  let err = "";
  child.stderr!.on("data", (d) => (err = (err + d).slice(-5000)));
  const base = `http://127.0.0.1:${port}`;
  for (let i = 0; ; i++) {
    if (child.exitCode !== null) throw new Error(`an instance exited: ${err}`);
    if (
      await fetch(`${base}/api/health/ready`).then(
        (r) => r.ok,
        () => false,
      )
    )
      break;
    if (i > 600) throw new Error(`an instance never became ready: ${err}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  return { base, child };
}

const agent = new Agent({ keepAlive: true, maxSockets: 64 });

function send(url: string, cookie: string, method: string, body?: Buffer, type?: string) {
  return new Promise<number>((resolve, reject) => {
    const headers: Record<string, string> = { cookie, origin: new URL(url).origin };
    if (body) Object.assign(headers, { "content-type": type!, "content-length": String(body.length) });
    const req = request(url, { method, agent, headers }, (res) => {
      res.resume();
      res.on("end", () => resolve(res.statusCode ?? 0));
    });
    req.on("error", reject);
    req.end(body);
  });
}

/** A multipart body with one file, built once and sent as it is. */
function multipart(file: Buffer, positionId: string) {
  const b = `----tideline${randomBytes(8).toString("hex")}`;
  const head = `--${b}\r\nContent-Disposition: form-data; name="positionId"\r\n\r\n${positionId}\r\n--${b}\r\nContent-Disposition: form-data; name="files"; filename="bench.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`;
  return {
    body: Buffer.concat([Buffer.from(head), file, Buffer.from(`\r\n--${b}--\r\n`)]),
    type: `multipart/form-data; boundary=${b}`,
  };
}

/** CLIENTS loops for SECONDS, each request to the next base: requests/s and p95 (ms) of the 2xx answers. */
async function load(bases: string[], one: (base: string) => Promise<number>) {
  const times: number[] = [];
  let failed = 0;
  let next = 0;
  const until = performance.now() + SECONDS * 1000;
  const t0 = performance.now();
  await Promise.all(
    Array.from({ length: CLIENTS }, async () => {
      while (performance.now() < until) {
        const s = performance.now();
        const status = await one(bases[next++ % bases.length]).catch(() => 0);
        if (status >= 200 && status < 300) times.push(performance.now() - s);
        else failed++;
      }
    }),
  );
  return { rps: times.length / ((performance.now() - t0) / 1000), p95: percentile(times, 95), failed };
}

export async function benchFleet() {
  console.log(`\n── fleet: one web instance against two (${CLIENTS} clients, ${SECONDS} s per case, ${RUNS} runs)`);
  const local = await openLocalDatabase("test", "postgres");
  const name = `tideline_bench_fleet_${randomBytes(4).toString("hex")}`;
  await ensureDatabase(local.adminUrl, name, { fresh: true, owner: local.appRole });
  const url = local.url.replace(/\/postgres$/, `/${name}`);
  const photoDir = await mkdtemp(join(tmpdir(), "tideline-bench-fleet-"));
  const setup = createDb(url, MAINTENANCE_DB_OPTIONS);
  const instances: ChildProcess[] = [];
  try {
    await migrateToLatest(setup);
    const site = await generateSite(setup, 2000);
    const position = await setup
      .selectFrom("positions")
      .select("id")
      .where("siteId", "=", site.siteId)
      .limit(1)
      .executeTakeFirstOrThrow();
    const env = { DATABASE_URL: url, PHOTO_DIR: photoDir, SMTP_PORT: String(await freePort()) };
    const A = await startInstance({ ...env });
    const B = await startInstance({ ...env, TIDELINE_WORKER: "off", SMTP_PORT: String(await freePort()) });
    instances.push(A.child, B.child);
    const signIn = await fetch(`${A.base}/api/auth/sign-in`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: A.base },
      body: JSON.stringify({ email: site.curatorEmail, password: BENCH_PASSWORD }),
    });
    const cookie = (signIn.headers.getSetCookie()[0] ?? "").split(";")[0];
    const jpeg = await sharp({
      create: {
        width: 640,
        height: 480,
        channels: 3,
        background: "#777",
        noise: { type: "gaussian", mean: 128, sigma: 40 },
      },
    })
      .jpeg({ quality: 85 })
      .toBuffer();
    const upload = multipart(jpeg, position.id);
    // What a crew's browsers ask for in a working day, in turn: the register (default, filtered,
    // searched), the overview, the board list, one board, the wanted list, the session check.
    const s = `/api/sites/${site.siteId}`;
    const mix = [
      `${s}/defects?sort=priority&size=25`,
      `${s}/overview`,
      `${s}/boards`,
      `${s}/boards/${site.largestBoard.id}`,
      `${s}/parts`,
      `${s}/defects?status=raised&status=scheduled&severity=disabling`,
      `/api/session`,
      `${s}/defects?q=verdigris`,
    ];
    let turn = 0;
    const cases = {
      "read mix (8 list/summary GETs in turn)": (base: string) =>
        send(`${base}${mix[turn++ % mix.length]}`, cookie, "GET"),
      "register, first ranked page": (base: string) =>
        send(`${base}/api/sites/${site.siteId}/defects?sort=priority&size=25`, cookie, "GET"),
      "photo upload (640 × 480 JPEG)": (base: string) =>
        send(`${base}/api/sites/${site.siteId}/photos`, cookie, "POST", upload.body, upload.type),
    };
    const rows: string[][] = [];
    for (const [label, one] of Object.entries(cases)) {
      const r = { rps1: [] as number[], rps2: [] as number[], p951: [] as number[], p952: [] as number[] };
      const ratio: number[] = [];
      let failed = 0;
      for (let run = 0; run < RUNS; run++) {
        const single = await load([A.base], one);
        const double = await load([A.base, B.base], one);
        r.rps1.push(single.rps);
        r.rps2.push(double.rps);
        r.p951.push(single.p95);
        r.p952.push(double.p95);
        ratio.push(double.rps / single.rps);
        failed += single.failed + double.failed;
      }
      rows.push([
        label,
        spread(r.rps1),
        spread(r.rps2),
        spread(ratio, 2),
        spread(r.p951),
        spread(r.p952),
        String(failed),
      ]);
    }
    console.log(
      table(["case", "1 inst. req/s", "2 inst. req/s", "2 ÷ 1", "1 inst. p95 ms", "2 inst. p95 ms", "non-2xx"], rows),
    );
    console.log("(median [min–max] over runs; the ratio is taken within each run; one 2-core machine for all)");
  } finally {
    for (const c of instances) c.kill("SIGTERM");
    await Promise.all(instances.map((c) => new Promise((r) => (c.exitCode !== null ? r(null) : c.once("exit", r)))));
    await setup.destroy();
    const admin = createDb(local.adminUrl, MAINTENANCE_DB_OPTIONS);
    const { sql } = await import("kysely");
    await sql`DROP DATABASE IF EXISTS ${sql.id(name)} WITH (FORCE)`.execute(admin);
    await admin.destroy();
    await rm(photoDir, { recursive: true, force: true });
    local.stop();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) await benchFleet();

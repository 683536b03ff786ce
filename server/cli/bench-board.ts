/**
 * `npm run bench`, the board page's long tasks: one board of 500 positions drawn
 * WINDOWED (the build as shipped: boards past WINDOW_FROM = 200 draw only the tiles on screen,
 * @tanstack/react-virtual) against WHOLE (the same sources built a second time with
 * VITE_BOARD_WINDOW_FROM past any board, i.e. before windowing). Each load is a cold context on the
 * phone profile of server/bench/paint.ts (360 × 740, 2 × density, touch) with the CPU slowed 4 ×
 * through the DevTools protocol (Emulation.setCPUThrottlingRate); a PerformanceObserver registered
 * before any script records every 'longtask' entry from navigation until the tiles are on the page
 * and a quiet 1.5 s has passed. Figures: the sum of long-task time, the longest task, the blocking
 * time (sum of each task's time past 50 ms), and the tiles in the DOM; median [min–max] over
 * BENCH_BOARD_LOADS loads of each (default 5), the two builds loaded in turn.
 * BENCH_BOARD=0 skips it; `npx tsx server/cli/bench-board.ts` runs it alone.
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { createServer } from "node:net";
import { join } from "node:path";
import { openLocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";
import { ensureDatabase, projectRoot } from "../../db/pg";
import { inPage, openBrowser, waitInPage } from "../bench/paint";
import { BENCH_PASSWORD, generateSite } from "../bench/site";
import { median, spread, table } from "../bench/stats";
import { createDb, MAINTENANCE_DB_OPTIONS } from "../db";
import { buildClient } from "./prepare";

const LOADS = Number(process.env.BENCH_BOARD_LOADS ?? 5);
/**
 * The kept reads' IndexedDB entry and User Timing measure, as named in src/app/persist.ts (server code may not
 * import client code; a name that drifts shows as 0 writes here).
 */
const CACHE_DB = "tideline-cache";
const CACHE_STORE = "queries";
const CACHE_KEY = "tideline-query-cache";
const KEEP_MEASURE = "tideline:keep-reads";
/** BENCH_BOARD_WHOLE=0: the build as shipped only (no second build drawing every tile). */
const WHOLE = process.env.BENCH_BOARD_WHOLE !== "0";
const POSITIONS = 500;

const freePort = () =>
  new Promise<number>((resolve) => {
    const s = createServer().listen(0, "127.0.0.1", () => {
      const p = (s.address() as { port: number }).port;
      s.close(() => resolve(p));
    });
  });

async function startServer(env: Record<string, string>) {
  const port = await freePort();
  const child: ChildProcess = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    cwd: projectRoot,
    env: {
      ...process.env,
      ...env,
      PORT: String(port),
      NODE_ENV: "production",
      LOG_LEVEL: "warn",
      TIDELINE_WORKER: "off",
      SMTP_PORT: String(await freePort()),
    },
    stdio: ["ignore", "ignore", "pipe"],
  });
  let err = "";
  child.stderr!.on("data", (d) => (err = (err + d).slice(-5000)));
  const base = `http://127.0.0.1:${port}`;
  for (let i = 0; ; i++) {
    if (child.exitCode !== null) throw new Error(`the server exited: ${err}`);
    if (
      await fetch(`${base}/api/health`).then(
        (r) => r.ok,
        () => false,
      )
    )
      break;
    if (i > 600) throw new Error(`the server never answered: ${err}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  return { base, child };
}

const OBSERVE = `
  window.__long = { total: 0, longest: 0, blocking: 0, count: 0, tasks: [] };
  new PerformanceObserver((l) => { for (const e of l.getEntries()) {
    window.__long.total += e.duration; window.__long.count++;
    window.__long.longest = Math.max(window.__long.longest, e.duration);
    window.__long.blocking += Math.max(0, e.duration - 50);
    window.__long.tasks.push([e.startTime, e.duration]);
  } }).observe({ type: "longtask", buffered: true });
  window.__keep = [];
  new PerformanceObserver((l) => { for (const e of l.getEntries()) if (e.name === ${JSON.stringify(KEEP_MEASURE)})
    window.__keep.push([e.startTime, e.duration, (e.detail && e.detail.bytes) || 0, (e.detail && e.detail.busy) || e.duration, (e.detail && e.detail.pieces) || 1]);
  }).observe({ type: "measure", buffered: true });
`;

/**
 * The kept reads' text written by the page (IndexedDB), serialized again in the page the way each write did before
 * (every kept query stringified for its size, then the whole client a second time) and as it does now (each query
 * once, the pieces joined): median ms of BEFORE_AFTER_TIMES each, in turn, on the page's throttled CPU.
 */
const BEFORE_AFTER_TIMES = 5;
const BEFORE_AFTER = `(async () => {
  const text = await new Promise((resolve, reject) => {
    const open = indexedDB.open(${JSON.stringify(CACHE_DB)});
    open.onerror = () => reject(open.error);
    open.onsuccess = () => {
      const get = open.result.transaction(${JSON.stringify(CACHE_STORE)}).objectStore(${JSON.stringify(CACHE_STORE)}).get(${JSON.stringify(CACHE_KEY)});
      get.onsuccess = () => resolve(get.result ?? null);
      get.onerror = () => reject(get.error);
    };
  });
  if (!text) return null;
  const client = JSON.parse(text);
  const queries = client.clientState.queries;
  const before = () => {
    const kept = [];
    for (const q of queries) { const size = JSON.stringify(q).length; if (size >= 0) kept.push(q); }
    return JSON.stringify({ ...client, clientState: { ...client.clientState, queries: kept, mutations: [] } }).length;
  };
  const after = () => {
    const kept = [];
    for (const q of queries) kept.push(JSON.stringify(q));
    const marker = JSON.stringify("tideline-marker-" + Math.random());
    const shell = JSON.stringify({ ...client, clientState: { ...client.clientState, queries: [JSON.parse(marker)], mutations: [] } });
    const at = shell.indexOf(marker);
    return (shell.slice(0, at) + kept.join(",") + shell.slice(at + marker.length)).length;
  };
  const b = [], a = [];
  for (let i = 0; i < ${BEFORE_AFTER_TIMES}; i++) {
    let t = performance.now(); before(); b.push(performance.now() - t);
    t = performance.now(); after(); a.push(performance.now() - t);
  }
  const med = (xs) => xs.sort((x, y) => x - y)[xs.length >> 1];
  return { bytes: text.length, queries: queries.length, before: med(b), after: med(a) };
})()`;

interface Load {
  total: number;
  longest: number;
  blocking: number;
  count: number;
  tiles: number;
  /**
   * The kept reads' writes during the load: how many, their serialization ms on the main thread (sum over every
   * piece of every write; the longest piece), the text's bytes.
   */
  keepWrites: number;
  keepMs: number;
  keepLongest: number;
  /** The most pieces one write was cut into (src/app/persist.ts: idle time between pieces). */
  keepPieces: number;
  keepBytes: number;
  /** The longest long task that held a write's serialization (0 when none did). */
  keepTask: number;
  /** The same text serialized as before and as now, in the page (ms). */
  keepBefore: number;
  keepAfter: number;
}

async function loadBoard(browser: Awaited<ReturnType<typeof openBrowser>>, base: string, path: string, cookie: string) {
  const context = await browser.newContext({
    viewport: { width: 360, height: 740 },
    deviceScaleFactor: 2,
    isMobile: true,
    hasTouch: true,
  });
  try {
    const [name, value] = cookie.split("=");
    await context.addCookies([{ name, value, url: base }]);
    const page = await context.newPage();
    const cdp = await context.newCDPSession(page);
    await cdp.send("Emulation.setCPUThrottlingRate", { rate: 4 });
    await page.addInitScript(OBSERVE);
    await page.goto(`${base}${path}`, { waitUntil: "load", timeout: 180_000 });
    await waitInPage(cdp, 'document.querySelector("[data-position-id]") !== null', 180_000);
    // The kept reads are written at most once a second after the reads arrive: wait for the first write.
    await waitInPage(cdp, "window.__keep.length > 0", 30_000).catch(() => undefined);
    await page.waitForTimeout(1500);
    const { tasks, ...m } = await inPage<
      Pick<Load, "total" | "longest" | "blocking" | "count"> & { tasks: Array<[number, number]> }
    >(cdp, "window.__long");
    const tiles = await inPage<number>(cdp, 'document.querySelectorAll("[data-position-id]").length');
    const writes = await inPage<Array<[number, number, number, number, number]>>(cdp, "window.__keep");
    const holding = (start: number) =>
      Math.max(0, ...tasks.filter(([s, d]) => s <= start && start <= s + d).map(([, d]) => d));
    const ba = await inPage<{ before: number; after: number } | null>(cdp, BEFORE_AFTER);
    return {
      ...m,
      tiles,
      keepWrites: writes.length,
      keepMs: writes.reduce((n, [, , , busy]) => n + busy, 0),
      keepLongest: Math.max(0, ...writes.map(([, d]) => d)),
      keepPieces: Math.max(0, ...writes.map(([, , , , pieces]) => pieces)),
      keepBytes: Math.max(0, ...writes.map(([, , b]) => b)),
      keepTask: Math.max(0, ...writes.map(([s]) => holding(s))),
      keepBefore: ba?.before ?? NaN,
      keepAfter: ba?.after ?? NaN,
    };
  } finally {
    await context.close();
  }
}

export async function benchBoard() {
  console.log(
    `\n── board page long tasks: ${POSITIONS} positions, windowed (as built) vs drawn whole (before windowing); ${LOADS} loads each`,
  );
  const local = await openLocalDatabase("test", "postgres");
  const name = `tideline_bench_board_${randomBytes(4).toString("hex")}`;
  await ensureDatabase(local.adminUrl, name, { fresh: true });
  const url = local.adminUrl.replace(/\/postgres$/, `/${name}`);
  const setup = createDb(url, MAINTENANCE_DB_OPTIONS);
  const servers: ChildProcess[] = [];
  try {
    await migrateToLatest(setup);
    const site = await generateSite(setup, POSITIONS, () => {}, { boards: 1 });
    const windowedDir = buildClient();
    const wholeDir = join(projectRoot, "dist", "client-board-whole");
    if (WHOLE) {
      const built = spawnSync(
        join(projectRoot, "node_modules", ".bin", "vite"),
        ["build", "--logLevel", "warn", "--outDir", wholeDir, "--emptyOutDir"],
        { cwd: projectRoot, stdio: "inherit", env: { ...process.env, VITE_BOARD_WINDOW_FROM: "1000000" } },
      );
      if (built.status !== 0) throw new Error("the second vite build failed");
    }
    const windowed = await startServer({ DATABASE_URL: url, CLIENT_DIR: windowedDir });
    servers.push(windowed.child);
    const whole = WHOLE ? await startServer({ DATABASE_URL: url, CLIENT_DIR: wholeDir }) : null;
    if (whole) servers.push(whole.child);
    const signIn = await fetch(`${windowed.base}/api/auth/sign-in`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: windowed.base },
      body: JSON.stringify({ email: site.curatorEmail, password: BENCH_PASSWORD }),
    });
    const cookie = (signIn.headers.getSetCookie()[0] ?? "").split(";")[0];
    const path = `/sites/${site.siteId}/boards/${site.largestBoard.id}`;
    const browser = await openBrowser();
    const got = { windowed: [] as Load[], whole: [] as Load[] };
    try {
      await loadBoard(browser, windowed.base, path, cookie); // warm the server and the database
      for (let i = 0; i < LOADS; i++) {
        got.windowed.push(await loadBoard(browser, windowed.base, path, cookie));
        if (whole) got.whole.push(await loadBoard(browser, whole.base, path, cookie));
      }
    } finally {
      await browser.close();
    }
    const sp = (xs: Load[], f: (x: Load) => number, digits = 0) => spread(xs.map(f), digits);
    const row = (label: string, xs: Load[]) => [
      label,
      sp(xs, (x) => x.total),
      sp(xs, (x) => x.longest),
      sp(xs, (x) => x.blocking),
      sp(xs, (x) => x.count),
      sp(xs, (x) => x.tiles),
    ];
    console.log(
      table(
        ["board page (phone, CPU 4 × slower)", "long tasks ms", "longest ms", "blocking ms", "tasks", "tiles in DOM"],
        [...(whole ? [row("drawn whole (before)", got.whole)] : []), row("windowed (as built)", got.windowed)],
      ),
    );
    if (whole) {
      const ratio = median(got.whole.map((x) => x.total)) / Math.max(1, median(got.windowed.map((x) => x.total)));
      console.log(`(long-task time, whole ÷ windowed: ${ratio.toFixed(2)}; median [min–max] over ${LOADS} loads)`);
    }
    // The kept reads (src/app/persist.ts): what each write of the query cache to IndexedDB costs the main thread.
    const w = got.windowed;
    console.log(
      `\nkept reads on the same loads (windowed build; User Timing "${KEEP_MEASURE}": each write's longest piece, its detail the ms of all its pieces)`,
    );
    console.log(
      table(
        ["figure", "median [min–max]"],
        [
          ["writes during the load", sp(w, (x) => x.keepWrites)],
          ["text written, kB", sp(w, (x) => x.keepBytes / 1024)],
          ["serialization ms, all writes (main thread, every piece)", sp(w, (x) => x.keepMs, 1)],
          ["longest piece of a write, ms", sp(w, (x) => x.keepLongest, 1)],
          ["pieces of the largest write", sp(w, (x) => x.keepPieces)],
          ["long task holding a write, ms (0 = none)", sp(w, (x) => x.keepTask)],
          [`same text as before (stringified twice), ms`, sp(w, (x) => x.keepBefore, 1)],
          [`same text as now (once, joined), ms`, sp(w, (x) => x.keepAfter, 1)],
        ],
      ),
    );
  } finally {
    for (const c of servers) c.kill("SIGTERM");
    await Promise.all(servers.map((c) => new Promise((r) => (c.exitCode !== null ? r(null) : c.once("exit", r)))));
    await setup.destroy();
    const admin = createDb(local.adminUrl, MAINTENANCE_DB_OPTIONS);
    const { sql } = await import("kysely");
    await sql`DROP DATABASE IF EXISTS ${sql.id(name)} WITH (FORCE)`.execute(admin);
    await admin.destroy();
    local.stop();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) await benchBoard();

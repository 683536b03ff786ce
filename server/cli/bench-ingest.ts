/**
 * `npm run bench`, the photo-ingest case: what Tideline spends to take in a phone photo, against
 * a bare sharp script that makes the same two renditions from the same file.
 *
 * - Tideline: one web instance (`node --import tsx server/index.ts`, production mode, its own job
 *   worker) on a scratch database; BENCH_INGEST_PHOTOS (default 8) uploads of one 12 MP JPEG
 *   (4032 × 3024, EXIF orientation 6 and a capture time, as a phone writes it), one per request;
 *   each is timed from the request until its rendition job has finished (its renditions stored and
 *   the photo marked ready): the end is the queue's own `completed_on`, so the bench's polls (every
 *   100 ms) add nothing to the figure. It covers the HTTP upload streamed to disk, the type and EXIF checks, the original put in
 *   the photo store, the row, the audit entry, the queued job, its worker's read of the original and the
 *   decode, both renditions and their writes, the photo marked ready and the job completed.
 * - Bare: read the same file from disk and make the same renditions with sharp alone (display:
 *   rotate, fit inside 1600 px, JPEG quality 82; thumbnail from the display copy: 320 px,
 *   quality 82, mozjpeg), in the bench's own process with sharp's defaults, as the server has them.
 *   The warm-up photo's stored renditions must equal the bare script's byte for byte, or the bench stops.
 * - Every side takes its turn photo by photo (the order rotated each photo). Per run the ratio is
 *   Tideline's total over bare's; printed as median [min–max] over BENCH_RUNS runs, with CPU time per
 *   photo by thread (/proc) beside it, which a busy machine disturbs much less than wall time.
 * - BENCH_INGEST_BASELINE=<another checkout, with node_modules> runs that checkout's server as a
 *   further side on its own scratch database, so an old and a new version meet the same load.
 * BENCH_INGEST=0 skips it.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { Agent, request } from "node:http";
import { createServer } from "node:net";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { sql } from "kysely";
import sharp from "sharp";
import { openLocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";
import { ensureDatabase, projectRoot } from "../../db/pg";
import { clusterCpu, cpuBetween, parentOf, threadCpuBetween, threadSampleOf, type ThreadSample } from "../bench/load";
import { BENCH_PASSWORD, generateSite } from "../bench/site";
import { spread, table } from "../bench/stats";
import { createDb, MAINTENANCE_DB_OPTIONS } from "../db";
import { DISPLAY_PX, THUMB_PX } from "../photos/images";

const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const PHOTOS = Number(process.env.BENCH_INGEST_PHOTOS ?? 8);
/**
 * How the bench sends each upload. "raw" (the default since 2026-12-04): one multipart body built
 * once, as a client that has the file ready sends it, written to the socket by node:http. "formdata":
 * fetch with a FormData and a Blob, as before; undici encodes the Blob through web streams in small
 * chunks, which cost the bench's own process 10–50 ms a photo on this machine (more than the server's
 * whole multipart parse), and that time was counted as Tideline's. Both still go over HTTP to the
 * server and through multer there.
 */
const CLIENT = process.env.BENCH_INGEST_CLIENT === "formdata" ? "formdata" : "raw";

/** A multipart/form-data body (RFC 7578): text fields, then one file part. */
function multipartBody(fields: Record<string, string>, file: { name: string; type: string; bytes: Buffer }) {
  const boundary = `----tideline-bench-${randomBytes(12).toString("hex")}`;
  const parts: Buffer[] = [];
  for (const [name, value] of Object.entries(fields))
    parts.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${name}"\r\n\r\n${value}\r\n`));
  parts.push(
    Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="${file.name}"\r\nContent-Type: ${file.type}\r\n\r\n`,
    ),
    file.bytes,
    Buffer.from(`\r\n--${boundary}--\r\n`),
  );
  return { body: Buffer.concat(parts), type: `multipart/form-data; boundary=${boundary}` };
}

/** POST a body with node:http (a kept-alive connection); resolves with the status and the answer's text. */
function postBody(url: string, agent: Agent, headers: Record<string, string>, body: Buffer) {
  return new Promise<{ status: number; text: string }>((resolve, reject) => {
    const req = request(
      url,
      { method: "POST", agent, headers: { ...headers, "content-length": body.length } },
      (res) => {
        const chunks: Buffer[] = [];
        res.on("data", (c: Buffer) => chunks.push(c));
        res.on("end", () => resolve({ status: res.statusCode ?? 0, text: Buffer.concat(chunks).toString("utf8") }));
        res.on("error", reject);
      },
    );
    req.on("error", reject);
    req.end(body);
  });
}

const freePort = () =>
  new Promise<number>((resolve) => {
    const s = createServer().listen(0, "127.0.0.1", () => {
      const p = (s.address() as { port: number }).port;
      s.close(() => resolve(p));
    });
  });

/**
 * A 12 MP picture that compresses like a photograph (smooth regions with grain, not pure noise):
 * noise blurred to blotches, a gradient over it, fine grain on top; about 3–5 MB at quality 90,
 * the size a phone's camera writes.
 */
export async function phonePhoto(): Promise<Buffer> {
  const w = 4032;
  const h = 3024;
  const blotches = await sharp({
    create: {
      width: w / 8,
      height: h / 8,
      channels: 3,
      background: "#6a6258",
      noise: { type: "gaussian", mean: 110, sigma: 60 },
    },
  })
    .blur(3)
    .resize(w, h, { kernel: "cubic" })
    .png()
    .toBuffer();
  const grain = await sharp({
    create: {
      width: w,
      height: h,
      channels: 4,
      background: "#00000000",
      noise: { type: "gaussian", mean: 128, sigma: 12 },
    },
  })
    .png()
    .toBuffer();
  return sharp(blotches)
    .composite([{ input: grain, blend: "soft-light" }])
    .jpeg({ quality: 90 })
    .withExif({ IFD0: { Make: "Bench", Model: "Phone 12MP" }, IFD2: { DateTimeOriginal: "2026:11:20 09:14:00" } })
    .withMetadata({ orientation: 6 })
    .toBuffer();
}

/**
 * The same renditions as server/photos/images.ts renderDisplay and renderThumb, with nothing around
 * them (its caller then writes the two files, timed apart, as a script producing renditions would).
 */
async function bareRenditions(path: string) {
  const original = await readFile(path);
  const display = await sharp(original)
    .rotate()
    .resize({ width: DISPLAY_PX, height: DISPLAY_PX, fit: "inside", withoutEnlargement: true })
    .jpeg({ quality: 82 })
    .toBuffer();
  const thumb = await sharp(display)
    .resize({ width: THUMB_PX, height: THUMB_PX, fit: "inside", withoutEnlargement: true })
    .jpeg({ quality: 82, mozjpeg: true })
    .toBuffer();
  return { display, thumb };
}

async function startInstance(root: string, env: Record<string, string>) {
  const port = await freePort();
  const child: ChildProcess = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    cwd: root,
    env: { ...process.env, ...env, PORT: String(port), NODE_ENV: "production", LOG_LEVEL: "warn" },
    stdio: ["ignore", "ignore", "pipe"],
  });
  let err = "";
  child.stderr!.on("data", (d) => (err = (err + d).slice(-5000)));
  const base = `http://127.0.0.1:${port}`;
  for (let i = 0; ; i++) {
    if (child.exitCode !== null) throw new Error(`the instance exited: ${err}`);
    const up = await fetch(`${base}/api/health/ready`).then(
      (r) => r.ok,
      () => false,
    );
    if (up) break;
    if (i > 1200) throw new Error(`the instance never became ready: ${err}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  return { base, child };
}

/** CPU seconds by thread group; `ended`: threads that ended between two samples (from the process's own total). */
type Cpu = { main: number; vips: number; other: number; ended: number };
const zero = (): Cpu => ({ main: 0, vips: 0, other: 0, ended: 0 });
/** Threads that ended between two CPU samples, over the whole bench. */
let threadsEnded = 0;
/** Adds what each group of threads used between the two samples (thread by thread: see threadCpuBetween). */
const addTo = (to: Cpu, a: ThreadSample | null, b: ThreadSample | null) => {
  const { cpu, ended, endedSeconds } = threadCpuBetween(a, b);
  to.main += cpu.main;
  to.vips += cpu.vips;
  to.other += cpu.other;
  to.ended += endedSeconds;
  threadsEnded += ended;
};
const sum = (a: Cpu, b: Cpu): Cpu => ({
  main: a.main + b.main,
  vips: a.vips + b.vips,
  other: a.other + b.other,
  ended: a.ended + b.ended,
});
const total = (c: Cpu) => c.main + c.vips + c.other + c.ended;

/** One Tideline instance under test: its own scratch database, photo folder and worker. */
async function openSide(
  local: Awaited<ReturnType<typeof openLocalDatabase>>,
  work: string,
  label: string,
  root: string,
  photo: Buffer,
) {
  const name = `tideline_bench_ingest_${randomBytes(4).toString("hex")}`;
  await ensureDatabase(local.adminUrl, name, { fresh: true, owner: local.appRole });
  const url = local.url.replace(/\/postgres$/, `/${name}`);
  const db = createDb(url, MAINTENANCE_DB_OPTIONS);
  const store = join(work, `store-${name}`);
  const side = {
    label,
    name,
    db,
    store,
    child: undefined as ChildProcess | undefined,
    agent: undefined as Agent | undefined,
  };
  try {
    await migrateToLatest(db);
    const site = await generateSite(db, 200);
    const position = await db
      .selectFrom("positions")
      .select("id")
      .where("siteId", "=", site.siteId)
      .limit(1)
      .executeTakeFirstOrThrow();
    const A = await startInstance(root, { DATABASE_URL: url, PHOTO_DIR: store, SMTP_PORT: String(await freePort()) });
    side.child = A.child;
    const signIn = await fetch(`${A.base}/api/auth/sign-in`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: A.base },
      body: JSON.stringify({ email: site.curatorEmail, password: BENCH_PASSWORD }),
    });
    const cookie = (signIn.headers.getSetCookie()[0] ?? "").split(";")[0];
    /** One upload; resolves with the photo's id, the request's seconds and the client's start (epoch ms). */
    const uploadUrl = `${A.base}/api/sites/${site.siteId}/photos`;
    const multipart = multipartBody(
      { positionId: position.id },
      { name: "IMG_0001.jpg", type: "image/jpeg", bytes: photo },
    );
    const agent = new Agent({ keepAlive: true });
    side.agent = agent;
    const upload = async () => {
      const startedAt = Date.now();
      const t = performance.now();
      let r: { status: number; text: string };
      if (CLIENT === "formdata") {
        const form = new FormData();
        form.set("positionId", position.id);
        form.append("files", new Blob([new Uint8Array(photo)], { type: "image/jpeg" }), "IMG_0001.jpg");
        const res = await fetch(uploadUrl, {
          method: "POST",
          headers: { cookie, origin: A.base },
          body: form,
        });
        r = { status: res.status, text: await res.text() };
      } else
        r = await postBody(
          uploadUrl,
          agent,
          { cookie, origin: A.base, "content-type": multipart.type },
          multipart.body,
        );
      if (r.status !== 201 && r.status !== 200) throw new Error(`upload answered ${r.status}: ${r.text}`);
      const body = JSON.parse(r.text) as { photos: Array<{ id: string }> };
      return { id: body.photos[0].id, requestSeconds: (performance.now() - t) / 1000, startedAt };
    };
    /**
     * Waits until the photo is ready, then returns when its job finished (epoch ms, PostgreSQL's
     * clock, the same host clock as Date.now()): after its renditions are stored and the row is marked
     * ready. The end comes from the queue's row, not from when this poll saw it, so the poll's
     * interval adds nothing to the figure. 100 ms between polls (it was 25): each poll is a query,
     * and on two cores the bench's own polling took CPU from the job it was waiting for, a load the
     * bare script never met.
     */
    const ready = async (id: string) => {
      for (;;) {
        const row = await sql<{ state: string; done: number | null; started: number; created: number }>`
          select p.rendition_state as state,
                 extract(epoch from j.completed_on) * 1000 as done,
                 extract(epoch from j.started_on) * 1000 as started,
                 extract(epoch from j.created_on) * 1000 as created
          from photos p join pgboss.job j on j.name = 'photo.renditions' and j.data->>'photoId' = p.id::text
          where p.id = ${id}::uuid`.execute(db);
        const r = row.rows[0];
        if (r?.state === "failed") throw new Error(`the renditions of ${id} failed`);
        if (r?.state === "ready" && r.done !== null)
          return { done: Number(r.done), started: Number(r.started), created: Number(r.created) };
        await new Promise((res) => setTimeout(res, 100));
      }
    };
    return { ...side, siteId: site.siteId, pid: A.child.pid!, upload, ready };
  } catch (e) {
    await closeSide(local, side);
    throw e;
  }
}

async function closeSide(
  local: Awaited<ReturnType<typeof openLocalDatabase>>,
  side: { name: string; db: ReturnType<typeof createDb>; child?: ChildProcess; agent?: Agent },
) {
  side.agent?.destroy();
  const child = side.child;
  if (child && child.exitCode === null) {
    child.kill("SIGTERM");
    await new Promise((r) => (child.exitCode !== null ? r(null) : child.once("exit", r)));
  }
  await side.db.destroy();
  const admin = createDb(local.adminUrl, MAINTENANCE_DB_OPTIONS);
  await sql`DROP DATABASE IF EXISTS ${sql.id(side.name)} WITH (FORCE)`.execute(admin);
  await admin.destroy();
}

export async function benchIngest() {
  const baseline = process.env.BENCH_INGEST_BASELINE;
  console.log(
    `\n── photo ingest: ${PHOTOS} uploads of a 12 MP JPEG against bare sharp (${RUNS} runs)` +
      (baseline ? `, with a second checkout (${baseline}) in turn` : ""),
  );
  const local = await openLocalDatabase("test", "postgres");
  const work = await mkdtemp(join(tmpdir(), "tideline-bench-ingest-"));
  const sides: Array<Awaited<ReturnType<typeof openSide>>> = [];
  try {
    const photo = await phonePhoto();
    const file = join(work, "IMG_0001.jpg");
    await writeFile(file, photo);
    sides.push(await openSide(local, work, "Tideline (this checkout)", projectRoot, photo));
    if (baseline) sides.push(await openSide(local, work, `Tideline at ${baseline}`, baseline, photo));

    // One upload first on each: the server's first request compiles and warms what later ones reuse.
    // Its renditions must be the bare script's byte for byte, or the comparison is not of the same work.
    const reference = await bareRenditions(file);
    for (const side of sides) {
      const { id } = await side.upload();
      await side.ready(id);
      for (const r of ["display", "thumb"] as const) {
        const stored = await readFile(join(side.store, "sites", side.siteId, id, `${r}.jpg`));
        if (!stored.equals(reference[r]))
          throw new Error(`${side.label}: its ${r} copy differs from the bare script's; the bench compares other work`);
      }
    }
    const pgPid = (await sql<{ pid: number }>`select pg_backend_pid() as pid`.execute(sides[0].db)).rows[0].pid;
    const postmaster = parentOf(pgPid);
    const load0 = loadavg();

    type Figures = {
      total: number[];
      request: number[];
      wait: number[];
      job: number[];
      ratio: number[];
      ratioWritten: number[];
      cpuRequest: Cpu[];
      cpuAfter: Cpu[];
      pg: number[];
      cpuRatio: number[];
    };
    const figures: Figures[] = sides.map(() => ({
      total: [],
      request: [],
      wait: [],
      job: [],
      ratio: [],
      ratioWritten: [],
      cpuRequest: [],
      cpuAfter: [],
      pg: [],
      cpuRatio: [],
    }));
    const bare: number[] = [];
    const bareWrites: number[] = [];
    const bareCpu: Cpu[] = [];
    for (let run = 0; run < RUNS; run++) {
      const acc = sides.map(() => ({ total: 0, request: 0, wait: 0, job: 0, req: zero(), after: zero(), pg: 0 }));
      let b = 0;
      let bw = 0;
      const bc = zero();
      const steps: Array<() => Promise<void>> = [
        ...sides.map((side, k) => async () => {
          const c0 = threadSampleOf(side.pid);
          const p0 = clusterCpu(postmaster);
          const { id, requestSeconds, startedAt } = await side.upload();
          const c1 = threadSampleOf(side.pid);
          const q = await side.ready(id);
          addTo(acc[k].req, c0, c1);
          addTo(acc[k].after, c1, threadSampleOf(side.pid));
          acc[k].pg += cpuBetween(p0, clusterCpu(postmaster));
          acc[k].total += (q.done - startedAt) / 1000;
          acc[k].request += requestSeconds;
          acc[k].wait += (q.started - q.created) / 1000;
          acc[k].job += (q.done - q.started) / 1000;
        }),
        async () => {
          const c0 = threadSampleOf(process.pid);
          const t = performance.now();
          const out = await bareRenditions(file);
          const t1 = performance.now();
          b += (t1 - t) / 1000;
          addTo(bc, c0, threadSampleOf(process.pid));
          // Then its two files, as a script producing renditions would write them (timed apart).
          await writeFile(join(work, "bare-display.jpg"), out.display);
          await writeFile(join(work, "bare-thumb.jpg"), out.thumb);
          bw += (performance.now() - t1) / 1000;
        },
      ];
      // One photo at a time, each side in turn (the order rotated every photo), so a change in the
      // machine's load meets every side alike.
      for (let i = 0; i < PHOTOS; i++) for (let k = 0; k < steps.length; k++) await steps[(i + k) % steps.length]();
      bare.push(b);
      bareWrites.push(bw);
      bareCpu.push(bc);
      acc.forEach((x, k) => {
        const f = figures[k];
        f.total.push(x.total);
        f.request.push(x.request);
        f.wait.push(x.wait);
        f.job.push(x.job);
        f.ratio.push(x.total / b);
        f.ratioWritten.push(x.total / (b + bw));
        f.cpuRequest.push(x.req);
        f.cpuAfter.push(x.after);
        f.pg.push(x.pg);
        f.cpuRatio.push((total(x.req) + total(x.after)) / total(bc));
      });
    }
    const perPhoto = (xs: number[], scale = 1) =>
      spread(
        xs.map((x) => (x * scale) / PHOTOS),
        scale === 1 ? 2 : 0,
      );
    const wall: string[][] = [];
    for (const [k, side] of sides.entries()) {
      const f = figures[k];
      wall.push(
        [`${side.label}: upload → renditions ready`, spread(f.total, 2), perPhoto(f.total)],
        ["  of which the upload request (to its 201)", spread(f.request, 2), perPhoto(f.request)],
        ["  of which until its job was claimed by a worker", spread(f.wait, 2), perPhoto(f.wait)],
        ["  of which the rendition job", spread(f.job, 2), perPhoto(f.job)],
        ["  ratio to bare sharp (within each run)", spread(f.ratio, 2), ""],
        ["  ratio to bare sharp with its two files written", spread(f.ratioWritten, 2), ""],
      );
    }
    wall.push(["bare sharp: same renditions, same file", spread(bare, 2), perPhoto(bare)]);
    wall.push(["  then writing its two files", spread(bareWrites, 2), perPhoto(bareWrites)]);
    console.log(
      `(uploads sent ${CLIENT === "raw" ? "as one multipart body by node:http" : "by fetch with a FormData"}: BENCH_INGEST_CLIENT)`,
    );
    console.log(table([`wall clock, ${PHOTOS} photos a run`, "seconds", "per photo s"], wall));
    // CPU time is what the work costs whatever else the machine runs: on a busy machine the
    // wall-clock ratio above swings with the neighbours, these much less. By thread: the main
    // thread is JavaScript (HTTP, multipart, queries, streams); libvips' threads are the image work,
    // which should match the bare script's; "other" is libuv's pool (file I/O, sharp's calls) and V8's helpers.
    const ms = (xs: Cpu[], pick: (c: Cpu) => number) => perPhoto(xs.map(pick), 1000);
    const row = (label: string, xs: Cpu[]) => [
      label,
      ms(xs, total),
      ms(xs, (c) => c.main),
      ms(xs, (c) => c.vips),
      ms(xs, (c) => c.other),
      ms(xs, (c) => c.ended),
    ];
    const cpuRows: string[][] = [];
    for (const [k, side] of sides.entries()) {
      const f = figures[k];
      cpuRows.push(
        row(
          `${side.label}: server, upload → ready`,
          f.cpuRequest.map((r, i) => sum(r, f.cpuAfter[i])),
        ),
        row("  during the upload request", f.cpuRequest),
        row("  after it (queue, job, renditions)", f.cpuAfter),
        ["  PostgreSQL (rows, queue, the bench's polls)", perPhoto(f.pg, 1000), "", "", "", ""],
        ["  ratio server ÷ bare (within each run)", spread(f.cpuRatio, 2), "", "", "", ""],
      );
    }
    cpuRows.push(row("bare sharp: same renditions, same file", bareCpu));
    console.log(table(["CPU ms per photo", "total", "main thread", "libvips", "other", "ended threads"], cpuRows));
    // Per thread between two samples (threadCpuBetween): no row goes below zero. A thread that ended in between is in
    // no group; its time after the first sample is "ended threads" (the process's own total less the live threads').
    console.log(
      `(CPU thread by thread between samples; ${threadsEnded} thread(s) ended between two samples, their time in ` +
        `"ended threads")`,
    );
    const load1 = loadavg();
    console.log(
      `(photo ${(photo.length / 1024 / 1024).toFixed(1)} MB, 4032 × 3024, EXIF orientation 6; renditions byte-identical ` +
        `to the bare script's; median [min–max]; load average ${load0[0].toFixed(2)} at the start, ${load1[0].toFixed(2)} at the end)`,
    );
  } finally {
    for (const side of sides) await closeSide(local, side);
    await rm(work, { recursive: true, force: true });
    local.stop();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) await benchIngest();

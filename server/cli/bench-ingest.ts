/**
 * `npm run bench`, the photo-ingest case: what Tideline spends to take in a phone photo, against
 * a bare sharp script that makes the same two renditions from the same file.
 *
 * - Tideline: one web instance (`node --import tsx server/index.ts`, production mode, its own job
 *   worker) on a scratch database; BENCH_INGEST_PHOTOS (default 8) uploads of one 12 MP JPEG
 *   (4032 × 3024, EXIF orientation 6 and a capture time, as a phone writes it), one per request;
 *   each is timed from the request until its renditions are stored and it is marked ready (the
 *   database is read every 10 ms). It covers the HTTP upload streamed to disk, the type and EXIF checks, the
 *   original written to the photo store, the row, the audit entry, the queued job, the worker's
 *   decode, both renditions and their writes.
 * - Bare: read the same file from disk and make the same renditions with sharp alone (display:
 *   rotate, fit inside 1600 px, JPEG quality 82; thumbnail from the display copy: 320 px,
 *   quality 82, mozjpeg). Tideline and bare take turns photo by photo.
 * - Per run the ratio is Tideline's total over bare's; printed as median [min–max] over
 *   BENCH_RUNS runs. The upload wakes the instance's own worker (Jobs.wake), so no poll is waited
 *   for; the polling interval is left as deployed.
 * BENCH_INGEST=0 skips it.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { sql } from "kysely";
import sharp from "sharp";
import { openLocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";
import { ensureDatabase, projectRoot } from "../../db/pg";
import { BENCH_PASSWORD, generateSite } from "../bench/site";
import { spread, table } from "../bench/stats";
import { createDb, MAINTENANCE_DB_OPTIONS } from "../db";
import { DISPLAY_PX, THUMB_PX } from "../photos/images";

const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const PHOTOS = Number(process.env.BENCH_INGEST_PHOTOS ?? 8);

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

/** The same renditions as server/photos/images.ts renderRenditions, with nothing around them. */
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
  return display.length + thumb.length;
}

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

export async function benchIngest() {
  console.log(`\n── photo ingest: ${PHOTOS} uploads of a 12 MP JPEG against bare sharp (${RUNS} runs)`);
  const local = await openLocalDatabase("test", "postgres");
  const name = `tideline_bench_ingest_${randomBytes(4).toString("hex")}`;
  await ensureDatabase(local.adminUrl, name, { fresh: true, owner: local.appRole });
  const url = local.url.replace(/\/postgres$/, `/${name}`);
  const work = await mkdtemp(join(tmpdir(), "tideline-bench-ingest-"));
  const setup = createDb(url, MAINTENANCE_DB_OPTIONS);
  let instance: ChildProcess | undefined;
  try {
    await migrateToLatest(setup);
    const site = await generateSite(setup, 200);
    const position = await setup
      .selectFrom("positions")
      .select("id")
      .where("siteId", "=", site.siteId)
      .limit(1)
      .executeTakeFirstOrThrow();
    const photo = await phonePhoto();
    const file = join(work, "IMG_0001.jpg");
    await writeFile(file, photo);
    const A = await startInstance({
      DATABASE_URL: url,
      PHOTO_DIR: join(work, "store"),
      SMTP_PORT: String(await freePort()),
    });
    instance = A.child;
    const signIn = await fetch(`${A.base}/api/auth/sign-in`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: A.base },
      body: JSON.stringify({ email: site.curatorEmail, password: BENCH_PASSWORD }),
    });
    const cookie = (signIn.headers.getSetCookie()[0] ?? "").split(";")[0];
    const uploadOne = async () => {
      const form = new FormData();
      form.set("positionId", position.id);
      form.append("files", new Blob([new Uint8Array(photo)], { type: "image/jpeg" }), "IMG_0001.jpg");
      const r = await fetch(`${A.base}/api/sites/${site.siteId}/photos`, {
        method: "POST",
        headers: { cookie, origin: A.base },
        body: form,
      });
      if (r.status !== 201 && r.status !== 200) throw new Error(`upload answered ${r.status}: ${await r.text()}`);
      const body = (await r.json()) as { ids?: string[]; photos?: Array<{ id: string }> };
      return body.ids ?? (body.photos ?? []).map((p) => p.id);
    };
    const allReady = async (ids: string[]) => {
      for (;;) {
        const row = await sql<{ waiting: number; failed: number }>`
          select count(*) filter (where rendition_state = 'processing')::int as waiting,
                 count(*) filter (where rendition_state = 'failed')::int as failed
          from photos where id = any(${ids}::uuid[])`.execute(setup);
        const { waiting, failed } = row.rows[0];
        if (failed) throw new Error(`${failed} renditions failed`);
        if (!waiting) return;
        await new Promise((r) => setTimeout(r, 10));
      }
    };
    // One upload first: the server's first request compiles and warms what later ones reuse.
    await allReady(await uploadOne());
    await bareRenditions(file);

    const app: number[] = [];
    const request: number[] = [];
    const queueWait: number[] = [];
    const jobRun: number[] = [];
    const bare: number[] = [];
    const ratio: number[] = [];
    for (let run = 0; run < RUNS; run++) {
      // One photo at a time, Tideline and bare sharp in turn (the order swapped every photo), so
      // a change in the machine's load meets both sides alike.
      const runIds: string[] = [];
      let a = 0;
      let u = 0;
      let b = 0;
      for (let i = 0; i < PHOTOS; i++) {
        const tideline = async () => {
          const t = performance.now();
          const ids = await uploadOne();
          runIds.push(...ids);
          u += (performance.now() - t) / 1000;
          await allReady(ids);
          a += (performance.now() - t) / 1000;
        };
        const alone = async () => {
          const t = performance.now();
          await bareRenditions(file);
          b += (performance.now() - t) / 1000;
        };
        if (i % 2) {
          await alone();
          await tideline();
        } else {
          await tideline();
          await alone();
        }
      }
      app.push(a);
      request.push(u);
      // Where the rest went, from the queue's own rows: waiting for a worker, and the job itself.
      const q = await sql<{ wait: number; run: number }>`
        select coalesce(sum(extract(epoch from started_on - created_on)), 0)::float8 as wait,
               coalesce(sum(extract(epoch from completed_on - started_on)), 0)::float8 as run
        from pgboss.job where name = 'photo.renditions' and data->>'photoId' = any(${runIds})`.execute(setup);
      queueWait.push(q.rows[0].wait);
      jobRun.push(q.rows[0].run);
      bare.push(b);
      ratio.push(a / b);
    }
    console.log(
      table(
        ["case", "seconds", "per photo s"],
        [
          [
            `Tideline: upload → renditions ready (${PHOTOS} photos)`,
            spread(app, 2),
            spread(
              app.map((x) => x / PHOTOS),
              2,
            ),
          ],
          [
            "  of which the upload request (to its 201)",
            spread(request, 2),
            spread(
              request.map((x) => x / PHOTOS),
              2,
            ),
          ],
          [
            "  of which waiting for the worker",
            spread(queueWait, 2),
            spread(
              queueWait.map((x) => x / PHOTOS),
              2,
            ),
          ],
          [
            "  of which the rendition job",
            spread(jobRun, 2),
            spread(
              jobRun.map((x) => x / PHOTOS),
              2,
            ),
          ],
          [
            `bare sharp: same renditions, same file`,
            spread(bare, 2),
            spread(
              bare.map((x) => x / PHOTOS),
              2,
            ),
          ],
          ["ratio Tideline ÷ bare (within each run)", spread(ratio, 2), ""],
        ],
      ),
    );
    console.log(
      `(photo ${(photo.length / 1024 / 1024).toFixed(1)} MB, 4032 × 3024, EXIF orientation 6; median [min–max])`,
    );
  } finally {
    if (instance) {
      instance.kill("SIGTERM");
      await new Promise((r) => (instance!.exitCode !== null ? r(null) : instance!.once("exit", r)));
    }
    await setup.destroy();
    const admin = createDb(local.adminUrl, MAINTENANCE_DB_OPTIONS);
    await sql`DROP DATABASE IF EXISTS ${sql.id(name)} WITH (FORCE)`.execute(admin);
    await admin.destroy();
    await rm(work, { recursive: true, force: true });
    local.stop();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) await benchIngest();

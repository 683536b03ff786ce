/**
 * The condition survey report of a 500-position board with 2,000 photos:
 * time, size, pages and memory, over HTTP from the in-process server, as `npm run bench`'s
 * report case (server/cli/bench.ts calls benchReport()). Runs alone with
 * `node --import tsx server/cli/bench-report.ts`. BENCH_REPORT_RUNS (default 3).
 *
 * Photos are real 1600 × 1200 JPEG display copies (noise, so they compress like photos),
 * 20 different pictures served from memory under 2,000 keys: each one is still decoded
 * and downscaled by sharp; only the disk read is left out. Beside the report, the same
 * run times the bare libraries: sharp downscaling the 2,000 photos alone, and pdfkit
 * writing the same number of pages of plain text.
 */
import { randomBytes, randomUUID } from "node:crypto";
import type { AddressInfo } from "node:net";
import { Readable } from "node:stream";
import { pathToFileURL } from "node:url";
import { sql } from "kysely";
import PDFDocument from "pdfkit";
import pg from "pg";
import sharp from "sharp";
import { openLocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";
import { ensureDatabase } from "../../db/pg";
import { createApp } from "../app";
import { hashPassword } from "../auth/password";
import { refreshBoardSummaries } from "../inventory/board-summaries-repository";
import { createDb, MAINTENANCE_DB_OPTIONS, type Db } from "../db";
import { StorageNotFound, type PhotoStorage } from "../photos/storage";
import { downscale, REPORT_PHOTO_PX } from "../reports/service";

const RUNS = Number(process.env.BENCH_REPORT_RUNS ?? 3);
const ROWS = 25,
  COLS = 20; // 500 positions
const PHOTOS_PER_POSITION = 4;
const PASSWORD = "bench-password-123";

/** Display copies in memory: 20 distinct pictures behind every key. */
async function memoryPhotos() {
  const pool: Buffer[] = [];
  for (let i = 0; i < 20; i++) {
    const raw = randomBytes(400 * 300 * 3);
    pool.push(
      await sharp(raw, { raw: { width: 400, height: 300, channels: 3 } })
        .resize(1600, 1200, { kernel: "cubic" })
        .blur(0.6)
        .jpeg({ quality: 82 })
        .toBuffer(),
    );
  }
  const bytesOf = (key: string) => {
    const m = /\/(\d+)\//.exec(key);
    if (!m) throw new StorageNotFound(key);
    return pool[Number(m[1]) % pool.length];
  };
  const storage: PhotoStorage = {
    kind: "disk",
    put: async () => {},
    putFile: async () => {},
    check: async () => {},
    delete: async () => {},
    listKeys: async () => [],
    get: async (key) => Readable.from([bytesOf(key)]),
    getBytes: async (key) => bytesOf(key),
    decodeSource: async (key) => bytesOf(key),
  };
  return { storage, pool };
}

async function seed(db: Db) {
  const site = await db
    .insertInto("sites")
    .values({ name: "Bench tender", kind: "vessel" })
    .returning("id")
    .executeTakeFirstOrThrow();
  const u = await db
    .insertInto("users")
    .values({ email: "report-bench@example.test", name: "Bench surveyor", passwordHash: await hashPassword(PASSWORD) })
    .returning("id")
    .executeTakeFirstOrThrow();
  await db.insertInto("memberships").values({ siteId: site.id, userId: u.id, role: "viewer" }).execute();
  const s = site.id;
  const board = await db
    .insertInto("boards")
    .values({
      siteId: s,
      name: "Bench main board",
      gridRows: ROWS,
      gridCols: COLS,
      faceHeightMm: 2100,
      waterLineMm: 900,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  await db
    .insertInto("floodEvents")
    .values({ siteId: s, occurredOn: "2026-10-01", waterType: "salt", maxDepthM: 1.1, hoursSubmerged: 30 })
    .execute();
  await sql`INSERT INTO sections (site_id, board_id, name, sort_order) SELECT ${s}, ${board.id}, 'Section ' || k, k FROM generate_series(1, 5) k`.execute(
    db,
  );
  await sql`INSERT INTO positions (site_id, board_id, section_id, designation, kind, grid_row, grid_col, sort_order, circuit)
    SELECT ${s}, ${board.id}, (SELECT id FROM sections WHERE board_id = ${board.id} AND sort_order = 1 + (r - 1) / 5), r || '-' || c, 'molded_case_breaker', r, c, r * 100 + c, 'Feeder ' || r || '-' || c
    FROM generate_series(1, ${ROWS}) r, generate_series(1, ${COLS}) c`.execute(db);
  await sql`INSERT INTO components (site_id, position_id, kind, maker, model, rating_amps, poles, voltage_rating, heritage, tag_number, disposition, disposition_reason)
    SELECT site_id, id, kind, 'Bench Electric Co.', 'Type QB-' || (grid_col % 4), 100, 3, 600, (ARRAY['original','original','period','modern'])[1 + grid_col % 4],
      'B-' || lpad((grid_row * 100 + grid_col)::text, 4, '0'), (ARRAY['clean','rebuild','replace','source'])[1 + grid_row % 4],
      CASE WHEN grid_row % 4 = 2 THEN 'Arc chute cracked; contacts pitted beyond dressing.' ELSE '' END
    FROM positions WHERE board_id = ${board.id}`.execute(db);
  await sql`INSERT INTO inspections (site_id, component_id, position_id, inspector_id, inspected_at, percent_rusted, astm_grade, below_water_line, contaminants, notes)
    SELECT c.site_id, c.id, c.position_id, ${u.id}, now() - (p.grid_row || ' days')::interval, (p.grid_col % 11) * 3, 10 - (p.grid_col % 11), p.grid_row > 12,
      ARRAY['silt','salt_crust']::text[], 'Silt line at the lower third; terminals green with salt.'
    FROM components c JOIN positions p ON p.id = c.position_id WHERE p.board_id = ${board.id}`.execute(db);
  await db.transaction().execute((trx) => refreshBoardSummaries(trx, [board.id])); // as the inventory services do
  await sql`INSERT INTO insulation_readings (site_id, board_id, component_id, circuit, test_volts_dc, megohms, conductors, equipment_temp_c, measured_at, recorded_by)
    SELECT c.site_id, ${board.id}, c.id, p.circuit, 1000, 0.5 * k * k, 'A-B', 24, now() - ((6 - k) || ' days')::interval, ${u.id}
    FROM components c JOIN positions p ON p.id = c.position_id, generate_series(1, 5) k WHERE p.board_id = ${board.id} AND p.grid_col <= 4`.execute(
    db,
  );
  const positions = await db
    .selectFrom("positions as p")
    .innerJoin("components as c", "c.positionId", "p.id")
    .select(["p.id", "c.id as componentId"])
    .where("p.boardId", "=", board.id)
    .execute();
  let n = 0;
  const photos = positions.flatMap((p) =>
    Array.from({ length: PHOTOS_PER_POSITION }, (_, k) => {
      const id = randomUUID();
      const key = `sites/${s}/${n++}/${id}`;
      return {
        id,
        siteId: s,
        boardId: board.id,
        positionId: p.id,
        componentId: p.componentId,
        kind: (k < 2 ? "as_found" : "after_work") as "as_found" | "after_work",
        format: "jpeg",
        width: 1600,
        height: 1200,
        bytes: 300_000,
        originalKey: `${key}/o`,
        displayKey: `${key}/d`,
        thumbKey: `${key}/t`,
        uploadedBy: u.id,
      };
    }),
  );
  for (let i = 0; i < photos.length; i += 500)
    await db
      .insertInto("photos")
      .values(photos.slice(i, i + 500))
      .execute();
  await sql`INSERT INTO defects (site_id, board_id, position_id, component_id, title, category, severity, created_by)
    SELECT c.site_id, ${board.id}, c.position_id, c.id, 'Bench defect ' || row_number() over (), 'corrosion', 'degraded', ${u.id}
    FROM components c JOIN positions p ON p.id = c.position_id WHERE p.board_id = ${board.id} AND p.grid_col % 3 = 0`.execute(
    db,
  );
  return { siteId: s, boardId: board.id, email: "report-bench@example.test", photos: photos.length };
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const spread = (xs: number[]) => `${Math.min(...xs).toFixed(1)}–${Math.max(...xs).toFixed(1)}`;

export async function benchReport() {
  const local = await openLocalDatabase("test", "postgres");
  const name = `tideline_bench_report_${randomBytes(4).toString("hex")}`;
  await ensureDatabase(local.adminUrl, name, { fresh: true, owner: local.appRole });
  const db = createDb(local.url.replace(/\/postgres$/, `/${name}`), { ...MAINTENANCE_DB_OPTIONS, max: 5 });
  try {
    await migrateToLatest(db);
    const t0 = performance.now();
    const fx = await seed(db);
    const { storage, pool } = await memoryPhotos();
    console.log(
      `\nReport case: one board of ${ROWS * COLS} positions and ${fx.photos} photos (display copies ${(pool[0].length / 1e3).toFixed(0)} kB, 1600 × 1200 JPEG) seeded in ${((performance.now() - t0) / 1000).toFixed(1)} s; ${RUNS} runs`,
    );
    const server = createApp({ db, photoStorage: storage }).listen(0, "127.0.0.1");
    await new Promise((r) => server.once("listening", r));
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const signIn = await fetch(`${base}/api/auth/sign-in`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: base },
      body: JSON.stringify({ email: fx.email, password: PASSWORD }),
    });
    const cookie = signIn.headers.getSetCookie()[0].split(";")[0];

    const measure = async (photos: boolean) => {
      global.gc?.();
      const rss0 = process.memoryUsage().rss;
      let peak = rss0;
      const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 25);
      const a = performance.now();
      const res = await fetch(
        `${base}/api/sites/${fx.siteId}/reports/survey.pdf?boardId=${fx.boardId}&photos=${photos ? "yes" : "no"}`,
        { headers: { cookie } },
      );
      const firstByte = performance.now() - a;
      let bytes = 0;
      for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) bytes += chunk.length;
      const secs = (performance.now() - a) / 1000;
      clearInterval(sampler);
      if (res.status !== 200) throw new Error(`report answered ${res.status}`);
      return {
        secs,
        firstByte,
        mb: bytes / 1e6,
        pages: Number(res.headers.get("x-report-pages")),
        peakMb: (peak - rss0) / 1e6,
      };
    };
    const rows: Array<[string, Awaited<ReturnType<typeof measure>>[]]> = [];
    for (const photos of [true, false]) {
      const runs = [];
      for (let i = 0; i < RUNS; i++) runs.push(await measure(photos));
      rows.push([photos ? "with 2000 photos" : "without photos", runs]);
    }

    // Bare libraries, same process, same data sizes.
    const s0 = performance.now();
    for (let i = 0; i < fx.photos; i++) await downscale(pool[i % pool.length]);
    const sharpSecs = (performance.now() - s0) / 1000;
    const pages = rows[0][1][0].pages;
    const p0 = performance.now();
    await new Promise<void>((resolve) => {
      const doc = new PDFDocument({ autoFirstPage: false });
      doc.on("data", () => {});
      doc.on("end", () => resolve());
      for (let i = 0; i < pages; i++) doc.addPage().fontSize(9).text("Plain text page ".repeat(120));
      doc.end();
    });
    const pdfkitSecs = (performance.now() - p0) / 1000;

    console.log(
      `${"report".padEnd(18)} ${"seconds p50 (min–max)".padEnd(24)} ${"first byte ms".padEnd(14)} ${"MB".padEnd(6)} ${"pages".padEnd(6)} peak RSS growth MB p50 (min–max)`,
    );
    for (const [label, runs] of rows)
      console.log(
        `${label.padEnd(18)} ${`${median(runs.map((r) => r.secs)).toFixed(1)} (${spread(runs.map((r) => r.secs))})`.padEnd(24)} ${median(
          runs.map((r) => r.firstByte),
        )
          .toFixed(0)
          .padEnd(14)} ${median(runs.map((r) => r.mb))
          .toFixed(1)
          .padEnd(
            6,
          )} ${String(runs[0].pages).padEnd(6)} ${median(runs.map((r) => r.peakMb)).toFixed(0)} (${spread(runs.map((r) => r.peakMb))})`,
      );
    const withPhotos = median(rows[0][1].map((r) => r.secs));
    const without = median(rows[1][1].map((r) => r.secs));
    console.log(
      `bare sharp, ${fx.photos} downscales to ${REPORT_PHOTO_PX} px: ${sharpSecs.toFixed(1)} s → report with photos / sharp alone = ${(withPhotos / sharpSecs).toFixed(2)}`,
    );
    console.log(
      `bare pdfkit, ${pages} pages of plain text: ${pdfkitSecs.toFixed(1)} s → report without photos / pdfkit alone = ${(without / pdfkitSecs).toFixed(2)}`,
    );
    console.log(
      "(first byte = the dry run that numbers the pages, plus the data load; peak RSS growth = the whole process, sampled every 25 ms, over its size before the request)",
    );
    server.closeAllConnections();
    server.close();
  } finally {
    await db.destroy();
    const c = new pg.Client({ connectionString: local.adminUrl });
    await c.connect();
    await c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
    await c.end();
    local.stop();
    console.log(`dropped ${name}`);
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) await benchReport();

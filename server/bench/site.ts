/**
 * A realistic generated site for `npm run bench`: an invented fleet-yard job of
 * 100 boards of uneven size (the largest several times the smallest, up to the 60 × 60 grid),
 * sections in row bands, one component per position with a nameplate (invented makers), tags
 * on most, dispositions decided on most with reasons, custody spread along the chain, one to
 * three inspections each, one photo row per position, defects on about 0.3 of the positions
 * (60,000 at 200,000) with curator's-order pins that really pin, and the wanted list built from
 * the dispositions and defects by the parts domain's own reconciliation.
 *
 * Everything is set-based SQL over generate_series, with hashtext() of the row's ids as the
 * dice, so 200,000 positions take minutes, not hours. Nothing here is a real vessel or person.
 */
import { sql } from "kysely";
import { hashPassword } from "../auth/password";
import type { Db } from "../db";
import { reconcileDemand } from "../parts/demand";
import { refreshSiteSummaries } from "../inventory/board-summaries-repository";
import { priorityScore } from "../../src/domain/priority";

export const BENCH_PASSWORD = "bench-password-123";
const BOARDS = 100;
const COLS = 60;
const SITE_NAME = "Bench yard — hulls 1 to 9";

export interface BenchSite {
  siteId: string;
  curatorEmail: string;
  viewerEmail: string;
  /** The board with the most positions (the "one board" case) and its size. */
  largestBoard: { id: string; positions: number };
  counts: Record<string, number>;
  seedMs: number;
}

/** Board sizes that sum to `positions`, uneven (0.3 × to 1.7 × the mean) and never past the grid. */
export function boardSizes(positions: number, boards = BOARDS): number[] {
  const mean = positions / boards;
  const f = Array.from({ length: boards }, (_, b) => 0.3 + (1.4 * ((b * 37) % 100)) / 99);
  const scale = boards / f.reduce((a, x) => a + x, 0);
  const sizes = f.map((x) => Math.max(1, Math.min(COLS * 60, Math.floor(mean * x * scale))));
  let left = positions - sizes.reduce((a, x) => a + x, 0);
  for (let b = 0; left !== 0; b = (b + 1) % boards) {
    const step = left > 0 ? 1 : -1;
    if (sizes[b] + step >= 1 && sizes[b] + step <= COLS * 60) {
      sizes[b] += step;
      left -= step;
    }
  }
  return sizes;
}

/** h(expr, salt): a stable 0…99 die from a row's id. */
const die = (expr: string, salt: string) => sql.raw(`(abs(hashtext(${expr}::text || '${salt}')) % 100)`);

export async function generateSite(
  db: Db,
  positions: number,
  log: (s: string) => void = () => {},
  opts: { boards?: number } = {},
): Promise<BenchSite> {
  const t0 = performance.now();
  const step = async (label: string, q: ReturnType<typeof sql>) => {
    const a = performance.now();
    await q.execute(db);
    log(`  ${label} ${((performance.now() - a) / 1000).toFixed(1)} s`);
  };
  // The per-position steps run a few boards at a time (BENCH_CHUNK_BOARDS, default 10), each chunk
  // its own statement: at 200,000 positions no single statement holds minutes of work and
  // gigabytes of WAL, and the log shows how far it got.
  let chunks: { ids: string[]; offset: number }[] = [];
  const chunked = async (label: string, q: (ids: string[], offset: number) => ReturnType<typeof sql>) => {
    const a = performance.now();
    for (const [k, c] of chunks.entries()) {
      await q(c.ids, c.offset).execute(db);
      if (chunks.length > 1 && (k + 1) % Math.ceil(chunks.length / 4) === 0)
        log(`    ${label}: ${k + 1}/${chunks.length} chunks, ${((performance.now() - a) / 1000).toFixed(1)} s`);
    }
    log(`  ${label} ${((performance.now() - a) / 1000).toFixed(1)} s`);
  };
  const site = await db
    .insertInto("sites")
    .values({ name: SITE_NAME, kind: "vessel", location: "Invented dry dock" })
    .returning("id")
    .executeTakeFirstOrThrow();
  const s = site.id;
  const hash = await hashPassword(BENCH_PASSWORD);
  const crew: string[] = [];
  const roles = ["curator", "viewer", "volunteer", "volunteer", "volunteer", "photographer", "scrounger", "volunteer"];
  for (const [i, role] of roles.entries()) {
    const u = await db
      .insertInto("users")
      .values({ email: `bench${i}@example.test`, name: `Bench person ${i}`, passwordHash: hash })
      .returning("id")
      .executeTakeFirstOrThrow();
    await db
      .insertInto("memberships")
      .values({ siteId: s, userId: u.id, role: role as "curator" })
      .execute();
    crew.push(u.id);
  }
  const curator = crew[0];
  await db
    .insertInto("floodEvents")
    .values({ siteId: s, occurredOn: "2026-10-01", waterType: "salt", maxDepthM: 1.1, hoursSubmerged: 30 })
    .execute();

  const sizes = boardSizes(positions, opts.boards ?? BOARDS);
  const values = sizes.map((n, b) => {
    const rows = Math.ceil(n / COLS);
    return sql`(${b + 1}::int, ${n}::int, ${rows}::int, ${Math.max(1, Math.min(10, Math.ceil(rows / 2)))}::int)`;
  });
  await step(
    "boards",
    sql`INSERT INTO boards (site_id, name, location, grid_rows, grid_cols, face_height_mm, water_line_mm, year_built)
      SELECT ${s}, 'Board ' || lpad(v.b::text, 3, '0'), 'Hull ' || (1 + v.b % 9) || ', deck ' || (1 + v.b % 3), greatest(v.r, 1), ${COLS}, 2100, 400 + (v.b * 53) % 900, 1938 + v.b % 30
      FROM (VALUES ${sql.join(values)}) v(b, n, r, k)`,
  );
  await sql`DROP TABLE IF EXISTS bench_board_sizes`.execute(db);
  await sql`CREATE UNLOGGED TABLE bench_board_sizes (board_id uuid, n int, r int, k int)`.execute(db);
  await sql`INSERT INTO bench_board_sizes SELECT bo.id, v.n, greatest(v.r, 1), v.k FROM (VALUES ${sql.join(values)}) v(b, n, r, k)
    JOIN boards bo ON bo.site_id = ${s} AND bo.name = 'Board ' || lpad(v.b::text, 3, '0')`.execute(db);
  {
    const per = Math.max(1, Number(process.env.BENCH_CHUNK_BOARDS ?? 10));
    const { rows } = await sql<{
      id: string;
      n: number;
    }>`SELECT board_id AS id, n FROM bench_board_sizes ORDER BY board_id`.execute(db);
    chunks = [];
    for (let i = 0, offset = 0; i < rows.length; i += per) {
      const part = rows.slice(i, i + per);
      chunks.push({ ids: part.map((r) => r.id), offset });
      offset += part.reduce((t, r) => t + r.n, 0);
    }
  }
  const inChunk = (col: string, ids: string[]) => sql`${sql.ref(col)} = ANY(${ids}::uuid[])`;
  await step(
    "sections",
    sql`INSERT INTO sections (site_id, board_id, name, sort_order)
      SELECT ${s}, z.board_id, 'Section ' || chr(64 + g.k), g.k FROM bench_board_sizes z, generate_series(1, z.k) g(k)`,
  );
  await chunked(
    "positions",
    (
      ids,
    ) => sql`INSERT INTO positions (site_id, board_id, section_id, designation, kind, grid_row, grid_col, circuit, sort_order)
      SELECT ${s}, z.board_id, sec.id, (1 + i / ${COLS}) || '-' || (1 + i % ${COLS}),
        CASE WHEN h < 38 THEN 'molded_case_breaker' WHEN h < 44 THEN 'power_breaker' WHEN h < 54 THEN 'meter'
             WHEN h < 57 THEN 'ground_lamp' WHEN h < 76 THEN 'fuse' WHEN h < 84 THEN 'switch' WHEN h < 90 THEN 'relay'
             WHEN h < 95 THEN 'terminal_strip' WHEN h < 97 THEN 'bus_tie' ELSE 'other' END,
        1 + i / ${COLS}, 1 + i % ${COLS}, 'Feeder ' || (1 + i / ${COLS}) || '.' || (1 + i % ${COLS}), i
      FROM bench_board_sizes z
      CROSS JOIN LATERAL generate_series(0, z.n - 1) i
      CROSS JOIN LATERAL (SELECT abs(hashtext(z.board_id::text || i)) % 100 AS h) d
      JOIN sections sec ON sec.board_id = z.board_id AND sec.sort_order = 1 + ((i / ${COLS}) * z.k) / z.r
      WHERE ${inChunk("z.board_id", ids)}`,
  );
  await chunked(
    "components",
    (
      ids,
      offset,
    ) => sql`INSERT INTO components (site_id, position_id, kind, maker, model, frame, rating_amps, poles, voltage_rating, year, heritage,
        tag_number, custody, disposition, disposition_reason, disposition_by, disposition_at)
      SELECT p.site_id, p.id, p.kind,
        (ARRAY['Harrow & Vance', 'Bellweather Electric', 'Northgate Switchgear', 'Cordell Marine', 'Ashby Instrument Co.'])[1 + ${die("p.id", "m")} % 5],
        (ARRAY['QB', 'HX', 'NT', 'CM', 'AI'])[1 + ${die("p.id", "m")} % 5] || '-' || (10 + ${die("p.id", "t")} % 6),
        CASE WHEN p.kind IN ('molded_case_breaker', 'power_breaker') THEN (ARRAY['F', 'J', 'K'])[1 + ${die("p.id", "f")} % 3] ELSE '' END,
        (ARRAY[15, 20, 30, 50, 100, 225, 400, 800])[1 + ${die("p.id", "a")} % 8],
        CASE WHEN p.kind IN ('molded_case_breaker', 'power_breaker', 'switch', 'fuse') THEN 3 END, 600, 1938 + ${die("p.id", "y")} % 40,
        (ARRAY['original', 'original', 'original', 'period', 'modern'])[1 + ${die("p.id", "o")} % 5],
        CASE WHEN ${die("p.id", "g")} < 60 THEN 'BY-' || lpad((${offset}::int + row_number() over ())::text, 6, '0') END,
        (ARRAY['in_place', 'in_place', 'in_place', 'removed', 'in_workshop', 'ready_to_refit', 'refitted'])[1 + ${die("p.id", "c")} % 7],
        CASE WHEN ${die("p.id", "d")} < 30 THEN NULL ELSE (ARRAY['clean', 'clean', 'clean', 'rebuild', 'rebuild', 'replace', 'source'])[1 + ${die("p.id", "e")} % 7] END,
        CASE WHEN ${die("p.id", "d")} >= 30 THEN 'Salt crust on the terminals; contacts ' || (ARRAY['bright under it', 'pitted', 'burnt'])[1 + ${die("p.id", "e")} % 3] || '.' ELSE '' END,
        CASE WHEN ${die("p.id", "d")} >= 30 THEN ${curator}::uuid END, CASE WHEN ${die("p.id", "d")} >= 30 THEN now() - interval '10 days' END
      FROM positions p WHERE p.site_id = ${s} AND ${inChunk("p.board_id", ids)}`,
  );
  await chunked(
    "inspections",
    (
      ids,
    ) => sql`INSERT INTO inspections (site_id, component_id, position_id, inspector_id, inspected_at, percent_rusted, astm_grade, below_water_line, contaminants, mechanism, insulation, notes)
      SELECT c.site_id, c.id, c.position_id, (${sql.raw(`ARRAY['${crew[2]}','${crew[3]}','${crew[4]}']::uuid[]`)})[1 + k % 3],
        now() - ((30 - k * 9) || ' days')::interval, (ARRAY[0, 0.01, 0.03, 0.1, 0.3, 1, 3, 10, 16, 33, 50])[1 + (${die("c.id", "r")} + k) % 11],
        10 - (${die("c.id", "r")} + k) % 11, ${die("c.id", "w")} < 55,
        CASE ${die("c.id", "x")} % 3 WHEN 0 THEN ARRAY['silt', 'salt_crust'] WHEN 1 THEN ARRAY['water_marks', 'corrosion_products'] ELSE ARRAY['silt', 'oil'] END::text[],
        (ARRAY['free', 'stiff', 'seized', 'not_tried'])[1 + ${die("c.id", "k")} % 4], (ARRAY['intact', 'intact', 'tracking', 'swollen'])[1 + ${die("c.id", "i")} % 4],
        'Silt line at the lower third; terminals green with salt.'
      FROM components c JOIN positions p ON p.id = c.position_id AND ${inChunk("p.board_id", ids)}
      CROSS JOIN LATERAL generate_series(1, 1 + ${die("c.id", "n")} % 3) g(k) WHERE c.site_id = ${s}`,
  );
  await chunked(
    "photos",
    (
      ids,
    ) => sql`INSERT INTO photos (site_id, board_id, position_id, component_id, kind, format, width, height, bytes, original_key, display_key, thumb_key, uploaded_by, rendition_state, captured_at, camera_model)
      SELECT p.site_id, p.board_id, p.id, c.id, (ARRAY['as_found', 'nameplate', 'damage', 'after_work'])[1 + ${die("p.id", "p")} % 4], 'jpeg', 4000, 3000, 4200000,
        'sites/' || p.site_id || '/bench/' || p.id || '/o', 'sites/' || p.site_id || '/bench/' || p.id || '/d', 'sites/' || p.site_id || '/bench/' || p.id || '/t',
        ${crew[5]}, 'ready', now() - interval '20 days', 'Bench phone'
      FROM positions p JOIN components c ON c.position_id = p.id WHERE p.site_id = ${s} AND ${inChunk("p.board_id", ids)}`,
  );
  // Defects on about 30 % of positions, scored by the domain's own priorityScore (20 combinations).
  const scores: string[] = [];
  const sev = ["cosmetic", "degraded", "impaired", "disabling"] as const;
  const parts = ["none_needed", "in_hand", "wanted", "unobtainable"] as const;
  for (const severity of sev)
    for (const partsAvailable of parts)
      for (const safetyCritical of [false, true])
        for (const originalFabric of [false, true]) {
          const { score } = priorityScore({
            severity,
            safetyCritical,
            blocksEnergisation: false,
            originalFabric,
            effortHours: 4,
            partsAvailable,
          });
          scores.push(`('${severity}','${partsAvailable}',${safetyCritical},${originalFabric},${score})`);
        }
  await chunked(
    "defects",
    (
      ids,
    ) => sql`INSERT INTO defects (site_id, board_id, section_id, position_id, component_id, title, description, category, severity, status, safety_critical,
        blocks_energisation, effort_hours, cost_estimate, parts_needed, parts_state, assignee_id, due_on, priority_score, created_by, created_at)
      SELECT x.site_id, x.board_id, x.section_id, x.position_id, x.component_id, x.title, x.description, x.category, x.severity, x.status, x.safety,
        false, 4, x.cost, x.parts_needed, x.parts_state, x.assignee, x.due, sc.score, ${crew[2]}, now() - (x.h || ' hours')::interval
      FROM (
        SELECT p.site_id, p.board_id, p.section_id, p.id AS position_id, c.id AS component_id, h,
          (ARRAY['Arc track on the line side', 'Salt crust under the arc chute', 'Seized operating handle', 'Verdigris on the terminals', 'Loose lug', 'Cracked meter glass', 'Swollen insulation', 'Missing cover screw'])[1 + h % 8] || ' (' || p.designation || ')' AS title,
          CASE WHEN h % 3 = 0 THEN 'Found during the wash-down survey; see the as-found photo.' ELSE '' END AS description,
          (ARRAY['corrosion', 'contamination', 'insulation', 'mechanical'])[1 + h % 4] AS category,
          (ARRAY['cosmetic', 'degraded', 'impaired', 'disabling'])[1 + (h / 4) % 4] AS severity,
          (ARRAY['raised', 'scheduled', 'under_repair', 'awaiting_retest', 'closed', 'deferred', 'raised'])[1 + (h / 3) % 7] AS status,
          h % 11 = 0 AS safety, CASE WHEN h % 4 = 0 THEN NULL ELSE (h % 50) * 10 END AS cost,
          CASE WHEN h % 5 = 0 THEN 'arc chute' ELSE '' END AS parts_needed,
          (ARRAY['none_needed', 'in_hand', 'wanted', 'unobtainable'])[1 + (h / 16) % 4] AS parts_state,
          CASE WHEN h % 3 = 0 THEN NULL ELSE (${sql.raw(`ARRAY['${crew[2]}','${crew[3]}','${crew[4]}','${crew[7]}']::uuid[]`)})[1 + h % 4] END AS assignee,
          CASE WHEN h % 2 = 0 THEN date '2027-01-01' + (h % 150) END AS due, c.heritage = 'original' AS original
        FROM positions p JOIN components c ON c.position_id = p.id
        CROSS JOIN LATERAL (SELECT abs(hashtext(p.id::text || 'defect')) % 1000 AS h) d
        WHERE p.site_id = ${s} AND ${die("p.id", "has-defect")} < 30 AND ${inChunk("p.board_id", ids)}
      ) x
      JOIN (VALUES ${sql.raw(scores.join(","))}) sc(severity, parts, safety, original, score)
        ON sc.severity = x.severity AND sc.parts = x.parts_state AND sc.safety = x.safety AND sc.original = x.original`,
  );
  // 40 curator's-order pins, each against an unpinned defect (pins do not chain). The second list is numbered
  // after its OFFSET: numbered before it, its numbers started at 1001 and no pin was made.
  await step(
    "pins",
    sql`INSERT INTO defect_pins (site_id, defect_id, relative_to, direction, reason, pinned_by)
      SELECT ${s}, a.id, b.id, CASE WHEN a.n % 2 = 0 THEN 'above' ELSE 'below' END, 'Do these together: same scaffold', ${curator}
      FROM (SELECT id, row_number() over (ORDER BY ref) n FROM defects WHERE site_id = ${s} ORDER BY ref LIMIT 40) a
      JOIN (SELECT id, row_number() over (ORDER BY ref) n
            FROM (SELECT id, ref FROM defects WHERE site_id = ${s} ORDER BY ref OFFSET 1000 LIMIT 40) q) b ON a.n = b.n`,
  );
  let a = performance.now();
  await db.transaction().execute((trx) => reconcileDemand(trx, s, curator));
  log(`  wanted list (reconcileDemand) ${((performance.now() - a) / 1000).toFixed(1)} s`);
  a = performance.now();
  // The rows above went in directly: fill the overview's per-board summaries as the inventory services keep them.
  await db.transaction().execute((trx) => refreshSiteSummaries(trx, s));
  log(`  board summaries ${((performance.now() - a) / 1000).toFixed(1)} s`);
  await sql`DROP TABLE IF EXISTS bench_board_sizes`.execute(db);
  a = performance.now();
  await sql`VACUUM ANALYZE`.execute(db);
  log(`  vacuum analyze ${((performance.now() - a) / 1000).toFixed(1)} s`);
  // The mark of a whole site: BENCH_DATABASE refuses a database whose generation was cut off.
  await sql`CREATE TABLE IF NOT EXISTS bench_generated (positions int NOT NULL, at timestamptz NOT NULL DEFAULT now())`.execute(
    db,
  );
  await sql`INSERT INTO bench_generated (positions) VALUES (${positions})`.execute(db);

  return { ...(await describeSite(db)), seedMs: performance.now() - t0 };
}

/** The facts the bench needs about a generated site (also for one kept with BENCH_KEEP). */
export async function describeSite(db: Db): Promise<BenchSite> {
  const mark = await sql<{
    n: number;
  }>`SELECT count(*)::int AS n FROM pg_tables WHERE tablename = 'bench_generated'`.execute(db);
  if (!mark.rows[0].n)
    throw new Error(
      "this database holds no completely generated bench site (its generation was cut off): generate it again",
    );
  const { id: s } = await db
    .selectFrom("sites")
    .select("id")
    .where("name", "=", SITE_NAME)
    .orderBy("createdAt", "desc")
    .executeTakeFirstOrThrow();
  const counts: Record<string, number> = {};
  for (const t of [
    "boards",
    "positions",
    "components",
    "inspections",
    "photos",
    "defects",
    "part_lines",
    "part_demand_links",
  ]) {
    const r = await sql<{ n: number }>`SELECT count(*)::int AS n FROM ${sql.table(t)} WHERE site_id = ${s}`.execute(db);
    counts[t] = r.rows[0].n;
  }
  const largest = await sql<{
    id: string;
    n: number;
  }>`SELECT board_id AS id, count(*)::int AS n FROM positions WHERE site_id = ${s}
    GROUP BY board_id ORDER BY n DESC LIMIT 1`.execute(db);
  return {
    siteId: s,
    curatorEmail: "bench0@example.test",
    viewerEmail: "bench1@example.test",
    largestBoard: { id: largest.rows[0].id, positions: largest.rows[0].n },
    counts,
    seedMs: 0,
  };
}

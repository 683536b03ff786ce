/**
 * `npm run bench`: the defect register under load. Creates a scratch database on the
 * test cluster, seeds 50,000 positions and 20,000 defects, then for a few typical
 * register queries prints the endpoint's p50/p95 (in-process server over HTTP, signed
 * in) beside the same query timed straight through Kysely and its EXPLAIN ANALYZE
 * execution time (of the page-of-ids query), plus CSV export throughput. Drops the scratch database at the end.
 * A script, not a test. Options: BENCH_N (iterations, default 30), BENCH_KEEP=1 (keep the database).
 */
import { randomBytes } from "node:crypto";
import type { AddressInfo } from "node:net";
import { sql } from "kysely";
import pg from "pg";
import { openLocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";
import { ensureDatabase } from "../../db/pg";
import { createApp } from "../app";
import { hashPassword } from "../auth/password";
import { createDb, MAINTENANCE_DB_OPTIONS, type Db } from "../db";
import { listPage, registerQuery } from "../defects/list-query";
import { priorityScore, type PartsAvailability } from "../../src/domain/priority";
import { DEFECT_CATEGORIES, DEFECT_SEVERITIES, DEFECT_STATUSES } from "../../src/domain/vocab";
import { listQuery } from "../../src/schemas/defects";
import { benchReport } from "./bench-report";

const N = Number(process.env.BENCH_N ?? 30);
const POSITIONS = 50_000;
const DEFECTS = 20_000;
const PASSWORD = "bench-password-123";
const TODAY = "2027-01-15";

async function seed(db: Db) {
  const t0 = performance.now();
  const site = await db
    .insertInto("sites")
    .values({ name: "Bench hulk", kind: "vessel" })
    .returning("id")
    .executeTakeFirstOrThrow();
  const hash = await hashPassword(PASSWORD);
  const crew: string[] = [];
  for (let i = 0; i < 8; i++) {
    const u = await db
      .insertInto("users")
      .values({ email: `bench${i}@example.test`, name: `Bench person ${i}`, passwordHash: hash })
      .returning("id")
      .executeTakeFirstOrThrow();
    await db
      .insertInto("memberships")
      .values({ siteId: site.id, userId: u.id, role: i === 0 ? "curator" : "volunteer" })
      .execute();
    crew.push(u.id);
  }
  const s = site.id;
  await sql`INSERT INTO boards (site_id, name) SELECT ${s}, 'Board ' || b FROM generate_series(1, 10) b`.execute(db);
  await sql`INSERT INTO sections (site_id, board_id, name, sort_order) SELECT ${s}, b.id, b.name || ' / section ' || k, k FROM boards b, generate_series(1, 8) k WHERE b.site_id = ${s}`.execute(
    db,
  );
  await sql`INSERT INTO positions (site_id, board_id, section_id, designation, kind, grid_row, grid_col)
    SELECT ${s}, sec.board_id, sec.id, sec.sort_order || '-' || n, 'molded_case_breaker', 1 + (sec.sort_order * ${POSITIONS / 80} + n) / 60, 1 + (sec.sort_order * ${POSITIONS / 80} + n) % 60
    FROM sections sec, generate_series(1, ${POSITIONS / 80}) n WHERE sec.site_id = ${s}`.execute(db);
  await sql`INSERT INTO components (site_id, position_id, kind, heritage)
    SELECT site_id, id, kind, (ARRAY['original','original','period','modern'])[1 + (abs(hashtext(id::text)) % 4)] FROM positions WHERE site_id = ${s}`.execute(
    db,
  );
  const positions = (
    await sql<{ id: string; boardId: string; sectionId: string; componentId: string; heritage: string }>`
    SELECT p.id, p.board_id, p.section_id, c.id AS component_id, c.heritage FROM positions p JOIN components c ON c.position_id = p.id WHERE p.site_id = ${s} ORDER BY random() LIMIT ${DEFECTS}`.execute(
      db,
    )
  ).rows;
  const parts: PartsAvailability[] = ["none_needed", "in_hand", "wanted", "unobtainable"];
  const words = [
    "arc track",
    "salt crust",
    "seized handle",
    "verdigris",
    "loose lug",
    "cracked glass",
    "swollen insulation",
    "missing screw",
  ];
  for (let i = 0; i < DEFECTS; i += 1000) {
    const batch = positions.slice(i, i + 1000).map((p, k) => {
      const n = i + k;
      const severity = DEFECT_SEVERITIES[n % 4];
      const effortHours = n % 9 === 0 ? null : (n % 13) / 2;
      const partsState = parts[n % 4];
      const safetyCritical = n % 7 === 0;
      const blocksEnergisation = n % 5 === 0;
      const { score } = priorityScore({
        severity,
        safetyCritical,
        blocksEnergisation,
        originalFabric: p.heritage === "original",
        effortHours,
        partsAvailable: partsState,
      });
      return {
        siteId: s,
        boardId: p.boardId,
        sectionId: p.sectionId,
        positionId: p.id,
        componentId: p.componentId,
        title: `${words[n % words.length]} on position ${n}`,
        description: n % 3 ? "" : "Found during the wash-down survey.",
        category: DEFECT_CATEGORIES[n % DEFECT_CATEGORIES.length],
        severity,
        status: DEFECT_STATUSES[n % 7],
        safetyCritical,
        blocksEnergisation,
        effortHours,
        costEstimate: n % 4 ? (n % 50) * 10 : null,
        partsState,
        assigneeId: n % 3 ? crew[n % 8] : null,
        dueOn: n % 2 ? `2027-0${1 + (n % 6)}-${String(1 + (n % 28)).padStart(2, "0")}` : null,
        priorityScore: score,
        createdBy: crew[1],
      };
    });
    await db.insertInto("defects").values(batch).execute();
  }
  // 20 curator pins (each against an unpinned defect), so the ranked order pays for them.
  await sql`INSERT INTO defect_pins (site_id, defect_id, relative_to, direction, reason, pinned_by)
    SELECT ${s}, a.id, b.id, CASE WHEN a.n % 2 = 0 THEN 'above' ELSE 'below' END, 'Bench pin', ${crew[0]}
    FROM (SELECT id, row_number() over (order by ref) n FROM defects WHERE site_id = ${s} ORDER BY ref LIMIT 20) a
    JOIN (SELECT id, row_number() over (order by ref) n FROM defects WHERE site_id = ${s} ORDER BY ref OFFSET 100 LIMIT 20) b ON a.n = b.n`.execute(
    db,
  );
  await sql`ANALYZE`.execute(db);
  return { siteId: s, curatorEmail: "bench0@example.test", assignee: crew[3], seedMs: performance.now() - t0 };
}

const pct = (xs: number[], p: number) =>
  [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor((p / 100) * xs.length))];
const ms = (x: number) => x.toFixed(1).padStart(7);

async function explainMs(db: Db, q: ReturnType<typeof registerQuery>) {
  const c = q.compile();
  const r = await db.executeQuery<{ "QUERY PLAN": string }>({
    ...c,
    sql: `EXPLAIN (ANALYZE, FORMAT TEXT) ${c.sql}`,
  } as any);
  const line = r.rows.map((x: any) => Object.values(x)[0] as string).find((l) => l.startsWith("Execution Time"));
  return Number(/([\d.]+) ms/.exec(line ?? "")?.[1] ?? NaN);
}

async function main() {
  const local = await openLocalDatabase("test", "postgres");
  const name = `tideline_bench_${randomBytes(4).toString("hex")}`;
  await ensureDatabase(local.adminUrl, name, { fresh: true });
  const db = createDb(local.adminUrl.replace(/\/postgres$/, `/${name}`), { ...MAINTENANCE_DB_OPTIONS, max: 10 });
  try {
    await migrateToLatest(db);
    const fx = await seed(db);
    console.log(
      `seeded ${POSITIONS} positions and ${DEFECTS} defects in ${(fx.seedMs / 1000).toFixed(1)} s (database ${name}); ${N} runs per query`,
    );
    const server = createApp({ db }).listen(0, "127.0.0.1");
    await new Promise((r) => server.once("listening", r));
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const signIn = await fetch(`${base}/api/auth/sign-in`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: base },
      body: JSON.stringify({ email: fx.curatorEmail, password: PASSWORD }),
    });
    const cookie = signIn.headers.getSetCookie()[0].split(";")[0];
    const cases: Array<[string, string]> = [
      ["ranked (20 pins), first page", "sort=priority&dir=desc"],
      [
        "raised+scheduled disabling, by due date",
        "status=raised&status=scheduled&severity=disabling&sort=dueOn&dir=asc",
      ],
      ["text search 'verdigris', ranked", "q=verdigris&sort=priority"],
      ["safety-critical, by effort", "flag=safety&sort=effortHours&dir=desc"],
      ["one assignee, by board, page 20", `assignee=${fx.assignee}&sort=board&page=20`],
      ["deep page 400 by title", "sort=title&dir=asc&page=400"],
    ];
    console.log(`\n${"query".padEnd(42)}  http p50  http p95   sql p50   sql p95  explain   rows/total`);
    for (const [label, qs] of cases) {
      const params = new URLSearchParams(qs);
      const f = listQuery.parse(
        Object.fromEntries(
          [...new Set(params.keys())].map((k) => [k, params.getAll(k).length > 1 ? params.getAll(k) : params.get(k)]),
        ),
      );
      const http: number[] = [];
      const raw: number[] = [];
      let shape = "";
      for (let i = 0; i < N + 3; i++) {
        const a = performance.now();
        const r = await fetch(`${base}/api/sites/${fx.siteId}/defects?${qs}&today=${TODAY}`, { headers: { cookie } });
        const body = (await r.json()) as { rows: unknown[]; total: number };
        const b = performance.now();
        await listPage(db, fx.siteId, f, TODAY);
        const c = performance.now();
        if (i >= 3) {
          http.push(b - a);
          raw.push(c - b);
        }
        shape = `${body.rows.length}/${body.total}`;
      }
      const ex = await explainMs(
        db,
        registerQuery(db, fx.siteId, f, TODAY)
          .clearSelect()
          .select("d.id")
          .limit(f.size)
          .offset(f.page * f.size) as any,
      );
      console.log(
        `${label.padEnd(42)} ${ms(pct(http, 50))}   ${ms(pct(http, 95))}   ${ms(pct(raw, 50))}   ${ms(pct(raw, 95))}  ${ms(ex)}   ${shape}`,
      );
    }
    const rss0 = process.memoryUsage().rss;
    const a = performance.now();
    const res = await fetch(`${base}/api/sites/${fx.siteId}/defects.csv?sort=priority`, { headers: { cookie } });
    let bytes = 0;
    let lines = 0;
    for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
      bytes += chunk.length;
      for (const x of chunk) if (x === 10) lines++;
    }
    const secs = (performance.now() - a) / 1000;
    const rows = lines - 1; // header line; descriptions hold no newlines in the bench data
    console.log(
      `\nCSV export of all ${rows} defects: ${(bytes / 1e6).toFixed(2)} MB in ${secs.toFixed(2)} s → ${Math.round(rows / secs)} rows/s, ${(bytes / 1e6 / secs).toFixed(2)} MB/s (process RSS grew ${((process.memoryUsage().rss - rss0) / 1e6).toFixed(1)} MB)`,
    );
    console.log(
      "(all times in ms; http = endpoint over HTTP incl. session check and JSON; sql = the same rows+count queries through Kysely; explain = EXPLAIN ANALYZE execution time of the page-of-ids query)",
    );
    server.closeAllConnections();
    server.close();
  } finally {
    await db.destroy();
    if (process.env.BENCH_KEEP) {
      console.log(`kept ${name} (BENCH_KEEP)`);
      return local.stop();
    }
    const c = new pg.Client({ connectionString: local.adminUrl });
    await c.connect();
    await c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
    await c.end();
    local.stop();
    console.log(`dropped ${name}`);
  }
}

await main();
// The condition survey report's case (issue 17) runs on its own scratch database.
if (process.env.BENCH_REPORT !== "0") await benchReport();

import { mkdtemp, readdir, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Papa from "papaparse";
import { CompiledQuery, sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ACTIVE_STATUSES } from "../../src/domain/defect-workflow";
import { priorityScore, rankDefects } from "../../src/domain/priority";
import { DEFECT_CATEGORIES, DEFECT_SEVERITIES, DEFECT_STATUSES, type DefectStatus } from "../../src/domain/vocab";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { makeBoard } from "./defects-fixtures";
import { writeDefectsCsv } from "../../server/defects/csv";
import { registerArgs, registerPageStatement } from "../../server/defects/list-repository";
import { createDb, poolOf } from "../../server/db";
import { dbFailureOf } from "../../server/db-errors";
import { exportSpoolFiles } from "../../server/export-stream";
import { twoPassDefectsCsv } from "../helpers/defects-csv-two-pass";
import { listQuery } from "../../src/schemas/defects";
import { localDateTime } from "../../src/domain/local-time";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
let viewer: Client;
let boards: Array<Awaited<ReturnType<typeof makeBoard>>>;
const N = 45;

/** 45 varied defects written straight into the table, with distinct creation times. */
beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  boards = [await makeBoard(t.db, fx.siteId, "Aft board", 4), await makeBoard(t.db, fx.siteId, "Main board", 4)];
  const people = [fx.crew.volunteer.id, fx.crew.curator.id, null];
  for (let i = 0; i < N; i++) {
    const b = boards[i % 2];
    const p = b.positions[i % 4];
    const severity = DEFECT_SEVERITIES[i % 4];
    const effortHours = i % 5 === 0 ? null : (i % 7) + 0.5;
    const { score } = priorityScore({
      severity,
      safetyCritical: i % 3 === 0,
      blocksEnergisation: i % 4 === 1,
      originalFabric: p.heritage === "original",
      effortHours,
      partsAvailable: "wanted",
    });
    await t.db
      .insertInto("defects")
      .values({
        siteId: fx.siteId,
        boardId: b.boardId,
        sectionId: p.sectionId,
        positionId: p.id,
        componentId: p.componentId,
        title:
          i === 7
            ? 'Terminal "L2", loose, =SUM(A1)'
            : `Defect number ${String(i).padStart(2, "0")}${i % 6 === 0 ? " verdigris" : ""}`,
        description: i === 7 ? "Line one\nline two, with comma" : "",
        category: DEFECT_CATEGORIES[i % DEFECT_CATEGORIES.length],
        severity,
        status: DEFECT_STATUSES[i % 5],
        safetyCritical: i % 3 === 0,
        blocksEnergisation: i % 4 === 1,
        effortHours,
        costEstimate: i % 4 === 0 ? null : i * 10,
        partsState: "wanted",
        assigneeId: people[i % 3],
        dueOn: i % 3 === 2 ? null : `2027-01-${String((i % 28) + 1).padStart(2, "0")}`,
        priorityScore: score,
        createdAt: new Date(Date.UTC(2026, 10, 1, 0, 0, i)),
      })
      .execute();
  }
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
  viewer = server.client();
  await viewer.signIn(fx.crew.viewer.email);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const url = (qs: string) => `/api/sites/${fx.siteId}/defects?${qs}`;
const ids = async (qs: string) => {
  const r = await viewer.get(url(qs));
  expect(r.status).toBe(200);
  return r.body.rows.map((x: { id: string }) => x.id) as string[];
};
/** The same order written as plain SQL, independently of the app's query builder. */
const direct = async (where: string, order: string) =>
  (
    await sql
      .raw<{ id: string }>(
        `SELECT d.id FROM defects d JOIN boards b ON b.id = d.board_id LEFT JOIN positions p ON p.id = d.position_id LEFT JOIN users a ON a.id = d.assignee_id WHERE d.site_id = '${fx.siteId}' ${where} ORDER BY ${order}`,
      )
      .execute(t.db)
  ).rows.map((r) => r.id);

describe("the page's rows as sent", () => {
  it("carry every time as the ISO text of the stored instant and no `total` of their own", async () => {
    const r = await viewer.get(url("sort=createdAt&dir=asc&size=200"));
    expect(r.status).toBe(200);
    const stored = await t.db
      .selectFrom("defects")
      .select(["id", "createdAt", "updatedAt", "closedAt"])
      .where("siteId", "=", fx.siteId)
      .execute();
    const byId = new Map(stored.map((d) => [d.id, d]));
    expect(r.body.rows).toHaveLength(N);
    for (const row of r.body.rows as Record<string, unknown>[]) {
      const d = byId.get(row.id as string)!;
      expect(row.createdAt).toBe(d.createdAt.toISOString());
      expect(row.updatedAt).toBe(d.updatedAt.toISOString());
      expect(row.closedAt).toBe(d.closedAt ? d.closedAt.toISOString() : null);
      expect(row).not.toHaveProperty("total");
    }
    expect(r.body.total).toBe(N);
  });
});

describe("server-side sorting, each checked against direct SQL", () => {
  it.each([
    [
      "severity&dir=desc",
      "array_position(ARRAY['cosmetic','degraded','impaired','disabling'], d.severity) DESC, d.ref DESC",
    ],
    [
      "severity&dir=asc",
      "array_position(ARRAY['cosmetic','degraded','impaired','disabling'], d.severity) ASC, d.ref ASC",
    ],
    [
      "status&dir=asc",
      "array_position(ARRAY['raised','scheduled','under_repair','awaiting_retest','closed','deferred','accepted_as_is'], d.status), d.ref",
    ],
    ["board&dir=asc", "lower(b.name), d.ref"],
    ["position&dir=desc", "lower(p.designation) DESC, d.ref DESC"],
    ["dueOn&dir=asc", "d.due_on ASC NULLS LAST, d.ref"],
    ["dueOn&dir=desc", "d.due_on DESC NULLS LAST, d.ref DESC"],
    ["effortHours&dir=desc", "d.effort_hours DESC NULLS LAST, d.ref DESC"],
    ["costEstimate&dir=asc", "d.cost_estimate ASC NULLS LAST, d.ref"],
    ["assignee&dir=asc", "lower(a.name) ASC NULLS LAST, d.ref"],
    ["title&dir=asc", "lower(d.title), d.ref"],
    ["createdAt&dir=desc", "d.created_at DESC, d.ref DESC"],
  ])("sort=%s", async (qs, order) => {
    expect(await ids(`sort=${qs}&size=200`)).toEqual(await direct("", order));
  });

  it("sort=priority desc is the order of rankDefects() from src/domain/priority.ts, pins included", async () => {
    const all = await t.db
      .selectFrom("defects")
      .select(["id", "priorityScore", "safetyCritical", "createdAt", "status"])
      .where("siteId", "=", fx.siteId)
      .execute();
    // Open work and settled defects both (the fixture cycles through five statuses, "closed" among them).
    expect(new Set(all.map((d) => ACTIVE_STATUSES.includes(d.status as DefectStatus)))).toEqual(new Set([true, false]));
    const byScore = [...all].sort((a, b) => b.priorityScore - a.priorityScore || +a.createdAt - +b.createdAt);
    const pins = [
      { defectId: byScore[40].id, direction: "above" as const, relativeTo: byScore[2].id },
      { defectId: byScore[41].id, direction: "above" as const, relativeTo: byScore[2].id },
      { defectId: byScore[0].id, direction: "below" as const, relativeTo: byScore[30].id },
      { defectId: byScore[1].id, direction: "below" as const, relativeTo: byScore[30].id },
    ];
    for (const p of pins) {
      const r = await curator.put(`/api/sites/${fx.siteId}/defects/${p.defectId}/pin`, {
        direction: p.direction,
        relativeTo: p.relativeTo,
        reason: "Test pin",
      });
      expect(r.status).toBe(200);
    }
    const pinOf = new Map(pins.map((p) => [p.defectId, { direction: p.direction, relativeTo: p.relativeTo }]));
    const expected = rankDefects(
      all.map((d) => ({
        id: d.id,
        score: d.priorityScore,
        safetyCritical: d.safetyCritical,
        settled: !ACTIVE_STATUSES.includes(d.status as DefectStatus),
        createdAt: d.createdAt.toISOString(),
        pin: pinOf.get(d.id) ?? null,
      })),
    ).map((d) => d.id);
    expect(await ids("sort=priority&dir=desc&size=200")).toEqual(expected);
    expect(await ids("sort=priority&dir=asc&size=200")).toEqual([...expected].reverse());
    // Page by page (the ranked page is read from an index branch and a pinned branch,
    // each cut at the page's end): small pages laid end to end give the same order, both ways.
    const paged = async (dir: string) => {
      const out: string[] = [];
      for (let page = 0; out.length < expected.length; page++)
        out.push(...(await ids(`sort=priority&dir=${dir}&size=7&page=${page}`)));
      return out;
    };
    expect(await paged("desc")).toEqual(expected);
    expect(await paged("asc")).toEqual([...expected].reverse());
    // With a filter that keeps some pinned defects and drops others' targets.
    const severe = new Set(
      (
        await t.db
          .selectFrom("defects")
          .select("id")
          .where("siteId", "=", fx.siteId)
          .where("severity", "in", ["impaired", "disabling"])
          .execute()
      ).map((d) => d.id),
    );
    expect(await ids("sort=priority&dir=desc&size=200&severity=impaired&severity=disabling")).toEqual(
      expected.filter((id) => severe.has(id)),
    );
    const detail = await viewer.get(`/api/sites/${fx.siteId}/defects/${byScore[40].id}`);
    expect(detail.body.rank).toBe(expected.indexOf(byScore[40].id) + 1);
    expect(detail.body.terms.reduce((s: number, x: { points: number }) => s + x.points, 0)).toBe(
      byScore[40].priorityScore,
    );
  });
});

describe("the ranked page is read from its index in order", () => {
  type PlanNode = { "Node Type": string; "Index Name"?: string; Plans?: PlanNode[] };
  /** Each scan of `index` with the nodes above it, innermost first. */
  const scansOf = (n: PlanNode, index: string, above: PlanNode[] = []): PlanNode[][] => [
    ...(n["Index Name"] === index ? [above] : []),
    ...(n.Plans ?? []).flatMap((c) => scansOf(c, index, [n, ...above])),
  ];

  // PostgreSQL uses an expression index only when the query's expression is the index's: the ranked order's
  // "settled" key (server/defects/list-repository.ts) and the index of migration 2026_12_14_0100 must say the same.
  // Sorting is switched off for the plan, so a page that the index cannot return in order shows a Sort above it.
  it.each(["desc", "asc"])(
    "the default view, %s: a scan of defects_site_open_rank_idx under a LIMIT, no sort",
    async (dir) => {
      const a = registerArgs(fx.siteId, listQuery.parse({ sort: "priority", dir }), "2027-02-01");
      const c = registerPageStatement.compile(t.db, a.shape, a.values);
      const plan = await t.db.transaction().execute(async (tx) => {
        await sql`SET LOCAL enable_sort = off`.execute(tx);
        await sql`SET LOCAL enable_seqscan = off`.execute(tx);
        const r = await tx.executeQuery<{ "QUERY PLAN": Array<{ Plan: PlanNode }> }>(
          CompiledQuery.raw(`EXPLAIN (FORMAT JSON) ${c.sql}`, [...c.parameters]),
        );
        return r.rows[0]["QUERY PLAN"][0].Plan;
      });
      const scans = scansOf(plan, "defects_site_open_rank_idx");
      expect(scans.length, JSON.stringify(plan)).toBeGreaterThan(0);
      for (const above of scans) {
        const limit = above.findIndex((n) => n["Node Type"] === "Limit");
        expect(limit, JSON.stringify(plan)).toBeGreaterThanOrEqual(0);
        expect(above.slice(0, limit).map((n) => n["Node Type"])).not.toContain("Sort");
      }
    },
  );
});

describe("filtering, each checked against direct SQL", () => {
  it.each([
    ["category=corrosion&category=heat", "AND d.category IN ('corrosion','heat')"],
    ["severity=disabling&status=raised", "AND d.severity = 'disabling' AND d.status = 'raised'"],
    ["flag=safety&flag=blocking", "AND d.safety_critical AND d.blocks_energisation"],
    ["assignee=none", "AND d.assignee_id IS NULL"],
    ["q=VERDIGRIS", "AND d.title ILIKE '%verdigris%'"],
    ["q=50%25", "AND false"],
  ])("%s", async (qs, where) => {
    expect(await ids(`${qs}&sort=ref&dir=asc&size=200`)).toEqual(await direct(where, "d.ref"));
  });

  it("board and assignee filters match direct SQL", async () => {
    const got = await ids(`board=${boards[1].boardId}&assignee=${fx.crew.volunteer.id}&sort=ref&dir=asc&size=200`);
    expect(got).toEqual(
      await direct(`AND d.board_id = '${boards[1].boardId}' AND d.assignee_id = '${fx.crew.volunteer.id}'`, "d.ref"),
    );
    expect(got.length).toBeGreaterThan(0);
  });

  it("overdue counts from the day the client sends", async () => {
    const got = await ids("flag=overdue&today=2027-01-10&sort=ref&dir=asc&size=200");
    expect(got).toEqual(
      await direct("AND d.due_on < '2027-01-10' AND d.status NOT IN ('closed','deferred','accepted_as_is')", "d.ref"),
    );
  });

  it("a bad filter value is a 400 naming it", async () => {
    const r = await viewer.get(url("severity=terrible"));
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)[0]).toMatch(/^severity/);
  });
});

describe("pagination", () => {
  it("pages of 10 together are the whole sorted list, and total counts the filter", async () => {
    const whole = await ids("sort=dueOn&dir=asc&size=200");
    const pages: string[] = [];
    for (let page = 0; page < 5; page++) {
      const r = await viewer.get(url(`sort=dueOn&dir=asc&size=10&page=${page}`));
      expect(r.body.total).toBe(N);
      pages.push(...r.body.rows.map((x: { id: string }) => x.id));
    }
    expect(pages).toEqual(whole);
    expect((await viewer.get(url("size=201"))).status).toBe(400);
  });

  it("a page past the end still says how many match; a filter matching nothing says 0 (page and total are one statement)", async () => {
    for (const q of ["size=10&page=9", "sort=title&size=10&page=9"]) {
      const r = await viewer.get(url(q));
      expect(r.status).toBe(200);
      expect(r.body).toMatchObject({ rows: [], total: N, page: 9, size: 10 });
    }
    const none = await viewer.get(url("q=no-such-words-anywhere"));
    expect(none.body).toMatchObject({ rows: [], total: 0 });
    const last = await viewer.get(url("sort=ref&size=10&page=4"));
    expect(last.body.rows).toHaveLength(N - 40);
    expect(last.body.total).toBe(N);
  });
});

describe("CSV export", () => {
  it("streams the filtered view as UTF-8 CSV with a BOM that papaparse reads back row for row", async () => {
    const res = await fetch(`${server.base}/api/sites/${fx.siteId}/defects.csv?sort=ref&dir=asc`, {
      headers: { cookie: viewer.cookie },
    });
    expect(res.headers.get("content-type")).toBe("text/csv; charset=utf-8");
    const bytes = new Uint8Array(await res.arrayBuffer());
    expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const text = new TextDecoder("utf-8", { ignoreBOM: true }).decode(bytes);
    expect(text.charCodeAt(0)).toBe(0xfeff);
    expect(text).toContain("\r\n");
    const parsed = Papa.parse<string[]>(text.slice(1).trimEnd(), { header: false });
    expect(parsed.errors).toEqual([]);
    const [header, ...rows] = parsed.data;
    expect(header[0]).toBe("Ref");
    expect(rows.length).toBe(N);
    const refs = (await direct("", "d.ref")).length;
    expect(rows.length).toBe(refs);
    const tricky = rows.find((r) => r[1].includes("Terminal"))!;
    // RFC 4180 quoting survives the round trip; the formula-looking title is not a formula
    expect(tricky[1]).toBe('Terminal "L2", loose, =SUM(A1)');
    expect(tricky[21]).toBe("Line one\nline two, with comma");
  });

  it("guards a cell that starts like a formula with a leading quote", async () => {
    await t.db
      .updateTable("defects")
      .set({ title: '=HYPERLINK("http://x")' })
      .where("siteId", "=", fx.siteId)
      .where("title", "=", "Defect number 00 verdigris")
      .execute();
    const res = await fetch(`${server.base}/api/sites/${fx.siteId}/defects.csv?q=HYPERLINK`, {
      headers: { cookie: viewer.cookie },
    });
    const rows = Papa.parse<string[]>((await res.text()).trimEnd()).data; // Response.text() drops the BOM;
    expect(rows).toHaveLength(2);
    expect(rows[1][1]).toBe('\'=HYPERLINK("http://x")');
  });

  it("makes its spool folder when EXPORT_SPOOL_DIR names one that does not exist yet", async () => {
    const root = await mkdtemp(join(tmpdir(), "tideline-spool-test-"));
    const before = process.env.EXPORT_SPOOL_DIR;
    process.env.EXPORT_SPOOL_DIR = join(root, "not", "made", "yet");
    try {
      const res = await fetch(`${server.base}/api/sites/${fx.siteId}/defects.csv?sort=ref&dir=asc`, {
        headers: { cookie: viewer.cookie },
      });
      expect(res.status).toBe(200);
      expect(Papa.parse<string[]>((await res.text()).trimEnd()).data).toHaveLength(N + 1);
      const dir = process.env.EXPORT_SPOOL_DIR;
      await expect.poll(() => readdir(dir)).toEqual([]); // made, used, and emptied once the download ended
    } finally {
      if (before === undefined) delete process.env.EXPORT_SPOOL_DIR;
      else process.env.EXPORT_SPOOL_DIR = before;
      await rm(root, { recursive: true, force: true });
    }
  });
});

describe("CSV export written by COPY", () => {
  const filterOf = (qs: string) => {
    const params = new URLSearchParams(qs); // repeated keys as lists, as the route's query parser gives them
    return listQuery.parse(
      Object.fromEntries(
        [...params.keys()].map((k) => [k, params.getAll(k).length > 1 ? params.getAll(k) : params.get(k)]),
      ),
    );
  };
  /** The CSV written straight into memory, `between` awaited after each chunk the writer takes. */
  const csvText = async (qs: string, between?: (chunk: number) => Promise<void>, zone = "UTC") => {
    let text = "";
    let chunks = 0;
    await writeDefectsCsv(t.db, fx.siteId, zone, filterOf(qs), "2027-01-10", {
      write: async (chunk) => {
        text += chunk;
        await between?.(chunks++);
      },
      end() {},
    });
    return text;
  };
  const csvRows = async (qs: string, between?: (chunk: number) => Promise<void>) => {
    const text = await csvText(qs, between);
    const [header, ...rows] = Papa.parse<string[]>(text.slice(1).trimEnd()).data;
    expect(header[0]).toBe("Ref");
    return rows;
  };
  const refsOf = async (ids: string[]) => {
    const refs = new Map(
      (await t.db.selectFrom("defects").select(["id", "ref"]).where("siteId", "=", fx.siteId).execute()).map((d) => [
        d.id,
        `D-${d.ref}`,
      ]),
    );
    return ids.map((id) => refs.get(id));
  };
  const VIEWS = [
    "sort=priority&dir=desc",
    "sort=priority&dir=asc",
    "sort=title&dir=asc",
    "sort=dueOn&dir=desc",
    "sort=assignee&dir=asc",
    "sort=priority&dir=desc&severity=impaired&severity=disabling",
    "sort=priority&dir=desc&q=verdigris",
    "sort=ref&dir=asc&q=1-2", // matches a position's designation, not defect text
    "sort=ref&dir=asc&q=%22L2%22%2C%20loose", // quotes and a comma in the search words
    "sort=ref&dir=asc&q=100%25_%5C'x", // LIKE's own characters, a backslash and a quote: matches nothing, still runs
    "sort=ref&dir=asc&flag=pinned",
    "sort=priority&dir=desc&flag=overdue",
  ];

  it("its rows are the register's ranked order, pins included, and its filtered and searched views", async () => {
    expect(
      (await t.db.selectFrom("defectPins").select("id").where("removedAt", "is", null).execute()).length,
    ).toBeGreaterThan(0); // the pins of the ranked-order test above
    for (const qs of VIEWS.filter((v) => !v.includes("flag=") && !v.includes("100%25"))) {
      const expected = await refsOf(await ids(`${qs}&size=200&today=2027-01-10`));
      expect(expected.length).toBeGreaterThan(0);
      expect((await csvRows(qs)).map((r) => r[0])).toEqual(expected);
    }
  });

  it("writes the very bytes the two-pass design wrote (ordered ids, then pages by primary key), in every view and zone", async () => {
    for (const zone of ["UTC", "America/Halifax", "Asia/Kolkata"])
      for (const qs of VIEWS) {
        const before = await twoPassDefectsCsv(t.db, fx.siteId, zone, filterOf(qs), "2027-01-10");
        expect(before.split("\r\n").length, qs).toBeGreaterThan(qs.includes("100%25") ? 1 : 2);
        expect(await csvText(qs, undefined, zone), `${qs} in ${zone}`).toBe(before);
      }
  });

  it("is one snapshot: a defect changed or filtered out once the export has begun is written as it was", async () => {
    const order = await ids("sort=ref&dir=asc&severity=disabling&size=200");
    expect(order.length).toBeGreaterThan(9);
    const [gone, changed] = order.slice(8);
    const title = (await t.db.selectFrom("defects").select("title").where("id", "=", changed).executeTakeFirstOrThrow())
      .title;
    const before = await csvRows("sort=ref&dir=asc&severity=disabling");
    try {
      const rows = await csvRows("sort=ref&dir=asc&severity=disabling", async (chunk) => {
        if (chunk !== 1) return; // once the first rows have come: the statement has its snapshot
        await t.db.updateTable("defects").set({ severity: "cosmetic" }).where("id", "=", gone).execute();
        await t.db
          .updateTable("defects")
          .set({ title: "Renamed during the export" })
          .where("id", "=", changed)
          .execute();
      });
      expect(rows).toEqual(before);
      const after = await csvRows("sort=ref&dir=asc&severity=disabling");
      const [goneRef, changedRef] = await refsOf([gone, changed]);
      expect(after.map((r) => r[0])).toEqual(before.map((r) => r[0]).filter((ref) => ref !== goneRef));
      expect(after.find((r) => r[0] === changedRef)![1]).toBe("Renamed during the export");
    } finally {
      await t.db.updateTable("defects").set({ severity: "disabling" }).where("id", "=", gone).execute();
      await t.db.updateTable("defects").set({ title }).where("id", "=", changed).execute();
    }
  });

  it("a writer that throws (the reader left) ends the statement and gives its connection back", async () => {
    const pool = poolOf(t.db)!;
    await expect(
      csvText("sort=priority&dir=desc", async (chunk) => {
        if (chunk === 0) throw new Error("the reader left");
      }),
    ).rejects.toThrow("the reader left");
    expect(pool.totalCount - pool.idleCount).toBe(0);
    const busy = async () =>
      (
        await sql<{ n: number }>`SELECT count(*)::int AS n FROM pg_stat_activity
          WHERE datname = current_database() AND pid <> pg_backend_pid() AND state <> 'idle'`.execute(t.db)
      ).rows[0].n;
    await expect.poll(busy).toBe(0); // the COPY's connection was closed, and its backend has ended
    // The connection it used serves the next statement.
    expect((await csvRows("sort=ref&dir=asc")).length).toBe(N);
  });
  it("holds its connection no longer than the statement timeout: a writer slower than that fails the read, 503 db_timeout", async () => {
    const slow = createDb(t.url, { max: 2, statementTimeoutMs: 400 });
    try {
      let err: unknown;
      await writeDefectsCsv(
        slow,
        fx.siteId,
        "UTC",
        filterOf("sort=ref&dir=asc"),
        "2027-01-10",
        { write: () => new Promise((r) => setTimeout(r, 300)), end() {} }, // the header, then the rows: past 400 ms
      ).catch((e) => (err = e));
      expect(dbFailureOf(err)).toBe("timeout");
      const pool = poolOf(slow)!;
      expect(pool.totalCount - pool.idleCount).toBe(0);
    } finally {
      await slow.destroy();
    }
  });
});

describe("CSV download over HTTP", () => {
  it("sends the file the writer makes, with its length, after the database read is over", async () => {
    const res = await fetch(`${server.base}/api/sites/${fx.siteId}/defects.csv?sort=priority&dir=desc`, {
      headers: { cookie: viewer.cookie },
    });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="defects-\d{4}-\d{2}-\d{2}\.csv"$/);
    expect(res.headers.get("content-encoding")).toBeNull();
    const body = Buffer.from(await res.arrayBuffer());
    expect(Number(res.headers.get("content-length"))).toBe(body.length);
    const zone = (
      await t.db.selectFrom("sites").select("timeZone").where("id", "=", fx.siteId).executeTakeFirstOrThrow()
    ).timeZone;
    const f = listQuery.parse({ sort: "priority", dir: "desc" });
    const today = res.headers.get("content-disposition")!.match(/defects-(.+)\.csv/)![1];
    expect(body.toString("utf8")).toBe(await twoPassDefectsCsv(t.db, fx.siteId, zone, f, today));
    await expect.poll(() => exportSpoolFiles()).toEqual([]); // deleted once the response has ended
  });
});

describe("repair plan", () => {
  const ACTIVE = ["raised", "scheduled", "under_repair", "awaiting_retest"];
  // The expected order: rankDefects() of src/domain/priority.ts over the active defects, with the pins
  // still in place (a pin to a defect that is not active is ignored, as rankDefects ignores a target not listed).
  async function expectedOrder() {
    const rows = await t.db
      .selectFrom("defects as d")
      .leftJoin("defectPins as pin", (j) => j.onRef("pin.defectId", "=", "d.id").on("pin.removedAt", "is", null))
      .select([
        "d.id",
        "d.boardId",
        "d.sectionId",
        "d.priorityScore",
        "d.safetyCritical",
        "d.createdAt",
        "d.effortHours",
        "d.costEstimate",
        "pin.direction",
        "pin.relativeTo",
      ])
      .where("d.siteId", "=", fx.siteId)
      .where("d.status", "in", ACTIVE as never)
      .execute();
    const ranked = rankDefects(
      rows.map((d) => ({
        id: d.id,
        score: d.priorityScore,
        safetyCritical: d.safetyCritical,
        createdAt: d.createdAt.toISOString(),
        pin: d.direction && d.relativeTo ? { direction: d.direction, relativeTo: d.relativeTo } : null,
      })),
    );
    const byId = new Map(rows.map((r) => [r.id, r]));
    return ranked.map((r, i) => ({ ...byId.get(r.id)!, rank: i + 1 }));
  }

  it("the first page is totals per board and section (no defects), its places those of rankDefects()", async () => {
    const r = await viewer.get(`/api/sites/${fx.siteId}/repair-plan`);
    expect(r.status).toBe(200);
    expect(JSON.stringify(r.body)).not.toContain('"defects"');
    const expected = await expectedOrder();
    expect(expected.some((d) => d.direction)).toBe(true); // the pins of the ranked test above are in play
    const sum = (xs: typeof expected, f: (d: (typeof expected)[number]) => number) => xs.reduce((a, d) => a + f(d), 0);
    let count = 0;
    for (const b of r.body.boards) {
      const mine = expected.filter((d) => d.boardId === b.boardId);
      expect(b.count).toBe(mine.length);
      expect(b.firstRank).toBe(Math.min(...mine.map((d) => d.rank)));
      expect(b.effortHours).toBeCloseTo(sum(mine, (d) => d.effortHours ?? 0));
      expect(b.unestimated).toBe(mine.filter((d) => d.effortHours === null).length);
      expect(b.cost).toBeCloseTo(sum(mine, (d) => d.costEstimate ?? 0));
      expect(b.sections.reduce((a: number, s: { count: number }) => a + s.count, 0)).toBe(b.count);
      for (const s of b.sections) {
        const inSection = mine.filter((d) => (d.sectionId ?? null) === s.sectionId);
        expect(s.count).toBe(inSection.length);
        expect(s.firstRank).toBe(Math.min(...inSection.map((d) => d.rank)));
      }
      count += b.count;
    }
    expect(count).toBe(expected.length);
  });

  it("a board's part lists its active defects per section in the site's order, numbered as rankDefects() does", async () => {
    const expected = await expectedOrder();
    const plan = (await viewer.get(`/api/sites/${fx.siteId}/repair-plan`)).body;
    const listed: { id: string; rank: number }[] = [];
    for (const b of plan.boards) {
      const r = await viewer.get(`/api/sites/${fx.siteId}/repair-plan/boards/${b.boardId}`);
      expect(r.status).toBe(200);
      expect(r.body.boardName).toBe(b.boardName);
      const firsts = r.body.sections.map((s: any) => s.defects[0].rank);
      expect(firsts).toEqual([...firsts].sort((x: number, y: number) => x - y));
      for (const s of r.body.sections) {
        const ranks = s.defects.map((d: any) => d.rank);
        expect(ranks).toEqual([...ranks].sort((x: number, y: number) => x - y));
        expect(s.effortHours).toBeCloseTo(s.defects.reduce((a: number, d: any) => a + (d.effortHours ?? 0), 0));
        expect(s.cost).toBe(s.defects.reduce((a: number, d: any) => a + (d.costEstimate ?? 0), 0));
        expect(s.unestimated).toBe(s.defects.filter((d: any) => d.effortHours === null).length);
        expect(s.defects.every((d: any) => d.boardId === b.boardId && ACTIVE.includes(d.status))).toBe(true);
        listed.push(...s.defects.map((d: any) => ({ id: d.id, rank: d.rank })));
      }
    }
    expect(listed.sort((a, b) => a.rank - b.rank)).toEqual(expected.map((d) => ({ id: d.id, rank: d.rank })));
  });

  it("another site's board or no board is a 404, a bad id a 400, signed out a 401", async () => {
    const none = "00000000-0000-4000-8000-000000000000";
    expect((await viewer.get(`/api/sites/${fx.siteId}/repair-plan/boards/${none}`)).status).toBe(404);
    const bad = await viewer.get(`/api/sites/${fx.siteId}/repair-plan/boards/not-a-board`);
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toMatch(/boardId/);
    const plan = (await viewer.get(`/api/sites/${fx.siteId}/repair-plan`)).body;
    const anon = server.client();
    expect((await anon.get(`/api/sites/${fx.siteId}/repair-plan/boards/${plan.boards[0].boardId}`)).status).toBe(401);
  });
});

describe("CSV times in the site's time zone", () => {
  // Check values from the IANA tz database: America/Halifax is UTC−3 (daylight time) until the first
  // Sunday of November (1 Nov 2026, 06:00 UTC) and UTC−4 after; Asia/Kolkata is UTC+5:30 all year.
  it("writes Raised and Updated as the site's wall-clock time, the zone named in each header", async () => {
    expect((await curator.put(`/api/sites/${fx.siteId}/time-zone`, { timeZone: "America/Halifax" })).status).toBe(200);
    await t.db
      .updateTable("defects")
      .set({ updatedAt: new Date("2027-01-15T12:00:00Z") })
      .where("siteId", "=", fx.siteId)
      .where("ref", "=", 1)
      .execute();
    const read = async () =>
      Papa.parse<string[]>((await viewer.get(`/api/sites/${fx.siteId}/defects.csv?sort=ref&dir=asc`)).body, {
        skipEmptyLines: true,
      }).data;
    let [header, first] = await read();
    const raised = header.indexOf("Raised (America/Halifax)");
    const updated = header.indexOf("Updated (America/Halifax)");
    expect(raised).toBeGreaterThan(0);
    expect(updated).toBeGreaterThan(0);
    expect(first[0]).toBe("D-1");
    // created 2026-11-01 00:00:00 UTC: still daylight time in Halifax, the evening before
    expect(first[raised]).toBe("2026-10-31 21:00:00");
    expect(first[updated]).toBe("2027-01-15 08:00:00"); // standard time, UTC−4
    expect((await curator.put(`/api/sites/${fx.siteId}/time-zone`, { timeZone: "Asia/Kolkata" })).status).toBe(200);
    [header, first] = await read();
    expect(header).toContain("Raised (Asia/Kolkata)");
    expect(first[header.indexOf("Raised (Asia/Kolkata)")]).toBe("2026-11-01 05:30:00");
    expect(first.some((c) => /\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/.test(c))).toBe(false); // no "T…Z" text
    await curator.put(`/api/sites/${fx.siteId}/time-zone`, { timeZone: "UTC" });
  });
});

describe("PostgreSQL's zone rules against Intl's", () => {
  // The CSV's times are written by PostgreSQL (AT TIME ZONE, its copy of the IANA tz database); the rest
  // of the product writes local times through Intl (ICU's copy). Two independent readings of the same
  // database must agree second for second, across daylight-saving changes and half-hour zones.
  it("gives the same wall-clock time as localDateTime for every hour of 2026, in zones with odd rules", async () => {
    const zones = [
      "UTC",
      "America/Halifax",
      "Asia/Kolkata",
      "Europe/Lisbon",
      "Australia/Lord_Howe",
      "America/St_Johns",
      "Pacific/Chatham",
      "europe/london", // as a person may type it; Intl names it Europe/London
    ];
    const start = Date.UTC(2026, 0, 1);
    const instants = Array.from({ length: 365 * 24 }, (_, h) => new Date(start + h * 3_600_000 + 1_234_567));
    for (const zone of zones) {
      const canonical = new Intl.DateTimeFormat("en-GB", { timeZone: zone }).resolvedOptions().timeZone;
      const { rows } = await sql<{
        local: string;
      }>`SELECT to_char(t AT TIME ZONE ${canonical}, 'YYYY-MM-DD HH24:MI:SS') AS local
        FROM unnest(${instants.map((d) => d.toISOString())}::timestamptz[]) WITH ORDINALITY AS u(t, n) ORDER BY n`.execute(
        t.db,
      );
      const differ = rows
        .map((r, i) => [instants[i].toISOString(), r.local, localDateTime(instants[i], zone)])
        .filter(([, pgText, intlText]) => pgText !== intlText);
      expect(differ, zone).toEqual([]);
    }
  });
});

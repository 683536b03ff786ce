/**
 * A board's positions answered in pages: the first page with the board, then each page after the key the one
 * before gave, in board order (row, column, order in the cell, id), until `next` is null. Read page by page, a
 * board is the same tiles in the same order as read in one page; a bad key or size is a 400 that says why.
 */
import { CompiledQuery, sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { thumbnailCellsQuery } from "../../server/inventory/positions-repository";
import { boardDetailResponse, boardThumbnailResponse, tilePageResponse } from "../../src/schemas/inventory";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
const as: Record<string, Client> = {};
let base: string;
let boardId: string;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  for (const role of ["curator", "viewer", "outsider"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
  base = `/api/sites/${fx.siteId}`;
  const b = await as.curator.post(`${base}/boards`, { name: "Paged board", gridRows: 6, gridCols: 10 });
  expect(b.status).toBe(201);
  boardId = b.body.id;
  // Rows filled out of order (row 3 before row 1, row 5 before row 4), so the order is the board's, not the writes'.
  for (const [prefix, gridRow] of [
    ["C", 3],
    ["A", 1],
    ["B", 2],
  ] as const) {
    const g = await as.curator.post(`${base}/boards/${boardId}/positions/generate`, {
      prefix: `${prefix}-`,
      from: 1,
      to: 10,
      gridRow,
      startCol: 1,
      kind: "fuse",
    });
    expect(g.status).toBe(201);
  }
  for (const [designation, gridRow] of [
    ["E-1", 5],
    ["D-1", 4],
  ] as const) {
    const p = await as.curator.post(`${base}/boards/${boardId}/positions`, {
      designation,
      kind: "fuse",
      gridRow,
      gridCol: 1,
    });
    expect(p.status).toBe(201);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

type Tile = { id: string; gridRow: number; gridCol: number; sortOrder: number };
const order = (a: Tile, b: Tile) =>
  a.gridRow - b.gridRow || a.gridCol - b.gridCol || a.sortOrder - b.sortOrder || (a.id < b.id ? -1 : 1);

async function walk(size: number) {
  const first = boardDetailResponse.parse((await as.viewer.get(`${base}/boards/${boardId}?size=${size}`)).body);
  const pages = [first.positions];
  let next = first.next;
  while (next) {
    const r = await as.viewer.get(`${base}/boards/${boardId}/tiles?after=${encodeURIComponent(next)}&size=${size}`);
    expect(r.status).toBe(200);
    const page = tilePageResponse.parse(r.body);
    pages.push(page.positions);
    next = page.next;
  }
  return { first, pages };
}

describe("a board in pages", () => {
  it("a board no larger than a page comes in one answer, in board order, with its total and no next page", async () => {
    const r = await as.viewer.get(`${base}/boards/${boardId}`);
    expect(r.status).toBe(200);
    const d = boardDetailResponse.parse(r.body);
    expect(d.total).toBe(32);
    expect(d.positions).toHaveLength(32);
    expect(d.next).toBeNull();
    expect([...d.positions].sort(order).map((p) => p.id)).toEqual(d.positions.map((p) => p.id));
    expect(d.positions[0].designation).toBe("A-1");
  });

  it("read page by page the board is the same tiles in the same order, each page at most the size asked", async () => {
    const whole = boardDetailResponse.parse((await as.viewer.get(`${base}/boards/${boardId}`)).body).positions;
    for (const size of [1, 5, 7, 31, 32]) {
      const { first, pages } = await walk(size);
      expect(first.total).toBe(32);
      expect(pages.every((p) => p.length <= size && p.length > 0)).toBe(true);
      expect(pages.flat().map((p) => p.id)).toEqual(whole.map((p) => p.id));
    }
  });

  it("a page after a position deleted since continues where that position was", async () => {
    const { first } = await walk(10);
    const last = first.positions[9];
    const del = await as.curator.del(`${base}/positions/${last.id}?version=${last.version}`);
    expect(del.status).toBe(204);
    const r = await as.viewer.get(`${base}/boards/${boardId}/tiles?after=${encodeURIComponent(first.next!)}&size=5`);
    expect(r.status).toBe(200);
    const whole = boardDetailResponse.parse((await as.viewer.get(`${base}/boards/${boardId}`)).body);
    expect(whole.total).toBe(31);
    expect(r.body.positions.map((p: Tile) => p.id)).toEqual(whole.positions.slice(9, 14).map((p) => p.id));
  });

  it.each([
    ["a key not made by the server", "tiles?after=page-2", /after must be a page key/],
    [
      "a key with a number past int4",
      `tiles?after=9999999999.1.0.${"0".repeat(8)}-0000-0000-0000-${"0".repeat(12)}`,
      /out of range/,
    ],
    ["no key at all", "tiles", /after/],
    ["a size of 0", "?size=0", /size/],
    ["a size past the largest page", "?size=100000", /size/],
    ["a size that is not a number", "tiles?after=1.1.0.00000000-0000-0000-0000-000000000000&size=many", /size/],
  ])("%s is a 400 that says why, never a 500", async (_, path, message) => {
    const r = await as.viewer.get(`${base}/boards/${boardId}${path.startsWith("?") ? path : `/${path}`}`);
    expect(r.status).toBe(400);
    expect(JSON.stringify(r.body)).toMatch(message);
    expect(JSON.stringify(r.body)).not.toMatch(/at .*\.ts/);
  });

  it("pages of another site's board, or of no board, are a 404; signed out is a 401", async () => {
    const key = encodeURIComponent(`1.1.0.00000000-0000-0000-0000-000000000000`);
    expect((await as.outsider.get(`${base}/boards/${boardId}/tiles?after=${key}`)).status).toBe(404);
    const none = "00000000-0000-4000-8000-000000000000";
    expect((await as.viewer.get(`${base}/boards/${none}/tiles?after=${key}`)).status).toBe(404);
    const head = await as.viewer.get(`${base}/boards/${none}`);
    expect(head.status).toBe(404);
    expect(JSON.stringify(head.body)).not.toContain("positions");
    expect((await server.client().get(`${base}/boards/${boardId}/tiles?after=${key}`)).status).toBe(401);
  });
});

describe("a board's thumbnail", () => {
  it("holds one compact cell per position, in board order, with the grade and custody the tiles show", async () => {
    const { pages } = await walk(7);
    const tiles = pages.flat();
    const graded = tiles.find((p) => p.component)!;
    const inspected = await as.curator.post(`${base}/components/${graded.component!.id}/inspections`, {
      percentRusted: 30,
    });
    expect(inspected.status).toBe(201);
    const after = (await walk(500)).pages.flat();
    expect(after.find((p) => p.id === graded.id)!.latest?.astmGrade).not.toBeNull();
    const r = await as.viewer.get(`${base}/boards/${boardId}/thumbnail`);
    expect(r.status).toBe(200);
    expect(boardThumbnailResponse.parse(r.body)).toEqual({
      gridRows: 6,
      gridCols: 10,
      faceHeightMm: null,
      waterLineMm: null,
      cells: after.map((p) => [
        p.gridRow,
        p.gridCol,
        p.rowSpan,
        p.colSpan,
        p.latest?.astmGrade ?? null,
        p.component?.custody ?? null,
      ]),
    });
  });

  it("answers 404 for a board the site does not have, and nothing to someone who is not a member", async () => {
    const missing = await as.viewer.get(`${base}/boards/00000000-0000-4000-8000-000000000000/thumbnail`);
    expect(missing.status).toBe(404);
    expect((await as.viewer.get(`${base}/boards/not-an-id/thumbnail`)).status).toBe(400);
    const outsider = await as.outsider.get(`${base}/boards/${boardId}/thumbnail`);
    expect(outsider.status).toBe((await as.outsider.get(`${base}/boards/${boardId}`)).status);
    expect(outsider.status).toBeGreaterThanOrEqual(403);
    expect(JSON.stringify(outsider.body)).not.toContain("cells");
  });
});

/** Every node of a JSON plan, depth first. */
type PlanNode = { "Node Type": string; "Relation Name"?: string; Plans?: PlanNode[]; [k: string]: unknown };
const nodesOf = (n: PlanNode): PlanNode[] => [n, ...(n.Plans ?? []).flatMap(nodesOf)];

describe("a board's reads touch only that board's components", () => {
  // With nested loops priced out (enable_nestloop off), a plain join of components can only be a hash or merge
  // join over a scan of every component of the site; a component read by key in a lateral subquery (LIMIT 1)
  // still runs once per position with the position's id in its condition. So the plan below tells the two apart
  // whatever the size of this test's tables (PostgreSQL docs, "Planner Method Configuration").
  async function componentScans(compiled: CompiledQuery) {
    return t.db.transaction().execute(async (trx) => {
      await sql`SET LOCAL enable_nestloop = off`.execute(trx);
      const r = await trx.executeQuery<{ "QUERY PLAN": [{ Plan: PlanNode }] }>(
        CompiledQuery.raw(`EXPLAIN (FORMAT JSON) ${compiled.sql}`, [...compiled.parameters]),
      );
      return nodesOf(r.rows[0]["QUERY PLAN"][0].Plan).filter((n) => n["Relation Name"] === "components");
    });
  }
  const keyedOnThePosition = (n: PlanNode) =>
    /position_id = p\.id|p\.id = c\.position_id/.test(`${n["Index Cond"] ?? ""} ${n.Filter ?? ""}`);

  it("the thumbnail reads each position's current component by the position's id", async () => {
    const scans = await componentScans(thumbnailCellsQuery(t.db, boardId).compile());
    expect(scans.length).toBeGreaterThan(0);
    expect(scans.every(keyedOnThePosition)).toBe(true);
  });
});

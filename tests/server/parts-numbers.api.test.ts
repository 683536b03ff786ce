import { afterAll, beforeAll, describe, expect, it } from "vitest";
import Papa from "papaparse";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { BREAKER, makeBoard, makeComponent } from "./parts-fixtures";

// Each wanted-list line has a short number per site (W-12) that a person can say on
// the phone; it is shown, searched, exported and shared. Tideline's own numbering (migration 0510).
let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let scrounger: Client;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  scrounger = server.client();
  await scrounger.signIn(fx.crew.scrounger.email);
  const board = await makeBoard(t.db, fx.siteId, "Numbers board");
  for (const d of ["N-1", "N-2", "N-3"])
    await makeComponent(t.db, fx.siteId, board.id, d, { ...BREAKER, model: `Model ${d}`, disposition: "replace" });
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const url = (p = "") => `/api/sites/${fx.siteId}/parts${p}`;

describe("wanted-list line numbers", () => {
  it("lines are numbered W-1, W-2, … per site in the order they were made, and the detail shows the same", async () => {
    const r = await scrounger.get(url("?status=all&sort=created"));
    expect(r.status).toBe(200);
    const lines = r.body.lines as Array<{ id: string; number: number; ref: string; model: string }>;
    expect(lines.map((l) => l.ref)).toEqual(["W-1", "W-2", "W-3"]);
    expect(lines.map((l) => l.model)).toEqual(["Model N-1", "Model N-2", "Model N-3"]);
    const d = await scrounger.get(url(`/${lines[1].id}`));
    expect(d.body.line).toMatchObject({ number: 2, ref: "W-2" });
  });

  it("a line added by hand takes the next number", async () => {
    const made = await scrounger.post(url(), { kind: "fuse", ratingAmps: 30, qty: 2 });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
    const line = made.body.line ?? made.body;
    expect(line.ref).toBe("W-4");
  });

  it("searching W-2, w2 or 2 finds that line", async () => {
    for (const q of ["W-2", "w2", "2", "W 002"]) {
      const r = await scrounger.get(url(`?status=all&q=${encodeURIComponent(q)}`));
      expect(r.status).toBe(200);
      expect(
        (r.body.lines as Array<{ ref: string }>).map((l) => l.ref),
        q,
      ).toContain("W-2");
    }
    const other = await scrounger.get(url(`?status=all&q=W-2`));
    expect((other.body.lines as Array<{ ref: string }>).map((l) => l.ref)).toEqual(["W-2"]);
  });

  it("the CSV's Line column and the share link carry the W-number", async () => {
    const csv = (await scrounger.get(url(".csv?status=all"))).body as string;
    const rows = Papa.parse<string[]>(csv.trim()).data;
    expect(rows[0][0]).toBe("Line");
    expect(rows.slice(1).map((r) => r[0])).toEqual(expect.arrayContaining(["W-1", "W-2", "W-3", "W-4"]));
    const made = await scrounger.post(url("/share-links"), { label: "Harbour trust (fictional)" });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
    const token = made.body.token ?? made.body.link?.token;
    const shared = await fetch(`${server.base}/api/share/parts/${token}`);
    const body = (await shared.json()) as { lines: Array<{ ref: string }> };
    expect(body.lines.map((l) => l.ref)).toEqual(expect.arrayContaining(["W-1", "W-2", "W-3"]));
  });
});

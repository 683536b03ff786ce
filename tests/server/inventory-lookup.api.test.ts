import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { looseKey, LOOSE_KEY_SQL } from "../../src/domain/search-keys";
import { lookupResponse } from "../../src/schemas/inventory";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";

// The quick log finds a position by designation, tag, circuit name or kind, with
// prefixes, loosely typed tags and typing slips (pg_trgm, PostgreSQL's contrib module; its documented
// default thresholds: similarity 0.3, word_similarity 0.6). Board and circuits are invented.
let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
const as: Record<string, Client> = {};
let base: string;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  for (const role of ["curator", "volunteer", "viewer", "outsider"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
  base = `/api/sites/${fx.siteId}`;
  const board = await as.curator.post(`${base}/boards`, { name: "Search board", gridRows: 4, gridCols: 8 });
  expect(board.status).toBe(201);
  const positions: Array<[string, string, string, string | null]> = [
    ["3-1", "molded_case_breaker", "Bilge pump No. 1", "KL-0042"],
    ["3-2", "molded_case_breaker", "Bilge pump No. 2", "KL-0043"],
    ["3-3", "molded_case_breaker", "Steering gear", null],
    ["3-4", "fuse", "Galley range", "KL-0420"],
    ["GL-A", "ground_lamp", "Ground-detection lamp, phase A", null],
    ["M-1", "meter", "Switchboard voltmeter", null],
  ];
  let col = 0;
  for (const [designation, kind, circuit, tag] of positions) {
    const r = await as.curator.post(`${base}/boards/${board.body.id}/positions`, {
      designation,
      kind,
      circuit,
      gridRow: 1 + Math.floor(col / 8),
      gridCol: 1 + (col++ % 8),
    });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    if (tag) {
      const p = await as.curator.patch(`${base}/components/${r.body.component.id}`, { tagNumber: tag, version: 1 });
      expect(p.status, JSON.stringify(p.body)).toBe(200);
    }
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

async function find(q: string) {
  const r = await as.volunteer.get(`${base}/positions/lookup?q=${encodeURIComponent(q)}`);
  expect(r.status, JSON.stringify(r.body)).toBe(200);
  return lookupResponse.parse(r.body);
}

describe("quick-log search", () => {
  it("a loosely typed tag (spaces, no zeros, no dash) finds the tagged part first", async () => {
    for (const q of ["kl 42", "KL42", "kl-042", "KL-0042"]) {
      const hits = await find(q);
      expect(hits[0], q).toMatchObject({ designation: "3-1", tagNumber: "KL-0042", matchedOn: "tag" });
    }
    expect((await find("KL-0042"))[0].exact).toBe(true);
    // "kl 42" is also the start of KL-0420: after the exact one
    expect((await find("kl 42")).map((h) => h.tagNumber)).toEqual(["KL-0042", "KL-0420"]);
  });

  it("a circuit name finds its positions, by a word, by its start and with a slip", async () => {
    expect((await find("bilge")).map((h) => h.designation).sort()).toEqual(["3-1", "3-2"]);
    expect((await find("bilge")).every((h) => h.matchedOn === "circuit")).toBe(true);
    expect((await find("steerng"))[0]).toMatchObject({ designation: "3-3", matchedOn: "circuit" });
    expect((await find("bilg pump 2"))[0]).toMatchObject({ designation: "3-2" });
    expect((await find("galley"))[0]).toMatchObject({ designation: "3-4", matchedOn: "circuit" });
  });

  it("a kind, by its name or the trade's abbreviation, finds the positions of that kind", async () => {
    const mccb = await find("mccb");
    expect(mccb.map((h) => h.designation).sort()).toEqual(["3-1", "3-2", "3-3"]);
    expect(mccb.every((h) => h.matchedOn === "kind")).toBe(true);
    expect((await find("ground lamp")).map((h) => h.designation)).toContain("GL-A");
    expect((await find("meter")).map((h) => h.designation)).toContain("M-1");
  });

  it("a designation's exact match still comes first, then its prefixes", async () => {
    const hits = await find("3-");
    expect(hits.slice(0, 4).map((h) => h.designation)).toEqual(["3-1", "3-2", "3-3", "3-4"]);
    expect((await find("gl-a"))[0]).toMatchObject({ designation: "GL-A", exact: true, matchedOn: "designation" });
  });

  it("text with nothing to match finds nothing; bad input is a 400 and outsiders get 404", async () => {
    expect(await find("%")).toEqual([]);
    expect(await find("zzzzqqq")).toEqual([]);
    expect((await as.volunteer.get(`${base}/positions/lookup?q=`)).status).toBe(400);
    expect((await as.volunteer.get(`${base}/positions/lookup?q=${"x".repeat(61)}`)).status).toBe(400);
    expect((await as.outsider.get(`${base}/positions/lookup?q=bilge`)).status).toBe(404);
  });

  it("the SQL loose key is the domain's looseKey", async () => {
    const samples = ["KL-0042", "kl 42", "T-0100", "2-14", "1001", "A-007/B-01", "%", "Ünïcode-09"];
    for (const s of samples) {
      const r = await sql<{
        k: string;
      }>`select regexp_replace(regexp_replace(lower(${s}), ${LOOSE_KEY_SQL.strip}, '', 'g'), ${LOOSE_KEY_SQL.zeros}, ${LOOSE_KEY_SQL.replacement}, 'g') as k`.execute(
        t.db,
      );
      expect(r.rows[0].k, s).toBe(looseKey(s));
    }
  });
});

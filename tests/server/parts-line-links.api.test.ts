import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { LINKS_IN_ROW } from "../../src/schemas/parts";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { loggingDb, type QueryLog } from "../helpers/query-log";
import { BREAKER, makeBoard, makeComponent, makeDefect, setDisposition } from "./parts-fixtures";

// A row of the wanted list carries a line's first LINKS_IN_ROW positions and a count of them all; the line's
// links route pages through every one (withdrawn ones too). Nothing is lost between the two.
let t: TestDb;
let log: QueryLog;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let crew: Client;
let siteId: string;
let otherSiteId: string;
let bigLine: string;
let smallLine: string;
let numberedLine: string;
const made: string[] = [];

// Designations and board names with numbers in them, made in this shuffled order on two boards whose names
// differ by a number. Sorted as text "Q10" comes before "Q9" and "Deck 10" before "Deck 9".
const NUMBERED: Array<[board: "Deck 9" | "Deck 10", designation: string]> = [
  ["Deck 9", "Q10"],
  ["Deck 10", "Q11"],
  ["Deck 9", "F2.10"],
  ["Deck 9", "Q9"],
  ["Deck 9", "F2.9"],
  ["Deck 10", "Q2"],
  ["Deck 9", "Q1"],
  ["Deck 9", "F2.1"],
  ["Deck 9", "Q1a"],
];
/**
 * The reference: ICU's collation with numeric ordering as the JavaScript engine has it (Intl.Collator, ECMA-402,
 * `numeric: true`), by board name, then designation. The server's collation is ICU's too, in PostgreSQL.
 */
const collator = new Intl.Collator("und", { numeric: true });
const byReference = (a: [string, string], b: [string, string]) =>
  collator.compare(a[0], b[0]) || collator.compare(a[1], b[1]);

async function site(name: string) {
  const s = await t.db
    .insertInto("sites")
    .values({ name, kind: "vessel", location: "", description: "" })
    .returning("id")
    .executeTakeFirstOrThrow();
  await t.db
    .insertInto("memberships")
    .values({ siteId: s.id, userId: fx.crew.volunteer.id, role: "volunteer" })
    .execute();
  return s.id;
}

beforeAll(async () => {
  t = await createTestDb();
  log = loggingDb(t.url);
  server = await startTestServer({ db: log.db });
  fx = await makeCrew(t.db);
  crew = server.client();
  await crew.signIn(fx.crew.volunteer.email);
  siteId = await site("Test hulk");
  otherSiteId = await site("Another hulk");
  const aft = await makeBoard(t.db, siteId, "Aft distribution");
  const main = await makeBoard(t.db, siteId, "Main switchboard");
  // Nine positions want the same breaker, made in the order 9-1, 8-1, … 1-1 and alternating boards; two of
  // them later stop wanting it (withdrawn links, the line's history).
  const comps = [];
  for (let i = 9; i >= 1; i--) {
    const c = await makeComponent(t.db, siteId, (i % 2 ? main : aft).id, `${i}-1`, {
      ...BREAKER,
      disposition: "replace",
    });
    comps.push(c);
    made.push(c.designation);
  }
  await setDisposition(t.db, comps[1].componentId, null); // 8-1
  await setDisposition(t.db, comps[4].componentId, null); // 5-1
  // A second line of two positions (another rating).
  for (const d of ["20-1", "21-1"])
    await makeComponent(t.db, siteId, main.id, d, { ...BREAKER, ratingAmps: 400, disposition: "replace" });
  // A third line (another rating) on two boards, its positions named with numbers.
  const decks = {
    "Deck 9": await makeBoard(t.db, siteId, "Deck 9"),
    "Deck 10": await makeBoard(t.db, siteId, "Deck 10"),
  };
  for (const [board, d] of NUMBERED) {
    const c = await makeComponent(t.db, siteId, decks[board].id, d, {
      ...BREAKER,
      ratingAmps: 630,
      disposition: "replace",
    });
    // A defect with no sub-part named, on a component being replaced, rides on its line: Q9 is asked for twice.
    if (d === "Q9") await makeDefect(t.db, siteId, decks[board].id, c, { partsNeeded: "" });
  }
  // Two lines of one position each, P10 made before P9 (an 800 A and a 1000 A breaker).
  await makeComponent(t.db, siteId, main.id, "P10", { ...BREAKER, ratingAmps: 800, disposition: "replace" });
  await makeComponent(t.db, siteId, main.id, "P9", { ...BREAKER, ratingAmps: 1000, disposition: "replace" });
  const lines = (await crew.get(`/api/sites/${siteId}/parts`)).body.lines as Array<{ id: string; qty: number }>;
  bigLine = lines.find((l) => l.qty === 7)!.id;
  smallLine = lines.find((l) => l.qty === 2)!.id;
  numberedLine = lines.find((l) => l.qty === NUMBERED.length)!.id;
}, 60_000);
afterAll(async () => {
  await server.close();
  await log.close();
  await t.drop();
});

describe("a row carries its line's first positions and how many there are", () => {
  it("the list's row: the first four to ask for the part and a count of all seven", async () => {
    const r = await crew.get(`/api/sites/${siteId}/parts`);
    expect(r.status).toBe(200);
    const line = r.body.lines.find((l: { id: string }) => l.id === bigLine);
    expect(LINKS_IN_ROW).toBe(4);
    expect(line).toMatchObject({ qty: 7, linkCount: 7 });
    // The first four to ask (9-1, 7-1, 6-1, 4-1), listed in board and designation order as the line's page lists them.
    expect(
      line.positions.map((p: { boardName: string; designation: string }) => `${p.boardName} ${p.designation}`),
    ).toEqual(["Aft distribution 4-1", "Aft distribution 6-1", "Main switchboard 7-1", "Main switchboard 9-1"]);
    expect(line.positions.every((p: { state: string }) => p.state === "active")).toBe(true);
    const small = r.body.lines.find((l: { id: string }) => l.id === smallLine);
    expect(small).toMatchObject({ qty: 2, linkCount: 2 });
    expect(small.positions).toHaveLength(2);
  });

  it("the line's page heading carries the same row", async () => {
    const r = await crew.get(`/api/sites/${siteId}/parts/${bigLine}`);
    expect(r.status).toBe(200);
    expect(r.body.line).toMatchObject({ qty: 7, linkCount: 7 });
    expect(r.body.line.positions).toHaveLength(4);
  });

  it("the links route pages through every link, withdrawn ones too, in board and designation order", async () => {
    const seen: Array<{ linkId: string; boardName: string; designation: string; state: string }> = [];
    for (let page = 1; page <= 4; page++) {
      const r = await crew.get(`/api/sites/${siteId}/parts/${bigLine}/links?page=${page}&size=3`);
      expect(r.status).toBe(200);
      expect(r.body).toMatchObject({ total: 9, page, size: 3 });
      seen.push(...r.body.links);
    }
    expect(seen.map((l) => `${l.boardName} ${l.designation}`)).toEqual([
      "Aft distribution 2-1",
      "Aft distribution 4-1",
      "Aft distribution 6-1",
      "Aft distribution 8-1",
      "Main switchboard 1-1",
      "Main switchboard 3-1",
      "Main switchboard 5-1",
      "Main switchboard 7-1",
      "Main switchboard 9-1",
    ]);
    expect(seen.filter((l) => l.state === "withdrawn").map((l) => l.designation)).toEqual(["8-1", "5-1"]);
    const inDb = await t.db.selectFrom("partDemandLinks").select("id").where("lineId", "=", bigLine).execute();
    expect(new Set(seen.map((l) => l.linkId))).toEqual(new Set(inDb.map((l) => l.id)));
    expect(made).toHaveLength(9);
  });

  it("the default page is 50 links", async () => {
    const r = await crew.get(`/api/sites/${siteId}/parts/${bigLine}/links`);
    expect(r.body).toMatchObject({ total: 9, page: 1, size: 50 });
    expect(r.body.links).toHaveLength(9);
  });
});

describe("numbers in names and designations compare by value, the same everywhere the line's positions are listed", () => {
  const expected = [...NUMBERED].sort(byReference).map(([b, d]) => `${b} ${d}`);
  type Link = { linkId: string; boardName: string; designation: string; defectId: string | null };
  const named = (links: Link[]) => links.map((l) => `${l.boardName} ${l.designation}`);

  it("the reference order, written out", () => {
    // Checked by hand against ICU's rule: runs of digits compare by value (UTS #35, "kn"); "." and "a" rank as text.
    expect(expected).toEqual([
      "Deck 9 F2.1",
      "Deck 9 F2.9",
      "Deck 9 F2.10",
      "Deck 9 Q1",
      "Deck 9 Q1a",
      "Deck 9 Q9",
      "Deck 9 Q10",
      "Deck 10 Q2",
      "Deck 10 Q11",
    ]);
  });

  it("the links route: every page size walks the same order, each link once, Q9's two links in the order they were made", async () => {
    const whole = (await crew.get(`/api/sites/${siteId}/parts/${numberedLine}/links?size=50`)).body as {
      links: Link[];
      total: number;
    };
    expect(whole.total).toBe(NUMBERED.length + 1);
    const withQ9Twice = expected.flatMap((e) => (e === "Deck 9 Q9" ? [e, e] : [e]));
    expect(named(whole.links)).toEqual(withQ9Twice);
    const q9 = whole.links.filter((l) => l.designation === "Q9");
    expect(q9.map((l) => l.defectId === null)).toEqual([true, false]); // the component asked first, then its defect
    for (const size of [1, 2, 3, 4]) {
      const seen: Link[] = [];
      for (let page = 1; (page - 1) * size < whole.total; page++) {
        const r = await crew.get(`/api/sites/${siteId}/parts/${numberedLine}/links?page=${page}&size=${size}`);
        expect(r.status).toBe(200);
        seen.push(...r.body.links);
      }
      expect(
        seen.map((l) => l.linkId),
        `size ${size}`,
      ).toEqual(whole.links.map((l) => l.linkId));
    }
  });

  it("the row's first four are listed in that order", async () => {
    const line = (await crew.get(`/api/sites/${siteId}/parts/${numberedLine}`)).body.line;
    // The first four to ask: Q10, Q11, F2.10 and Q9 (the defect on Q9 asked later).
    const firstFour = NUMBERED.slice(0, 4)
      .sort(byReference)
      .map(([b, d]) => `${b} ${d}`);
    expect(named(line.positions)).toEqual(firstFour);
    expect(firstFour).toEqual(["Deck 9 F2.10", "Deck 9 Q9", "Deck 9 Q10", "Deck 10 Q11"]);
    expect(line.linkCount).toBe(NUMBERED.length + 1);
  });

  it("the CSV names the line's positions in the same order", async () => {
    const r = await crew.get(`/api/sites/${siteId}/parts.csv?status=all`);
    expect(r.status).toBe(200);
    const row = String(r.body)
      .split("\r\n")
      .find((l) => l.includes("Deck 9 F2.1"));
    expect(row).toBeDefined();
    const cell = row!.slice(row!.indexOf("Deck 9 F2.1"));
    expect(cell.startsWith(expected.flatMap((e) => (e === "Deck 9 Q9" ? [e, e] : [e])).join("; "))).toBe(true);
  });

  it("the board filter lists the boards the same way", async () => {
    const r = await crew.get(`/api/sites/${siteId}/parts`);
    const names = (r.body.boards as Array<{ name: string }>).map((b) => b.name);
    expect(names).toEqual(["Aft distribution", "Deck 9", "Deck 10", "Main switchboard"]);
    expect(names).toEqual([...names].sort(collator.compare));
  });

  it("sorting the list by positions compares each line's first designation by value too", async () => {
    type Row = { id: string; positions: Array<{ designation: string }> };
    const order = async (dir: string) => {
      const r = await crew.get(`/api/sites/${siteId}/parts?sort=positions&dir=${dir}`);
      expect(r.status).toBe(200);
      const rows = r.body.lines as Row[];
      const only = (d: string) => rows.find((l) => l.positions.length === 1 && l.positions[0].designation === d)!.id;
      const names = new Map([
        [bigLine, "1-1"],
        [smallLine, "20-1"],
        [numberedLine, "F2.1"],
        [only("P9"), "P9"],
        [only("P10"), "P10"],
      ]);
      return rows.map((l) => names.get(l.id));
    };
    // Each line by its first designation: as text P10 came before P9.
    expect(await order("asc")).toEqual(["1-1", "20-1", "F2.1", "P9", "P10"]);
    expect(await order("desc")).toEqual(["P10", "P9", "F2.1", "20-1", "1-1"]);
  });
});

describe("the links route is guarded and checks its input", () => {
  it("a line of another site, or none, is 404; a bad page or line id is 400; no session is 401", async () => {
    expect((await crew.get(`/api/sites/${otherSiteId}/parts/${bigLine}/links`)).status).toBe(404);
    expect((await crew.get(`/api/sites/${siteId}/parts/${crypto.randomUUID()}/links`)).status).toBe(404);
    for (const q of ["page=0", "size=0", "size=501", "page=x"]) {
      const r = await crew.get(`/api/sites/${siteId}/parts/${bigLine}/links?${q}`);
      expect(r.status, q).toBe(400);
      expect(JSON.stringify(r.body)).not.toMatch(/at .*\.ts:\d+/);
    }
    expect((await crew.get(`/api/sites/${siteId}/parts/not-a-line/links`)).status).toBe(400);
    expect((await server.client().get(`/api/sites/${siteId}/parts/${bigLine}/links`)).status).toBe(401);
  });
});

describe("statements", () => {
  const statementsOf = async (path: string) => {
    log.reset();
    const r = await crew.get(path);
    expect(r.status).toBe(200);
    return [...log.statements];
  };

  it("the links route: the same statements for a line of two links and one of nine", async () => {
    const small = await statementsOf(`/api/sites/${siteId}/parts/${smallLine}/links`);
    const big = await statementsOf(`/api/sites/${siteId}/parts/${bigLine}/links`);
    expect([...big].sort()).toEqual([...small].sort()); // the page and the count run side by side
  });

  it("the list's page is the session, the page with its rows' links, the count, the boards and the budget", async () => {
    const statements = await statementsOf(`/api/sites/${siteId}/parts`);
    expect(statements, statements.join("\n")).toHaveLength(5);
  });
});

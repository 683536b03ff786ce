/**
 * Where a photo can be filed: the site's boards (with counts, never their positions), one board's positions when
 * it is chosen, and a shoot's file names matched on the server by index. The matching must answer exactly what
 * `matchFileName` (src/domain/photo-matching.ts) answers over every position of the site, which is what the
 * client ran before the site's positions stopped being sent to it.
 */
import { CompiledQuery, sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { refreshBoardSummaries } from "../../server/inventory/board-summaries-repository";
import { boardTargetsQuery, targetsNamedQuery } from "../../server/photos/repository";
import { matchFileName, nameTokens, type MatchTarget } from "../../src/domain/photo-matching";
import { boardPhotoTargetsResponse, matchNamesResponse, photoTargetBoardsResponse } from "../../src/schemas/photos";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { makeBoard } from "../helpers/photo-fixtures";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let main: Awaited<ReturnType<typeof makeBoard>>;
let aft: Awaited<ReturnType<typeof makeBoard>>;
let foreign: Awaited<ReturnType<typeof makeBoard>>;
const as: Record<string, Client> = {};
const site = (p: string) => `/api/sites/${fx.siteId}${p}`;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  // "1-1" is on both boards (designations are unique per board only); tags are T-<designation> on the main
  // board and A-<designation> aft (set below), unique per site.
  aft = await makeBoard(t.db, fx.siteId, ["1-1", "3-3", "3 4"], "Aft distribution board");
  for (const [d, p] of Object.entries(aft.positions))
    await t.db
      .updateTable("components")
      .set({ tagNumber: `A-${d}` })
      .where("id", "=", p.componentId)
      .execute();
  main = await makeBoard(t.db, fx.siteId, ["1-1", "1-2", "2-14", "2-1", "14", "Q.7"], "Main switchboard");
  // A retired component's tag names nothing; a position without a current component has no tag.
  await t.db
    .updateTable("components")
    .set({ retiredAt: new Date() })
    .where("id", "=", aft.positions["3-3"].componentId)
    .execute();
  foreign = await makeBoard(t.db, fx.otherSiteId, ["1-1", "9-9"], "Another crew's board");
  await t.db.transaction().execute((trx) => refreshBoardSummaries(trx, [main.boardId, aft.boardId])); // as the inventory does
  for (const role of ["curator", "photographer", "volunteer", "viewer", "outsider"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

describe("the boards first, one board's positions when it is chosen", () => {
  it("lists the site's boards with their position counts and no positions", async () => {
    const r = await as.viewer.get(site("/photo-targets"));
    expect(r.status).toBe(200);
    expect(photoTargetBoardsResponse.parse(r.body).boards).toEqual([
      { id: aft.boardId, name: "Aft distribution board", positionCount: 3 },
      { id: main.boardId, name: "Main switchboard", positionCount: 6 },
    ]);
    expect(JSON.stringify(r.body)).not.toContain("designation");
  });

  it("gives one board's positions in board order, each with its current component's tag", async () => {
    const r = await as.photographer.get(site(`/boards/${aft.boardId}/photo-targets`));
    expect(r.status).toBe(200);
    const { board, targets } = boardPhotoTargetsResponse.parse(r.body);
    expect(board).toEqual({ id: aft.boardId, name: "Aft distribution board" });
    expect(targets).toEqual([
      {
        positionId: aft.positions["1-1"].id,
        boardId: aft.boardId,
        boardName: "Aft distribution board",
        designation: "1-1",
        tagNumber: "A-1-1",
        componentId: aft.positions["1-1"].componentId,
      },
      expect.objectContaining({ designation: "3-3", tagNumber: null, componentId: null }),
      expect.objectContaining({ designation: "3 4", tagNumber: "A-3 4" }),
    ]);
  });

  it("answers 404 for another site's board, 400 for a malformed id, and 404 to someone not on the site", async () => {
    const other = await as.curator.get(site(`/boards/${foreign.boardId}/photo-targets`));
    expect(other.status).toBe(404);
    expect(other.body.error.code).toBe("not_found");
    const bad = await as.curator.get(site("/boards/not-a-board/photo-targets"));
    expect(bad.status).toBe(400);
    expect(bad.body.error).toBeDefined();
    // Not a member: the site is not found for them (who learns that a site exists, DEVELOPERS.md).
    expect((await as.outsider.get(site(`/boards/${main.boardId}/photo-targets`))).status).toBe(404);
  });

  it("reads each position's current component by the position's id, never a scan of the site's components", async () => {
    // Nested loops priced out: a joined components table could only be hashed whole; a lateral read by key keeps
    // the position's id in its condition (PostgreSQL docs, "Planner Method Configuration").
    const scans = await plan(boardTargetsQuery(t.db, main.boardId).compile(), "enable_nestloop");
    const components = scans.filter((n) => n["Relation Name"] === "components");
    expect(components.length).toBeGreaterThan(0);
    expect(components.every((n) => /position_id = p\.id|p\.id = c\.position_id/.test(`${n["Index Cond"] ?? ""}`))).toBe(
      true,
    );
  });
});

describe("a shoot's file names matched on the server", () => {
  const match = (names: string[], boardId?: string, who = as.photographer) =>
    who.post(site("/photo-targets/match"), { names, ...(boardId ? { boardId } : {}) });

  it("matches tags across the site, designations on the chosen board, and says when a name is ambiguous", async () => {
    const names = ["KL T-2-14 front.JPG", "IMG 2_14 front.jpg", "1-1_nameplate.jpg", "a-3.4 after.jpg", "DSC_0042.jpg"];
    const r = await match(names);
    expect(r.status).toBe(200);
    const { matches, targets } = matchNamesResponse.parse(r.body);
    expect(matches).toEqual([
      { kind: "tag", positionId: main.positions["2-14"].id, matched: "T-2-14" },
      { kind: "designation", positionId: main.positions["2-14"].id, matched: "2-14" },
      {
        kind: "ambiguous",
        candidates: expect.arrayContaining([main.positions["1-1"].id, aft.positions["1-1"].id]),
        matched: "1-1",
      },
      { kind: "tag", positionId: aft.positions["3 4"].id, matched: "A-3 4" },
      { kind: "none" },
    ]);
    // Only the positions named come back, with what the desk shows of them.
    expect(targets.map((x) => x.positionId).sort()).toEqual(
      [main.positions["2-14"].id, main.positions["1-1"].id, aft.positions["1-1"].id, aft.positions["3 4"].id].sort(),
    );
    const onAft = matchNamesResponse.parse((await match(["1-1_nameplate.jpg"], aft.boardId)).body);
    expect(onAft.matches).toEqual([{ kind: "designation", positionId: aft.positions["1-1"].id, matched: "1-1" }]);
  });

  it("answers what matchFileName answers over every position of the site, name by name", async () => {
    // In the order the server reads them (board name, then designation): an ambiguous name quotes the first.
    const everything: MatchTarget[] = [aft, main].flatMap((b) =>
      Object.entries(b.positions)
        .map(([designation, p]) => ({
          positionId: p.id,
          boardId: b.boardId,
          designation,
          tagNumber: designation === "3-3" ? null : `${b === main ? "T" : "A"}-${designation}`,
        }))
        .sort((x, y) => x.designation.localeCompare(y.designation, "en", { numeric: true })),
    );
    const names = [
      "2-14.jpg",
      "12-14.jpg",
      "2-141.jpg",
      "x2-1.jpg",
      "2-1 and 14.jpeg",
      "q 7.png",
      "Q.7.JPG",
      "3 4.tif",
      "3-4.tif",
      "a-3-3.jpg",
      "t-1-2_t-2-1.heic",
      "(1-2).jpg",
      "__1-2__.jpg",
      "14",
      "no match here.jpg",
      "1-1.jpg",
    ];
    for (const boardId of [undefined, main.boardId, aft.boardId]) {
      const { matches } = matchNamesResponse.parse((await match(names, boardId)).body);
      const expected = names.map((n) => matchFileName(n, everything, boardId));
      const sorted = (m: (typeof matches)[number]) =>
        m.kind === "ambiguous" ? { ...m, candidates: [...m.candidates].sort() } : m;
      expect(matches.map(sorted), `board ${boardId ?? "none"}`).toEqual(expected.map(sorted));
    }
  });

  it("refuses bad input with a 400, another site's board with a 404, and who may not file photos with a 403", async () => {
    for (const body of [
      {},
      { names: [] },
      { names: ["ok.jpg"], boardId: "not-an-id" },
      { names: [42] },
      { names: Array.from({ length: 501 }, (_, i) => `${i}.jpg`) },
      { names: ["x".repeat(256)] },
    ]) {
      const r = await as.photographer.post(site("/photo-targets/match"), body);
      expect(r.status, JSON.stringify(body).slice(0, 80)).toBe(400);
      expect(r.body.error).toBeDefined();
    }
    expect((await match(["1-1.jpg"], foreign.boardId)).status).toBe(404);
    expect((await match(["1-1.jpg"], undefined, as.viewer)).status).toBe(403);
    expect((await match(["1-1.jpg"], undefined, as.volunteer)).status).toBe(403);
    // Another site's positions never match.
    const r = matchNamesResponse.parse((await match(["9-9.jpg"])).body);
    expect(r.matches).toEqual([{ kind: "none" }]);
  });
  it("looks names up by index, whatever the size of the site (last: it adds 20,000 positions to the other site)", async () => {
    // A board of 20,000 positions, each with a tagged component, on the other crew's site, so the planner has a
    // table worth an index (on a handful of rows a filter is cheaper, and that is what it picks).
    const big = await t.db
      .insertInto("boards")
      .values({ siteId: fx.otherSiteId, name: "A long board" })
      .returning("id")
      .executeTakeFirstOrThrow();
    await sql`INSERT INTO positions (site_id, board_id, designation, kind, grid_row, grid_col)
      SELECT ${fx.otherSiteId}, ${big.id}, 'B-' || g, 'molded_case_breaker', 1 + g / 100, 1 + g % 100
      FROM generate_series(1, 20000) g`.execute(t.db);
    await sql`INSERT INTO components (site_id, position_id, kind, tag_number)
      SELECT site_id, id, 'molded_case_breaker', 'TG-' || designation FROM positions WHERE board_id = ${big.id}`.execute(
      t.db,
    );
    await sql`ANALYZE positions`.execute(t.db);
    await sql`ANALYZE components`.execute(t.db);
    const compiled = targetsNamedQuery(t.db, fx.otherSiteId, nameTokens("KL TG-B-1234 front b-77.JPG")).compile();
    const scans = await plan(compiled);
    const tokenCond = (index: string) =>
      scans.some((n) => n["Index Name"] === index && /name|regexp_replace/.test(String(n["Index Cond"] ?? "")));
    expect(tokenCond("positions_site_name_token_idx")).toBe(true);
    expect(tokenCond("components_tag_token_idx")).toBe(true);
    expect(scans.filter((n) => n["Node Type"] === "Seq Scan")).toEqual([]);
    // And the answer: the tag beats the designation.
    const r = matchNamesResponse.parse(
      (
        await as.outsider.post(`/api/sites/${fx.otherSiteId}/photo-targets/match`, {
          names: ["KL TG-B-1234 front b-77.JPG", "b-77.jpg"],
        })
      ).body,
    );
    expect(r.matches.map((m) => (m.kind === "none" ? m.kind : `${m.kind} ${m.matched}`))).toEqual([
      "tag TG-B-1234",
      "designation B-77",
    ]);
  });
});

/** Every node of a JSON plan, depth first. */
type PlanNode = { "Node Type": string; "Relation Name"?: string; "Index Name"?: string; Plans?: PlanNode[] } & Record<
  string,
  unknown
>;
const nodesOf = (n: PlanNode): PlanNode[] => [n, ...(n.Plans ?? []).flatMap(nodesOf)];
async function plan(compiled: CompiledQuery, off?: "enable_nestloop") {
  return t.db.transaction().execute(async (trx) => {
    if (off) await sql`SELECT set_config(${off}, 'off', true)`.execute(trx);
    const r = await trx.executeQuery<{ "QUERY PLAN": [{ Plan: PlanNode }] }>(
      CompiledQuery.raw(`EXPLAIN (FORMAT JSON) ${compiled.sql}`, [...compiled.parameters]),
    );
    return nodesOf(r.rows[0]["QUERY PLAN"][0].Plan);
  });
}

import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEFECT_SEVERITIES, DEFECT_STATUSES } from "../../src/domain/vocab";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { makeBoard } from "./defects-fixtures";

// The register's total for a view filtered by board, status and severity alone is read from
// `defect_tallies`, which triggers on `defects` keep. Checked against PostgreSQL's own count(*)
// over the defects themselves after every kind of write, cascaded deletes included.

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let viewer: Client;
let boards: Array<Awaited<ReturnType<typeof makeBoard>>>;

async function addDefects(n: number, from = 0) {
  const rows = Array.from({ length: n }, (_, k) => {
    const i = from + k;
    const b = boards[i % boards.length];
    return {
      siteId: fx.siteId,
      boardId: b.boardId,
      positionId: b.positions[i % b.positions.length].id,
      title: `Tally defect ${i}`,
      category: "corrosion" as const,
      severity: DEFECT_SEVERITIES[i % 4],
      status: DEFECT_STATUSES[i % 7],
      createdAt: new Date(Date.UTC(2026, 10, 2, 0, 0, i)),
    };
  });
  // One statement for many rows: the trigger sums a statement's rows per key.
  await t.db.insertInto("defects").values(rows).execute();
}

/** The tally as kept, and as counted from the defects now: they must be equal. */
async function tallies() {
  const kept = await sql<{ k: string; n: number }>`
    SELECT site_id || '/' || board_id || '/' || status || '/' || severity AS k, n FROM defect_tallies
    WHERE n > 0 ORDER BY 1`.execute(t.db);
  const counted = await sql<{ k: string; n: number }>`
    SELECT site_id || '/' || board_id || '/' || status || '/' || severity AS k, count(*)::int AS n FROM defects
    GROUP BY 1 ORDER BY 1`.execute(t.db);
  return { kept: kept.rows, counted: counted.rows };
}

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  boards = [
    await makeBoard(t.db, fx.siteId, "Fore board", 3),
    await makeBoard(t.db, fx.siteId, "Steering gear board", 3),
    await makeBoard(t.db, fx.siteId, "Galley board", 3),
  ];
  await addDefects(60);
  viewer = server.client();
  await viewer.signIn(fx.crew.viewer.email);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const total = async (qs: string) => {
  const r = await viewer.get(`/api/sites/${fx.siteId}/defects?${qs}`);
  expect(r.status).toBe(200);
  return r.body.total as number;
};
const countWhere = async (where: string) =>
  Number(
    (
      await sql
        .raw<{ n: number }>(`SELECT count(*) AS n FROM defects WHERE site_id = '${fx.siteId}' ${where}`)
        .execute(t.db)
    ).rows[0].n,
  );

describe("the register's total from the kept tallies", () => {
  it("equals count(*) over the defects for every board, status and severity filter and their combinations", async () => {
    expect(await total("")).toBe(await countWhere(""));
    expect(await total("")).toBe(60);
    for (const b of boards)
      expect(await total(`board=${b.boardId}`)).toBe(await countWhere(`AND board_id = '${b.boardId}'`));
    for (const s of DEFECT_STATUSES) expect(await total(`status=${s}`)).toBe(await countWhere(`AND status = '${s}'`));
    for (const s of DEFECT_SEVERITIES)
      expect(await total(`severity=${s}`)).toBe(await countWhere(`AND severity = '${s}'`));
    expect(
      await total(
        `board=${boards[0].boardId}&board=${boards[2].boardId}&status=raised&status=scheduled&severity=disabling`,
      ),
    ).toBe(
      await countWhere(
        `AND board_id IN ('${boards[0].boardId}', '${boards[2].boardId}') AND status IN ('raised', 'scheduled') AND severity = 'disabling'`,
      ),
    );
    // A filter the tallies do not key (category, search, flags) still counts the defects themselves.
    expect(await total("category=corrosion&status=raised")).toBe(await countWhere(`AND status = 'raised'`));
    expect(await total("q=Tally%20defect%201")).toBe(await countWhere(`AND title ILIKE '%Tally defect 1%'`));
  });

  it("stays equal to the defects after inserts, status, severity and board changes, deletes and a board's cascaded delete", async () => {
    expect((await tallies()).kept).toEqual((await tallies()).counted);
    await addDefects(25, 100);
    // Many rows in one statement, moving between keys in both directions.
    await sql`UPDATE defects SET status = CASE status WHEN 'raised' THEN 'scheduled' WHEN 'scheduled' THEN 'raised' ELSE status END
      WHERE site_id = ${fx.siteId}`.execute(t.db);
    await sql`UPDATE defects SET severity = 'disabling' WHERE title LIKE 'Tally defect 1%'`.execute(t.db);
    await sql`UPDATE defects SET board_id = ${boards[1].boardId}, section_id = NULL, position_id = NULL
      WHERE title IN ('Tally defect 3', 'Tally defect 6')`.execute(t.db);
    // An update that moves nothing between keys leaves the tallies as they are.
    await sql`UPDATE defects SET priority_score = priority_score + 1 WHERE site_id = ${fx.siteId}`.execute(t.db);
    let now = await tallies();
    expect(now.kept).toEqual(now.counted);
    await sql`DELETE FROM defects WHERE title LIKE 'Tally defect 2%'`.execute(t.db);
    now = await tallies();
    expect(now.kept).toEqual(now.counted);
    // A board removed takes its defects with it (a cascade); its tallies fall to nothing.
    await sql`DELETE FROM boards WHERE id = ${boards[2].boardId}`.execute(t.db);
    now = await tallies();
    expect(now.kept).toEqual(now.counted);
    const left = await sql<{
      n: number;
    }>`SELECT count(*)::int AS n FROM defect_tallies WHERE board_id = ${boards[2].boardId}`.execute(t.db);
    expect(left.rows[0].n).toBe(0);
    expect(await total("")).toBe(await countWhere(""));
  });

  it("a writer holding one tally row and a writer moving a defect across it take the rows in one order: no deadlock", async () => {
    // One key (board, severity) in two statuses: the rows (raised) and (scheduled). The second writer's move
    // takes both; in key order it waits at "raised", holding nothing, while the first goes on to "scheduled".
    // Taken the other way round ("scheduled" first) the two would wait on each other.
    const b = (
      await sql<{ id: string; boardId: string; severity: string }>`SELECT id, board_id AS "boardId", severity
        FROM defects WHERE site_id = ${fx.siteId} AND status = 'scheduled' ORDER BY ref LIMIT 1`.execute(t.db)
    ).rows[0];
    const insert = (status: string) =>
      sql`INSERT INTO defects (site_id, board_id, title, category, severity, status)
        VALUES (${fx.siteId}, ${b.boardId}, ${`Order check ${status}`}, 'corrosion', ${b.severity}, ${status})`;
    let firstWrote!: () => void;
    const firstHasWritten = new Promise<void>((r) => (firstWrote = r));
    let secondStarted!: () => void;
    const secondIsWaiting = new Promise<void>((r) => (secondStarted = r));
    const first = t.db.transaction().execute(async (trx) => {
      await insert("raised").execute(trx);
      firstWrote();
      await secondIsWaiting;
      await new Promise((r) => setTimeout(r, 300)); // the second writer's statement is now waiting
      await insert("scheduled").execute(trx);
    });
    await firstHasWritten;
    const second = t.db.transaction().execute(async (trx) => {
      const move = sql`UPDATE defects SET status = 'raised' WHERE id = ${b.id}`.execute(trx);
      secondStarted();
      await move;
    });
    await expect(Promise.all([first, second])).resolves.toBeDefined();
    const now = await tallies();
    expect(now.kept).toEqual(now.counted);
  });

  it("a delete of many defects (as a board's cascade makes) applies its tallies in key order too: no deadlock", async () => {
    // A fresh board with one defect in each of its 28 keys (status × severity), written high key first so the
    // table holds their rows in that order. A first writer holds the lowest key's row; a delete of all 28 defects
    // then waits for it holding no tally row when it goes in key order, and the first writer goes on to add a
    // defect to every other key (one statement, in key order). Applied in any other order, the delete holds some
    // of those rows while it waits for the lowest one, and the two wait on each other: "deadlock detected".
    const board = await makeBoard(t.db, fx.siteId, "Bilge pump board", 1);
    const keys = DEFECT_STATUSES.flatMap((status) => DEFECT_SEVERITIES.map((severity) => ({ status, severity }))).sort(
      (a, b) => (a.status + "/" + a.severity < b.status + "/" + b.severity ? -1 : 1),
    );
    const add = (ks: typeof keys, title: string) =>
      sql`INSERT INTO defects (site_id, board_id, title, category, severity, status)
        SELECT ${fx.siteId}, ${board.boardId}, ${title}, 'corrosion', k.severity, k.status
        FROM jsonb_to_recordset(${JSON.stringify(ks)}::jsonb) AS k(status text, severity text)`;
    for (const k of [...keys].reverse()) await add([k], "Delete order").execute(t.db);
    const waiting = async () =>
      (
        await sql<{ n: number }>`SELECT count(*)::int AS n FROM pg_stat_activity
          WHERE datname = current_database() AND wait_event_type = 'Lock'`.execute(t.db)
      ).rows[0].n;
    let firstWrote!: () => void;
    const firstHasWritten = new Promise<void>((r) => (firstWrote = r));
    let deleteStarted!: () => void;
    const deleteIsWaiting = new Promise<void>((r) => (deleteStarted = r));
    const first = t.db.transaction().execute(async (trx) => {
      await add(keys.slice(0, 1), "Delete order, held").execute(trx);
      firstWrote();
      await deleteIsWaiting;
      for (let i = 0; i < 250 && (await waiting()) < 1; i++) await new Promise((r) => setTimeout(r, 20));
      await add(keys.slice(1), "Delete order, held").execute(trx);
    });
    await firstHasWritten;
    const remove = t.db.transaction().execute(async (trx) => {
      const del = sql`DELETE FROM defects WHERE board_id = ${board.boardId} AND title = 'Delete order'`.execute(trx);
      deleteStarted();
      await del;
    });
    const results = await Promise.allSettled([first, remove]);
    expect(results.map((r) => (r.status === "rejected" ? String(r.reason) : "ok"))).toEqual(["ok", "ok"]);
    const now = await tallies();
    expect(now.kept).toEqual(now.counted);
  });

  it("a write rolled back leaves the tallies as they were", async () => {
    const before = await tallies();
    await t.db
      .transaction()
      .execute(async (trx) => {
        await sql`UPDATE defects SET status = 'closed' WHERE site_id = ${fx.siteId}`.execute(trx);
        throw new Error("rolled back");
      })
      .catch(() => undefined);
    expect(await tallies()).toEqual(before);
  });
});

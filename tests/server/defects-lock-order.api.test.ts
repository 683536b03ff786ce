import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, holdInTransaction, untilLockWaiters, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { moveLineStatus } from "../../server/parts/workflow";
import { lockSiteParts } from "../../server/parts/repository";
import { moveDefect, patchDefect } from "../../server/defects/service";
import { BREAKER, makeBoard, makeComponent, makeDefect } from "./parts-fixtures";

// A defect's edit and a part's fitting on one board take what they share in the wanted list's one order
// (DEVELOPERS.md, "Lock order of the wanted list's writers"): the defect rows, then the site's demand lock,
// and only then the defects' tally rows (`defect_tallies`, written by the trigger on every defect write that
// moves a defect between board × status × severity). Before, an edit wrote its defect — holding its tally
// row — and then waited for the demand lock, while a fitting move held the demand lock and went on to move
// its own defect out of that same tally row: "deadlock detected", the API's 409 "try again", nothing saved.
let t: TestDb;
let fx: Awaited<ReturnType<typeof makeCrew>>;

beforeAll(async () => {
  t = await createTestDb();
  fx = await makeCrew(t.db);
});
afterAll(async () => {
  await t.drop();
});

const curator = () => ({ id: fx.crew.curator.id, role: "curator" as const });
const scrounger = () => ({ id: fx.crew.scrounger.id, role: "scrounger" as const });

/**
 * A board with a component whose line is received (its part in hand) and a defect under repair riding on it,
 * and a second defect on the same board with the same status and severity ("impaired"): one tally row.
 */
async function setUp(n: number) {
  const board = await makeBoard(t.db, fx.siteId, `Tally board ${n}`);
  const comp = await makeComponent(t.db, fx.siteId, board.id, `T-${n}`, {
    ...BREAKER,
    model: `NB tally ${n}`,
    disposition: "replace",
  });
  const fitted = await makeDefect(t.db, fx.siteId, board.id, comp, { partsNeeded: "", status: "under_repair" });
  const other = await makeDefect(t.db, fx.siteId, board.id, null, {
    partsNeeded: "",
    partsState: "none_needed",
    status: "under_repair",
  });
  const line = await t.db
    .selectFrom("partLines")
    .select(["id", "version"])
    .where("siteId", "=", fx.siteId)
    .where("model", "=", `NB tally ${n}`)
    .executeTakeFirstOrThrow();
  const acquired = await moveLineStatus(
    t.db,
    fx.siteId,
    line.id,
    {
      to: "acquired",
      version: line.version,
      note: "",
      acquisition: { qty: 1, cost: 80, acquiredOn: "2026-11-30", notes: "", leadId: null },
    },
    scrounger(),
  );
  const received = await moveLineStatus(
    t.db,
    fx.siteId,
    line.id,
    { to: "received", version: acquired.line.version, note: "" },
    scrounger(),
  );
  return { board, fitted, other, line: { id: line.id, version: received.line.version } };
}

const fit = (line: { id: string; version: number }) =>
  moveLineStatus(
    t.db,
    fx.siteId,
    line.id,
    { to: "fitted", version: line.version, note: "", heritageAfter: "period" },
    curator(),
  );
const editSeverity = async (id: string) => {
  const { version } = await t.db.selectFrom("defects").select("version").where("id", "=", id).executeTakeFirstOrThrow();
  return patchDefect(t.db, { siteId: fx.siteId, actor: curator(), notices: [] }, id, { version, severity: "degraded" });
};
const outcome = (r: PromiseSettledResult<unknown>[]) =>
  r.map((x) => (x.status === "rejected" ? String(x.reason) + " " + JSON.stringify(x.reason) : "ok"));

async function tallies(boardId: string) {
  const rows = await t.db
    .selectFrom("defectTallies")
    .select(["status", "severity", "n"])
    .where("boardId", "=", boardId)
    .orderBy("status")
    .orderBy("severity")
    .execute();
  return rows.map((r) => `${r.status}/${r.severity}: ${r.n}`);
}

describe("a defect's edit and a part's fitting on one board take shared locks in one order", () => {
  it("crossing on purpose (the fitting first at the demand lock, the edit behind it): both complete", async () => {
    const { board, fitted, other, line } = await setUp(0);
    // A third transaction holds the demand lock; the fitting stops there holding its component and defect,
    // then the edit starts and stops there too. The holder lets go: the fitting (first in the queue) goes
    // on to move its defect out of "under repair / impaired". Before the fix the edit had already written
    // its defect and held that tally row while it waited.
    const holder = await holdInTransaction(t.db, (trx) => lockSiteParts(trx, fx.siteId));
    const fitting = fit(line);
    await untilLockWaiters(t.db, 1);
    const edit = editSeverity(other.id);
    await untilLockWaiters(t.db, 2);
    await holder.release();
    expect(outcome(await Promise.allSettled([fitting, edit]))).toEqual(["ok", "ok"]);
    const rows = await t.db
      .selectFrom("defects")
      .select(["id", "status", "severity"])
      .where("id", "in", [fitted.id, other.id])
      .execute();
    expect(Object.fromEntries(rows.map((r) => [r.id, `${r.status}/${r.severity}`]))).toEqual({
      [fitted.id]: "awaiting_retest/impaired",
      [other.id]: "under_repair/degraded",
    });
    expect(await tallies(board.id)).toEqual(["under_repair/degraded: 1", "awaiting_retest/impaired: 1"].sort());
  });

  it("run together many times, unforced (an edit of severity, a status move): never a deadlock, the tallies add up", async () => {
    for (let n = 1; n <= 12; n++) {
      const { board, other, line } = await setUp(n);
      const { version } = await t.db
        .selectFrom("defects")
        .select("version")
        .where("id", "=", other.id)
        .executeTakeFirstOrThrow();
      const write =
        n % 2
          ? editSeverity(other.id)
          : moveDefect(t.db, { siteId: fx.siteId, actor: curator(), notices: [] }, other.id, {
              to: "scheduled",
              reason: "Test: back to the queue",
              version,
            });
      expect(outcome(await Promise.allSettled([fit(line), write])), `round ${n}`).toEqual(["ok", "ok"]);
      expect(await tallies(board.id), `round ${n}`).toEqual(
        [n % 2 ? "under_repair/degraded: 1" : "scheduled/impaired: 1", "awaiting_retest/impaired: 1"].sort(),
      );
    }
  });
});

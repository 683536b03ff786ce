import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, untilLockWaiters, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { assignTags } from "../../server/inventory/tags-service";
import { lockComponentsFor } from "../../server/inventory/survey-service";
import { commitImport } from "../../server/inventory/csv-commit";
import { fromText } from "../../server/csv-read";
import { makeBoard, makeComponent } from "./parts-fixtures";

// Every writer that takes several components takes them in id order (survey-repository's
// `lockComponents`; a part's receipt or fitting takes its links' components that way). Tag assignment
// used to lock them in board and label order, the order the tags are given out in, and a CSV import in the
// file's row order: either, crossing a fitting on two components, could wait on it in a circle, and PostgreSQL
// would end one of them ("deadlock detected", answered 409 "try again"). Now both lock in id order first.
let t: TestDb;
let fx: Awaited<ReturnType<typeof makeCrew>>;

beforeAll(async () => {
  t = await createTestDb();
  fx = await makeCrew(t.db);
});
afterAll(async () => {
  await t.drop();
});

describe("tag assignment takes components in the one id order", () => {
  it("crossing a writer that takes the same two components in id order: both complete, tags in label order", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Tag crossing board");
    const a = await makeComponent(t.db, fx.siteId, board.id, "TX-1");
    const b = await makeComponent(t.db, fx.siteId, board.id, "TX-2");
    const [low, high] = [a, b].sort((x, y) => (x.componentId < y.componentId ? -1 : 1));
    // The component with the larger id comes first on the board, so label order is the reverse of id order.
    await t.db.updateTable("positions").set({ sortOrder: 1 }).where("id", "=", high.positionId).execute();
    await t.db.updateTable("positions").set({ sortOrder: 2 }).where("id", "=", low.positionId).execute();

    // The other writer (as a fitting does) holds the smaller id, waits until the tag run is waiting, then takes
    // the larger id. Before, the tag run held the larger id by then: a circle.
    let started!: () => void;
    const isStarted = new Promise<void>((r) => (started = r));
    const other = t.db.transaction().execute(async (trx) => {
      await lockComponentsFor(trx, fx.siteId, [low.componentId]);
      started();
      await untilLockWaiters(t.db, 1);
      await lockComponentsFor(trx, fx.siteId, [high.componentId]);
    });
    await isStarted;
    const tagRun = assignTags(t.db, fx.siteId, [low.positionId, high.positionId], fx.crew.volunteer.id, "TX-");

    const results = await Promise.allSettled([other, tagRun]);
    expect(results.map((r) => (r.status === "rejected" ? String(r.reason) : "ok"))).toEqual(["ok", "ok"]);
    const done = (results[1] as PromiseFulfilledResult<Awaited<ReturnType<typeof assignTags>>>).value;
    // Numbered in the board's order all the same: the first on the board gets the first number.
    expect(done.assigned).toEqual([
      { positionId: high.positionId, tagNumber: "TX-0001" },
      { positionId: low.positionId, tagNumber: "TX-0002" },
    ]);
  });
});

/**
 * Another writer (as a fitting does) holds the component with the smaller id, waits until `run` waits for a lock,
 * then takes the larger id; resolves with what each came to.
 */
async function crossing(low: string, high: string, run: () => Promise<unknown>) {
  let started!: () => void;
  const isStarted = new Promise<void>((r) => (started = r));
  const other = t.db.transaction().execute(async (trx) => {
    await lockComponentsFor(trx, fx.siteId, [low]);
    started();
    await untilLockWaiters(t.db, 1);
    await lockComponentsFor(trx, fx.siteId, [high]);
  });
  await isStarted;
  const results = await Promise.allSettled([other, run()]);
  return results.map((r) => (r.status === "rejected" ? String(r.reason) : "ok"));
}

describe("a CSV import takes the components it changes in the one id order", () => {
  it("rows in the reverse of id order, crossing a writer that takes the same two in id order: both complete", async () => {
    const board = await makeBoard(t.db, fx.siteId, "CSV order board");
    const a = await makeComponent(t.db, fx.siteId, board.id, "CX-1");
    const b = await makeComponent(t.db, fx.siteId, board.id, "CX-2");
    const [low, high] = [a, b].sort((x, y) => (x.componentId < y.componentId ? -1 : 1));
    const cell = async (positionId: string) =>
      t.db
        .selectFrom("positions")
        .select(["gridRow", "gridCol"])
        .where("id", "=", positionId)
        .executeTakeFirstOrThrow();
    const [ph, pl] = [await cell(high.positionId), await cell(low.positionId)];
    // The larger id's row first: the import used to update (and so lock) it first.
    const file =
      "board,designation,kind,grid_row,grid_col,heritage\r\n" +
      `CSV order board,${high.designation},power_breaker,${ph.gridRow},${ph.gridCol},period\r\n` +
      `CSV order board,${low.designation},power_breaker,${pl.gridRow},${pl.gridCol},period\r\n`;
    const r = await crossing(low.componentId, high.componentId, () =>
      commitImport(t.db, fx.siteId, fx.crew.curator.id, fromText(file)),
    );
    expect(r).toEqual(["ok", "ok"]);
    const rows = await t.db
      .selectFrom("components")
      .select("heritage")
      .where("id", "in", [low.componentId, high.componentId])
      .execute();
    expect(rows.map((x) => x.heritage)).toEqual(["period", "period"]);
  });
});

import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, untilLockWaiters, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { assignTags } from "../../server/inventory/tags-service";
import { lockComponentsFor } from "../../server/inventory/survey-service";
import { makeBoard, makeComponent } from "./parts-fixtures";

// Every writer that takes several components takes them in id order (survey-repository's
// `lockComponents`; a part's receipt or fitting takes its links' components that way). Tag assignment
// used to lock them in board and label order, the order the tags are given out in: a fitting and a tag
// run crossing on two components could wait on each other in a circle, and PostgreSQL would end one of
// them ("deadlock detected", answered 409 "try again"). Now it locks in id order and numbers in label order.
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

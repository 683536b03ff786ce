import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, holdInTransaction, untilLockWaiters, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { decideDisposition } from "../../server/inventory/survey-service";
import { moveLineStatus } from "../../server/parts/workflow";
import { lockSiteParts } from "../../server/parts/repository";
import { BREAKER, makeBoard, makeComponent } from "./parts-fixtures";

// The writers of the wanted list take what they share in one order (DEVELOPERS.md, "Lock order of the
// wanted list's writers"): the register's rows (components), then the site's demand lock, then the line,
// then the budget lock, then the boards' summary locks. Two writers crossing on purpose must then wait
// for each other, never deadlock (PostgreSQL would end one: "deadlock detected", the API's 409 "try again").
let t: TestDb;
let fx: Awaited<ReturnType<typeof makeCrew>>;

beforeAll(async () => {
  t = await createTestDb();
  fx = await makeCrew(t.db);
});
afterAll(async () => {
  await t.drop();
});

describe("the wanted list's writers take shared rows in one order", () => {
  it("a disposition change and the 'received' of the same component's line, crossing: both complete", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Crossing board");
    const comp = await makeComponent(t.db, fx.siteId, board.id, "X-1", {
      ...BREAKER,
      model: "NB crossing",
      disposition: "replace",
    });
    const line = await t.db
      .selectFrom("partLines")
      .selectAll()
      .where("siteId", "=", fx.siteId)
      .where("model", "=", "NB crossing")
      .executeTakeFirstOrThrow();
    const scrounger = { id: fx.crew.scrounger.id, role: "scrounger" as const };
    const acquired = await moveLineStatus(
      t.db,
      fx.siteId,
      line.id,
      {
        to: "acquired",
        version: line.version,
        note: "",
        acquisition: { qty: 1, cost: 120, acquiredOn: "2026-11-30", notes: "", leadId: null },
      },
      scrounger,
    );
    const component = await t.db
      .selectFrom("components")
      .select("version")
      .where("id", "=", comp.componentId)
      .executeTakeFirstOrThrow();

    // A third transaction holds the site's demand lock, so the disposition change stops there holding its
    // component; the receipt then starts, and the holder lets go. Before the writers shared one order the
    // receipt took the line and the budget lock, then waited for the component, while the disposition
    // change went on to wait for the budget lock: PostgreSQL's "deadlock detected".
    const holder = await holdInTransaction(t.db, (trx) => lockSiteParts(trx, fx.siteId));
    const decide = decideDisposition(t.db, fx.siteId, comp.componentId, fx.crew.curator.id, {
      disposition: "clean",
      reason: "Test: the curator's call",
      version: component.version,
    });
    await untilLockWaiters(t.db, 1);
    const receive = moveLineStatus(
      t.db,
      fx.siteId,
      line.id,
      { to: "received", version: acquired.line.version, note: "" },
      scrounger,
    );
    await untilLockWaiters(t.db, 2);
    await holder.release();
    const results = await Promise.allSettled([decide, receive]);
    expect(results.map((r) => (r.status === "rejected" ? String(r.reason) : "ok"))).toEqual(["ok", "ok"]);

    const after = await t.db
      .selectFrom("components")
      .select(["disposition", "custody"])
      .where("id", "=", comp.componentId)
      .executeTakeFirstOrThrow();
    expect(after.disposition).toBe("clean");
    const l = await t.db.selectFrom("partLines").select("status").where("id", "=", line.id).executeTakeFirstOrThrow();
    expect(l.status).toBe("received");
  });
});

import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, holdInTransaction, untilLockWaiters, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { moveLineStatus } from "../../server/parts/workflow";
import { lockSiteParts } from "../../server/parts/repository";
import { createDefect, moveDefect, patchDefect } from "../../server/defects/service";
import { patchComponent } from "../../server/inventory/survey-service";
import { deletePosition } from "../../server/inventory/positions-service";
import { commitImport } from "../../server/inventory/csv-commit";
import { fromText } from "../../server/csv-read";
import { recordWatchCheck } from "../../server/return-to-service/service";
import { createDefectBody } from "../../src/schemas/defects";
import { watchCheckBody } from "../../src/schemas/return-to-service";
import { BREAKER, makeBoard, makeComponent, makeDefect } from "./parts-fixtures";

// The writers of the register outside the defects domain's own edits — a return-to-service incident's defect,
// a component's edit (its heritage re-ranks its defects; its nameplate or disposition syncs the wanted list,
// which links the defects riding on it), a part's fitting that changes the component's heritage, a position's
// deletion — take what they share with the wanted list's writers in the one documented order (DEVELOPERS.md,
// "Lock order of the wanted list's writers"): the register rows they change (position, components, then
// defects, each in id order), then the site's demand lock, then the defects' tally rows, lines and the rest.
// Each test crosses two (or three) writers on purpose: a holder keeps the demand lock while the first writer
// stops there holding its rows, the second starts and stops too; the holder lets go and the first goes on.
// Before the fix each ended with "deadlock detected" (PostgreSQL ends one: the API's 409 "try again").
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
const dctx = () => ({ siteId: fx.siteId, actor: curator(), notices: [] });
const outcome = (r: PromiseSettledResult<unknown>[]) =>
  r.map((x) => (x.status === "rejected" ? String(x.reason) + " " + JSON.stringify(x.reason) : "ok"));

/**
 * Runs `writers` in turn, each started once the ones before it wait for a lock, while a third transaction holds the
 * site's demand lock; then lets go and waits for all of them.
 */
async function crossed(...writers: Array<() => Promise<unknown>>) {
  const holder = await holdInTransaction(t.db, (trx) => lockSiteParts(trx, fx.siteId));
  const running: Promise<unknown>[] = [];
  try {
    for (const w of writers) {
      const p = w();
      p.catch(() => {}); // settled below; one that fails before the next starts is reported there, not as unhandled
      running.push(p);
      await untilLockWaiters(t.db, running.length);
    }
  } finally {
    await holder.release();
  }
  return outcome(await Promise.allSettled(running));
}

const version = async (table: "defects" | "components", id: string) =>
  (await t.db.selectFrom(table).select("version").where("id", "=", id).executeTakeFirstOrThrow()).version;

/** The line the component's replacement is on, moved to "received" (its part in hand, ready to fit). */
async function receivedLine(model: string) {
  const line = await t.db
    .selectFrom("partLines")
    .select(["id", "version"])
    .where("siteId", "=", fx.siteId)
    .where("model", "=", model)
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
  return { id: line.id, version: received.line.version };
}

const fit = (line: { id: string; version: number }, heritageAfter: "unchanged" | "period" = "unchanged") =>
  moveLineStatus(t.db, fx.siteId, line.id, { to: "fitted", version: line.version, note: "", heritageAfter }, curator());

/** Every active link of the wanted list naming these sources, as "source → line model × qty". */
async function demandOf(ids: string[]) {
  const rows = await t.db
    .selectFrom("partDemandLinks as l")
    .innerJoin("partLines as pl", "pl.id", "l.lineId")
    .select(["l.componentId", "l.defectId", "l.qty", "pl.model", "pl.status"])
    .where((eb) => eb.or([eb("l.componentId", "in", ids), eb("l.defectId", "in", ids)]))
    .where("l.active", "=", true)
    .execute();
  return rows.map((r) => `${r.componentId ?? r.defectId} → ${r.model} (${r.status}) × ${r.qty}`).sort();
}

/** A stage of the board, live under watch since an hour ago (written straight to the table). */
const liveStage = (boardId: string) =>
  t.db
    .insertInto("rtsStages")
    .values({
      siteId: fx.siteId,
      boardId,
      sortOrder: 1,
      name: "Feeder section",
      supply: "temporary_fused",
      voltageStep: "full",
      status: "energised",
      energisedAt: new Date(Date.now() - 3_600_000),
    })
    .returning("id")
    .executeTakeFirstOrThrow();

describe("the register's other writers take the wanted list's locks in its one order", () => {
  it("a watch check opening two incidents' defects, a defect raised and a part fitted on one board: all complete", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Incident board");
    const comp = await makeComponent(t.db, fx.siteId, board.id, "I-1", {
      ...BREAKER,
      model: "NB incident",
      disposition: "replace",
    });
    const fitted = await makeDefect(t.db, fx.siteId, board.id, comp, { partsNeeded: "", status: "under_repair" });
    const line = await receivedLine("NB incident");
    const stage = await liveStage(board.id);
    // The queue at the demand lock: a defect raised on the board ("raised / disabling", the incidents' tally row),
    // then the fitting (holding the component). The watch check's first incident writes that tally row; before
    // the fix it did so without the demand lock and then, for the second incident (a hot spot on the fitted
    // component's position), waited for the component: the raise waited for the tally row, the fitting for the
    // raise — a circle of three.
    const r = await crossed(
      () =>
        createDefect(
          t.db,
          dctx(),
          createDefectBody.parse({
            boardId: board.id,
            title: "Door interlock broken",
            category: "mechanical",
            severity: "disabling",
          }),
        ),
      () => fit(line),
      () =>
        recordWatchCheck(
          t.db,
          { siteId: fx.siteId, actor: curator() },
          stage.id,
          watchCheckBody.parse({
            lamps: "one_dark",
            lampPhase: "B",
            thermalPositionId: comp.positionId,
            thermalC: 120,
            ambientC: 20,
          }),
        ),
    );
    expect(r).toEqual(["ok", "ok", "ok"]);
    const defects = await t.db
      .selectFrom("defects")
      .select(["id", "status", "severity", "partsState"])
      .where("boardId", "=", board.id)
      .execute();
    expect(defects.map((d) => `${d.status}/${d.severity}`).sort()).toEqual(
      ["awaiting_retest/impaired", "raised/disabling", "raised/disabling", "raised/disabling"].sort(),
    );
    const tallies = await t.db
      .selectFrom("defectTallies")
      .select(["status", "severity", "n"])
      .where("boardId", "=", board.id)
      .execute();
    expect(tallies.map((x) => `${x.status}/${x.severity}: ${x.n}`).sort()).toEqual([
      "awaiting_retest/impaired: 1",
      "raised/disabling: 3",
    ]);
    // The wanted list: the fitted line keeps its one component (and the ride-along defect); the incidents' defects
    // ask for no part, so nothing new is wanted.
    const line2 = await t.db
      .selectFrom("partLines")
      .select("status")
      .where("id", "=", line.id)
      .executeTakeFirstOrThrow();
    expect(line2.status).toBe("fitted");
    expect(await demandOf(defects.filter((d) => d.id !== fitted.id).map((d) => d.id))).toEqual([]);
  });

  it("a component's heritage edit and an edit of one of its defects: both complete, the defect re-ranked", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Heritage board");
    const comp = await makeComponent(t.db, fx.siteId, board.id, "H-1", { ...BREAKER, model: "NB heritage" });
    const d = await makeDefect(t.db, fx.siteId, board.id, comp, { partsNeeded: "", partsState: "none_needed" });
    const cv = await version("components", comp.componentId);
    const dv = await version("defects", d.id);
    const before = await t.db
      .selectFrom("defects")
      .select("priorityScore")
      .where("id", "=", d.id)
      .executeTakeFirstOrThrow();
    // The component edit stops at the demand lock holding the component; the defect's edit holds its defect there.
    // Before: the component edit then went on to re-rank the defect (original fabric weighs in its priority) —
    // the defect's row, after the demand lock, held by the edit waiting for that lock.
    const r = await crossed(
      () => patchComponent(t.db, fx.siteId, comp.componentId, curator().id, { version: cv, heritage: "period" }),
      () => patchDefect(t.db, dctx(), d.id, { version: dv, severity: "degraded" }),
    );
    expect(r).toEqual(["ok", "ok"]);
    const after = await t.db
      .selectFrom("defects")
      .select(["severity", "priorityScore"])
      .where("id", "=", d.id)
      .executeTakeFirstOrThrow();
    expect(after.severity).toBe("degraded");
    expect(Number(after.priorityScore)).not.toBe(Number(before.priorityScore));
  });

  it("a part fitted as period fabric and an edit of another defect of its component: both complete", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Fitting heritage board");
    const comp = await makeComponent(t.db, fx.siteId, board.id, "F-1", {
      ...BREAKER,
      model: "NB fit heritage",
      disposition: "replace",
    });
    await makeDefect(t.db, fx.siteId, board.id, comp, { partsNeeded: "", status: "under_repair" });
    const other = await makeDefect(t.db, fx.siteId, board.id, comp, { partsNeeded: "", partsState: "none_needed" });
    const line = await receivedLine("NB fit heritage");
    const dv = await version("defects", other.id);
    const r = await crossed(
      () => fit(line, "period"),
      () => patchDefect(t.db, dctx(), other.id, { version: dv, severity: "degraded" }),
    );
    expect(r).toEqual(["ok", "ok"]);
    const c = await t.db
      .selectFrom("components")
      .select("heritage")
      .where("id", "=", comp.componentId)
      .executeTakeFirstOrThrow();
    expect(c.heritage).toBe("period");
  });

  it("a CSV import changing a component's heritage and an edit of one of its defects: both complete", async () => {
    const board = await makeBoard(t.db, fx.siteId, "CSV heritage board");
    const comp = await makeComponent(t.db, fx.siteId, board.id, "V-1", { ...BREAKER, model: "NB csv" });
    const d = await makeDefect(t.db, fx.siteId, board.id, comp, { partsNeeded: "", partsState: "none_needed" });
    const dv = await version("defects", d.id);
    const p = await t.db
      .selectFrom("positions")
      .select(["gridRow", "gridCol"])
      .where("id", "=", comp.positionId)
      .executeTakeFirstOrThrow();
    const file = `board,designation,kind,grid_row,grid_col,heritage\r\nCSV heritage board,V-1,power_breaker,${p.gridRow},${p.gridCol},period\r\n`;
    // The import writes the component and stops at the demand lock; the defect's edit comes next. Before, the
    // import went on to re-rank the defect after the demand lock while the edit held it and waited for that lock.
    const r = await crossed(
      () => commitImport(t.db, fx.siteId, curator().id, fromText(file)),
      () => patchDefect(t.db, dctx(), d.id, { version: dv, severity: "degraded" }),
    );
    expect(r).toEqual(["ok", "ok"]);
    const c = await t.db
      .selectFrom("components")
      .select("heritage")
      .where("id", "=", comp.componentId)
      .executeTakeFirstOrThrow();
    expect(c.heritage).toBe("period");
  });

  it("a defect raised on a component while the component is edited: both complete", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Raise board");
    const comp = await makeComponent(t.db, fx.siteId, board.id, "R-1", { ...BREAKER, model: "NB raise" });
    const cv = await version("components", comp.componentId);
    // The raise holds the demand lock first and then checks its component (the foreign key); before, the component
    // edit held that component locked FOR UPDATE while it waited for the demand lock.
    const r = await crossed(
      () =>
        createDefect(
          t.db,
          dctx(),
          createDefectBody.parse({
            boardId: board.id,
            positionId: comp.positionId,
            componentId: comp.componentId,
            title: "Arc chute cracked",
            category: "mechanical",
            severity: "impaired",
            partsNeeded: "arc chute",
            partsState: "wanted",
          }),
        ),
      () => patchComponent(t.db, fx.siteId, comp.componentId, curator().id, { version: cv, model: "NB raise II" }),
    );
    expect(r).toEqual(["ok", "ok"]);
  });

  it("a component's nameplate edit while its riding defect moves: both complete, the defect follows it to the new line", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Ride board");
    const comp = await makeComponent(t.db, fx.siteId, board.id, "D-1", {
      ...BREAKER,
      model: "NB ride",
      disposition: "replace",
    });
    const d = await makeDefect(t.db, fx.siteId, board.id, comp, { partsNeeded: "" }); // rides on its component's line
    const cv = await version("components", comp.componentId);
    const dv = await version("defects", d.id);
    // The nameplate edit stops at the demand lock holding its component, the defect's move holding its defect. The
    // edit's sync moves the component to a new line and the riding defect with it: a new link naming the defect
    // (a foreign key), which before waited for the move's FOR UPDATE lock on that defect.
    const r = await crossed(
      () => patchComponent(t.db, fx.siteId, comp.componentId, curator().id, { version: cv, model: "NB ride II" }),
      () => moveDefect(t.db, dctx(), d.id, { to: "scheduled", reason: "Test: into the queue", version: dv }),
    );
    expect(r).toEqual(["ok", "ok"]);
    expect(await demandOf([comp.componentId, d.id])).toEqual(
      [`${comp.componentId} → NB ride II (wanted) × 1`, `${d.id} → NB ride II (wanted) × 0`].sort(),
    );
  });

  it("a position deleted while its defect's part is changed: both complete, the demand follows", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Delete board");
    const comp = await makeComponent(t.db, fx.siteId, board.id, "X-1", { ...BREAKER, model: "NB delete" });
    const d = await makeDefect(t.db, fx.siteId, board.id, comp, { partsNeeded: "arc chute" });
    const dv = await version("defects", d.id);
    const pv = (
      await t.db.selectFrom("positions").select("version").where("id", "=", comp.positionId).executeTakeFirstOrThrow()
    ).version;
    // The defect's edit stops at the demand lock holding its defect; the deletion then takes the position and stops at
    // the defect. Before, the edit went on to link the defect's new need to a line naming the position (a foreign
    // key) while the deletion held the position and waited for the defect.
    const r = await crossed(
      () => patchDefect(t.db, dctx(), d.id, { version: dv, partsNeeded: "arc chute, left hand" }),
      () => deletePosition(t.db, fx.siteId, comp.positionId, curator().id, pv),
    );
    expect(r).toEqual(["ok", "ok"]);
    const after = await t.db
      .selectFrom("defects")
      .select(["positionId", "componentId", "partsNeeded"])
      .where("id", "=", d.id)
      .executeTakeFirstOrThrow();
    expect(after).toEqual({ positionId: null, componentId: null, partsNeeded: "arc chute, left hand" });
    const links = await t.db
      .selectFrom("partDemandLinks")
      .select(["positionId", "qty"])
      .where("defectId", "=", d.id)
      .where("active", "=", true)
      .execute();
    expect(links).toEqual([{ positionId: null, qty: 1 }]);
  });

  it("a watch check's hot spot on a position being deleted: no deadlock, the check is refused cleanly", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Deleted hot spot board");
    const comp = await makeComponent(t.db, fx.siteId, board.id, "W-1", { ...BREAKER, model: "NB watch" });
    const stage = await liveStage(board.id);
    const pv = (
      await t.db.selectFrom("positions").select("version").where("id", "=", comp.positionId).executeTakeFirstOrThrow()
    ).version;
    // The deletion stops at the demand lock holding the position; the watch check comes next. Its check row names
    // the position and its hot spot raises a defect: before, it wrote the row (a foreign key on the position) and
    // then waited for the demand lock, while the deletion took that lock and waited to delete the named row.
    const r = await crossed(
      () => deletePosition(t.db, fx.siteId, comp.positionId, curator().id, pv),
      () =>
        recordWatchCheck(
          t.db,
          { siteId: fx.siteId, actor: curator() },
          stage.id,
          watchCheckBody.parse({ lamps: "equal", thermalPositionId: comp.positionId, thermalC: 120, ambientC: 20 }),
        ),
    );
    expect(r[0]).toBe("ok");
    expect(r[1]).toContain("That position is not on this board.");
    const checks = await t.db.selectFrom("rtsWatchChecks").select("id").where("stageId", "=", stage.id).execute();
    expect(checks).toEqual([]);
    const defects = await t.db.selectFrom("defects").select("id").where("boardId", "=", board.id).execute();
    expect(defects).toEqual([]);
  });
});

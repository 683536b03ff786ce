import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { QueryClient } from "@tanstack/react-query";
import type { TileRow } from "../../src/schemas/inventory";
import {
  afterSync,
  applyInventoryChange,
  inventoryKeys as k,
  type BoardPage,
  type BoardPages,
} from "../../src/features/inventory/query-cache";
import { boardRow, tileRow } from "../helpers/board-fixtures";

// What an inventory write makes the client read again (src/features/inventory/query-cache.ts): a survey write reads
// its board's one page again; before, every write invalidated the whole site's inventory and the board on screen
// read all its pages again.
const S = "site-1";
const tile = (id: string, n: number, componentId: string | null = `c-${id}`): TileRow =>
  tileRow(id, {
    gridRow: 1 + Math.floor(n / 10),
    gridCol: 1 + (n % 10),
    component: componentId
      ? {
          id: componentId,
          kind: "molded_case_breaker",
          tagNumber: null,
          heritage: "original",
          custody: "in_place",
          disposition: null,
          dispositionOverridden: false,
          maker: "Northbay Electric",
          model: "NB 1",
          ratingAmps: 20,
          poles: 1,
          version: 1,
        }
      : null,
  });
const board = boardRow;
/** A board of three pages: the head with p0–p2, then p3–p5 after "k2", then p6–p7 after "k5". */
function pages(boardId = "b1"): BoardPages {
  const t = (i: number) => tile(`${boardId}-p${i}`, i);
  return {
    pages: [
      { board: { ...board, id: boardId }, sections: [], total: 8, positions: [t(0), t(1), t(2)], next: "k2" },
      { positions: [t(3), t(4), t(5)], next: "k5" },
      { positions: [t(6), t(7)], next: null },
    ],
    pageParams: [null, "k2", "k5"],
  };
}

let qc: QueryClient;
let asked: string[];
/** Serves `answer(url)` as the server would; records every URL asked. */
function serve(answer: (url: string) => unknown) {
  vi.stubGlobal("fetch", async (url: string) => {
    asked.push(url);
    return new Response(JSON.stringify(answer(url)), { status: 200 });
  });
}
const invalidated = (key: readonly unknown[]) => qc.getQueryState(key)?.isInvalidated ?? null;

beforeEach(() => {
  qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  asked = [];
  qc.setQueryData(k.board(S, "b1"), pages("b1"));
  qc.setQueryData(k.board(S, "b2"), pages("b2"));
  for (const key of [
    k.thumbnail(S, "b1"),
    k.thumbnail(S, "b2"),
    k.overview(S),
    k.boards(S),
    k.floodEvents(S),
    k.position(S, "b1-p4"),
    k.position(S, "b2-p4"),
    k.lookup(S, "p4"),
    k.custodyOptions(S, "c-b1-p4"),
  ])
    qc.setQueryData(key, { kept: true });
});
afterEach(() => vi.unstubAllGlobals());

describe("a survey write (inspection, custody move, disposition, nameplate) reads its board's one page again", () => {
  it("the page holding the tile is asked for again after the same key and put in its place; the others stay", async () => {
    const before = qc.getQueryData<BoardPages>(k.board(S, "b1"))!;
    const graded = {
      ...tile("b1-p4", 4),
      latest: {
        astmGrade: 6,
        isoRi: null,
        percentRusted: 1,
        inspectedAt: "2026-12-03T20:00:00Z",
        belowWaterLine: true,
      },
    };
    serve(() => ({ positions: [tile("b1-p3", 3), graded, tile("b1-p5", 5)], next: "k5" }));
    await applyInventoryChange(qc, S, { kind: "component", componentId: "c-b1-p4", positionId: "b1-p4" });

    expect(asked).toEqual([`/api/sites/${S}/boards/b1/tiles?after=k2&size=1000`]);
    const after = qc.getQueryData<BoardPages>(k.board(S, "b1"))!;
    expect(after.pages[1].positions[1].latest?.astmGrade).toBe(6);
    expect(after.pages[0]).toBe(before.pages[0]);
    expect(after.pages[2]).toBe(before.pages[2]);
    expect(after.pageParams).toEqual([null, "k2", "k5"]);
    // Neither board is read again whole.
    expect(invalidated(k.board(S, "b1"))).toBe(false);
    expect(invalidated(k.board(S, "b2"))).toBe(false);
    // What counts or shows the tile is marked stale; other boards and the flood events are not.
    expect(invalidated(k.thumbnail(S, "b1"))).toBe(true);
    expect(invalidated(k.thumbnail(S, "b2"))).toBe(false);
    expect(invalidated(k.overview(S))).toBe(true);
    expect(invalidated(k.boards(S))).toBe(true);
    expect(invalidated(k.position(S, "b1-p4"))).toBe(true);
    expect(invalidated(k.position(S, "b2-p4"))).toBe(false);
    expect(invalidated(k.custodyOptions(S, "c-b1-p4"))).toBe(true);
    expect(invalidated(k.lookup(S, "p4"))).toBe(true);
    expect(invalidated(k.floodEvents(S))).toBe(false);
  });

  it("found by its component when the write does not name the position (a queued inspection sent later); the head page is read with the board", async () => {
    serve(() => ({ ...pages("b1").pages[0], board: { ...board, name: "Main switchboard (renamed)" } }));
    await applyInventoryChange(qc, S, { kind: "component", componentId: "c-b1-p1" });
    expect(asked).toEqual([`/api/sites/${S}/boards/b1`]);
    const after = qc.getQueryData<BoardPages>(k.board(S, "b1"))!;
    expect((after.pages[0] as Extract<BoardPage, { board: unknown }>).board.name).toBe("Main switchboard (renamed)");
    expect(invalidated(k.board(S, "b1"))).toBe(false);
    expect(invalidated(k.position(S, "b1-p1"))).toBe(null); // not kept; the kept ones of other positions stay
    expect(invalidated(k.position(S, "b1-p4"))).toBe(false);
  });

  it("the whole board is read again when the page no longer ends where it did (someone added a position)", async () => {
    serve(() => ({ positions: [tile("b1-p3", 3), tile("b1-new", 4), tile("b1-p4", 5)], next: "k4" }));
    await applyInventoryChange(qc, S, { kind: "component", componentId: "c-b1-p4", positionId: "b1-p4" });
    expect(invalidated(k.board(S, "b1"))).toBe(true);
    expect(invalidated(k.board(S, "b2"))).toBe(false);
  });

  it("the whole board is read again when the head's total moved", async () => {
    serve(() => ({ ...pages("b1").pages[0], total: 9 }));
    await applyInventoryChange(qc, S, { kind: "component", componentId: "c-b1-p0", positionId: "b1-p0" });
    expect(invalidated(k.board(S, "b1"))).toBe(true);
  });

  it("a tile no kept board holds: no board page is read, every thumbnail is marked stale", async () => {
    serve(() => {
      throw new Error("nothing should be read");
    });
    await applyInventoryChange(qc, S, { kind: "component", componentId: "c-elsewhere", positionId: "elsewhere" });
    expect(asked).toEqual([]);
    expect(invalidated(k.board(S, "b1"))).toBe(false);
    expect(invalidated(k.thumbnail(S, "b1"))).toBe(true);
    expect(invalidated(k.thumbnail(S, "b2"))).toBe(true);
    expect(invalidated(k.overview(S))).toBe(true);
  });
});

describe("other writes", () => {
  it("a board's shape (a position created, moved or deleted; a section; the board): that board whole, not the others", async () => {
    await applyInventoryChange(qc, S, { kind: "board", boardId: "b1" });
    expect(invalidated(k.board(S, "b1"))).toBe(true);
    expect(invalidated(k.thumbnail(S, "b1"))).toBe(true);
    expect(invalidated(k.board(S, "b2"))).toBe(false);
    expect(invalidated(k.thumbnail(S, "b2"))).toBe(false);
    expect(invalidated(k.overview(S))).toBe(true);
    expect(invalidated(k.position(S, "b1-p4"))).toBe(true);
    expect(invalidated(k.floodEvents(S))).toBe(false);
  });
  it("a flood event or an import: the whole site; an import's preview: nothing", async () => {
    await applyInventoryChange(qc, S, { kind: "nothing" });
    expect(invalidated(k.board(S, "b1"))).toBe(false);
    await applyInventoryChange(qc, S, { kind: "site" });
    for (const key of [k.board(S, "b1"), k.board(S, "b2"), k.floodEvents(S), k.overview(S)])
      expect(invalidated(key)).toBe(true);
  });
});

describe("after the outbox has sent what the phone kept", () => {
  const other = ["defects", S];
  beforeEach(() => qc.setQueryData(other, { kept: true }));

  it("inspections and custody moves only: their boards' pages, and every other domain's queries as before", async () => {
    serve(() => ({ positions: [tile("b2-p6", 6), tile("b2-p7", 7)], next: null }));
    await afterSync(qc, [
      { method: "POST", url: `/api/sites/${S}/components/c-b2-p7/inspections` },
      { method: "POST", url: `/api/sites/${S}/components/c-b2-p7/custody` },
    ]);
    expect(asked).toEqual([`/api/sites/${S}/boards/b2/tiles?after=k5&size=1000`]);
    expect(invalidated(k.board(S, "b2"))).toBe(false);
    expect(invalidated(k.board(S, "b1"))).toBe(false);
    expect(invalidated(k.thumbnail(S, "b2"))).toBe(true);
    expect(invalidated(other)).toBe(true);
  });

  it("anything else among them (a defect counts on its tile): everything, as before", async () => {
    await afterSync(qc, [
      { method: "POST", url: `/api/sites/${S}/components/c-b2-p7/inspections` },
      { method: "POST", url: `/api/sites/${S}/defects` },
    ]);
    expect(invalidated(k.board(S, "b1"))).toBe(true);
    expect(invalidated(k.board(S, "b2"))).toBe(true);
    expect(invalidated(other)).toBe(true);
  });
});

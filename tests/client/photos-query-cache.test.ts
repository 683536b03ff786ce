import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { QueryClient } from "@tanstack/react-query";
import type { Photo } from "../../src/schemas/photos";
import { afterPhotosFiled, inventoryKeys as k, type BoardPages } from "../../src/features/inventory/query-cache";
import { afterPhotoWrite, cachedPositionOf, photoKeys } from "../../src/features/photos/api";
import { onPhotosFiled, type PhotosFiled } from "../../src/lib/photos-filed";
import { boardRow, tileRow } from "../helpers/board-fixtures";

// What a photo write makes the client read again (src/features/photos/api.ts): before, every upload invalidated every
// inventory query of every site (`["inventory"]`), so the board on screen read all its pages again after each photo.
// Now only the tiles that count the photo: their one board page, the position's detail, the site's photo lists. The
// photo feature announces the positions (src/lib/photos-filed.ts); the app joins that to the inventory as below
// (src/app/provider.tsx).
const S = "site-1";
const T = "site-2";
const tile = (id: string) => tileRow(id);
const board = { ...boardRow, name: "Engine room board" };
/** A board of two pages: the head with p0–p1, then p2–p3 after "k1". */
const pages = (boardId: string): BoardPages => ({
  pages: [
    {
      board: { ...board, id: boardId },
      sections: [],
      total: 4,
      positions: [tile(`${boardId}-p0`), tile(`${boardId}-p1`)],
      next: "k1",
    },
    { positions: [tile(`${boardId}-p2`), tile(`${boardId}-p3`)], next: null },
  ],
  pageParams: [null, "k1"],
});
const photo = (id: string, positionId: string | null) => ({ id, positionId }) as Photo;

let qc: QueryClient;
let asked: string[];
let announced: PhotosFiled[];
let stop: () => void;
const invalidated = (key: readonly unknown[]) => qc.getQueryState(key)?.isInvalidated ?? null;

beforeEach(() => {
  qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  asked = [];
  announced = [];
  stop = onPhotosFiled((change) => {
    announced.push(change);
    return afterPhotosFiled(qc, change.siteId, change.positions);
  });
  vi.stubGlobal("fetch", async (url: string) => {
    asked.push(url);
    const counted = { ...tile("b1-p3"), photoCount: 1 };
    return new Response(JSON.stringify({ positions: [tile("b1-p2"), counted], next: null }), { status: 200 });
  });
  for (const site of [S, T]) {
    qc.setQueryData(k.board(site, "b1"), pages("b1"));
    qc.setQueryData(k.board(site, "b2"), pages("b2"));
    for (const key of [
      k.thumbnail(site, "b1"),
      k.overview(site),
      k.boards(site),
      k.floodEvents(site),
      k.position(site, "b1-p3"),
      k.position(site, "b2-p0"),
      k.lookup(site, "p3"),
      photoKeys.targetBoards(site),
      photoKeys.boardTargets(site, "b1"),
    ])
      qc.setQueryData(key, { kept: true });
    qc.setQueryData(photoKeys.list(site, { positionId: "b2-p0" }), [photo("ph-1", "b2-p0")]);
  }
});
afterEach(() => {
  stop();
  vi.unstubAllGlobals();
});

describe("after a photo write, what counts photos is read again, nothing else", () => {
  it("an upload filed at a position: that tile's one board page and the position's detail, this site's photos", async () => {
    await afterPhotoWrite(qc, S, ["b1-p3"]);
    expect(announced).toEqual([{ siteId: S, positions: ["b1-p3"] }]);
    expect(asked).toEqual([`/api/sites/${S}/boards/b1/tiles?after=k1&size=1000`]);
    const after = qc.getQueryData<BoardPages>(k.board(S, "b1"))!;
    expect(after.pages[1].positions[1].photoCount).toBe(1);
    expect(invalidated(k.board(S, "b1"))).toBe(false);
    expect(invalidated(k.position(S, "b1-p3"))).toBe(true);
    expect(invalidated(photoKeys.list(S, { positionId: "b2-p0" }))).toBe(true);
    // Where photos can be filed (the boards, a board's positions) does not change with a photo: not read again.
    expect(invalidated(photoKeys.targetBoards(S))).toBe(false);
    expect(invalidated(photoKeys.boardTargets(S, "b1"))).toBe(false);
    // The overview, board list, thumbnails and look-ups count no photos; other boards and positions are untouched.
    for (const key of [
      k.board(S, "b2"),
      k.thumbnail(S, "b1"),
      k.overview(S),
      k.boards(S),
      k.floodEvents(S),
      k.position(S, "b2-p0"),
      k.lookup(S, "p3"),
    ])
      expect(invalidated(key)).toBe(false);
    // Another site: nothing at all (before, its whole inventory was invalidated too).
    for (const key of [k.board(T, "b1"), k.overview(T), k.position(T, "b1-p3"), photoKeys.targetBoards(T)])
      expect(invalidated(key)).toBe(false);
  });

  it("a photo moved from one position to another: both tiles' pages (one read each) and both details", async () => {
    await afterPhotoWrite(qc, S, ["b2-p0", "b1-p3", "b1-p3"]);
    expect(asked.sort()).toEqual([`/api/sites/${S}/boards/b1/tiles?after=k1&size=1000`, `/api/sites/${S}/boards/b2`]);
    expect(invalidated(k.position(S, "b2-p0"))).toBe(true);
    expect(invalidated(k.position(S, "b1-p3"))).toBe(true);
    expect(invalidated(k.overview(S))).toBe(false);
  });

  it("a photo of the board itself (no position), or settings: no inventory query; the photos are read again", async () => {
    await afterPhotoWrite(qc, S, [null]);
    await afterPhotoWrite(qc, S, []);
    expect(announced).toEqual([{ siteId: S, positions: [null] }]); // settings announce nothing
    expect(asked).toEqual([]);
    for (const key of [k.board(S, "b1"), k.overview(S), k.position(S, "b1-p3"), photoKeys.targetBoards(S)])
      expect(invalidated(key)).toBe(false);
    expect(invalidated(photoKeys.list(S, { positionId: "b2-p0" }))).toBe(true);
  });

  it("a position not known (a photo this client never read was moved or deleted): this site's inventory, not others'", async () => {
    await afterPhotoWrite(qc, S, [undefined, "b1-p3"]);
    for (const key of [k.board(S, "b2"), k.overview(S), k.floodEvents(S)]) expect(invalidated(key)).toBe(true);
    for (const key of [k.board(T, "b1"), k.overview(T)]) expect(invalidated(key)).toBe(false);
  });

  it("where a photo was filed comes from the photo lists read so far", () => {
    expect(cachedPositionOf(qc, S, "ph-1")).toBe("b2-p0");
    expect(cachedPositionOf(qc, S, "ph-unknown")).toBe(undefined);
    qc.setQueryData(photoKeys.list(S, { unassigned: true }), [photo("ph-2", null)]);
    expect(cachedPositionOf(qc, S, "ph-2")).toBe(null);
  });
});

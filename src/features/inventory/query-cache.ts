/**
 * What an inventory write makes the client read again. A write says what it changed (`InventoryChange`) and only
 * the queries that show it are read again; before, every write invalidated the site's whole inventory, so the board
 * on screen read all its pages again (a 3,000-position board: four requests, 2 MB) after each inspection.
 *
 * - a survey write (an inspection, a custody move, a disposition, a component's nameplate): one tile changes. The
 *   board page holding it is read again on its own — the same request, after the same key — and put in place of the
 *   old one; the board's thumbnail, the overview, the board list (both count from the boards' summaries), the
 *   position's detail, the component's custody options and look-ups are marked stale. Other boards are untouched.
 * - a board's shape (the board, its sections, its positions: created, generated, reordered, edited, deleted): that
 *   board's pages and thumbnail, the overview and board list, position details and look-ups.
 * - a position's photos (a photo filed at it, moved off it or deleted): the tile's photo count and the position's
 *   history. The board page holding the tile is read again on its own, the position's detail marked stale; nothing
 *   else (the overview, the board list, thumbnails and look-ups count no photos).
 * - the site (a flood event moves every board's water line; a CSV import can touch any board): all of it, as before.
 *
 * Re-reading one page keeps the board whole only while the page still ends where it did: if someone else's write
 * moved that page's end (`next`), or the board's total, the pages after it no longer join up, and the whole board is
 * read again. So is a board still reading its later pages (its own fetch would put the old page back).
 */
import type { InfiniteData, QueryClient, QueryKey } from "@tanstack/react-query";
import type { z } from "zod";
import { api, qs } from "../../lib/api-client";
import { INT4_MAX } from "../../schemas/common";
import { BOARD_LATER_PAGE, boardDetailResponse, tilePageResponse } from "../../schemas/inventory";

/** Query keys for everything inventory (all under `all(siteId)`). */
export const inventoryKeys = {
  all: (siteId: string) => ["inventory", siteId] as const,
  overview: (siteId: string) => [...inventoryKeys.all(siteId), "overview"] as const,
  floodEvents: (siteId: string) => [...inventoryKeys.all(siteId), "flood-events"] as const,
  boards: (siteId: string) => [...inventoryKeys.all(siteId), "boards"] as const,
  /** Everything of one board: its pages and its thumbnail. */
  boardAll: (siteId: string, boardId: string) => [...inventoryKeys.all(siteId), "board", boardId] as const,
  /** A board read in pages (an infinite query: the head and first page, then the rest). */
  board: (siteId: string, boardId: string) => [...inventoryKeys.boardAll(siteId, boardId), "pages"] as const,
  /** A board's small picture on the board list (one compact cell per position). */
  thumbnail: (siteId: string, boardId: string) => [...inventoryKeys.boardAll(siteId, boardId), "thumbnail"] as const,
  positions: (siteId: string) => [...inventoryKeys.all(siteId), "position"] as const,
  position: (siteId: string, positionId: string) => [...inventoryKeys.positions(siteId), positionId] as const,
  lookups: (siteId: string) => [...inventoryKeys.all(siteId), "lookup"] as const,
  lookup: (siteId: string, q: string) => [...inventoryKeys.lookups(siteId), q] as const,
  allCustodyOptions: (siteId: string) => [...inventoryKeys.all(siteId), "custody-options"] as const,
  custodyOptions: (siteId: string, componentId: string) =>
    [...inventoryKeys.allCustodyOptions(siteId), componentId] as const,
};

export type BoardPage = z.infer<typeof boardDetailResponse> | z.infer<typeof tilePageResponse>;
export type BoardPages = InfiniteData<BoardPage, string | null>;

const base = (siteId: string) => `/api/sites/${siteId}`;

/** One page of a board: the head with the first page (`after` null), or the page after that key. */
export const fetchBoardPage = (siteId: string, boardId: string, after: string | null, signal?: AbortSignal) =>
  after === null
    ? api.get(`${base(siteId)}/boards/${boardId}`, boardDetailResponse, signal)
    : api.get(
        `${base(siteId)}/boards/${boardId}/tiles${qs({ after, size: BOARD_LATER_PAGE })}`,
        tilePageResponse,
        signal,
      );

/**
 * The key just before the first position of `row` (row − 1, then the largest column, order and id there can be):
 * the page asked after it starts at that row. A key of the same form as a page's `next`, so the server reads it the
 * same way (by index, from that place).
 */
export const rowStartKey = (row: number) => `${row - 1}.${INT4_MAX}.${INT4_MAX}.ffffffff-ffff-ffff-ffff-ffffffffffff`;

/** A page of a board's positions from the first position of `row` on (the rows a window shows first). */
export const fetchBoardRows = (siteId: string, boardId: string, row: number, signal?: AbortSignal) =>
  api.get(
    `${base(siteId)}/boards/${boardId}/tiles${qs({ after: rowStartKey(row), size: BOARD_LATER_PAGE })}`,
    tilePageResponse,
    signal,
  );

/** What an inventory write changed (see the module's comment). */
export type InventoryChange =
  | { kind: "nothing" }
  | { kind: "component"; componentId: string; positionId?: string | null }
  | { kind: "board"; boardId: string }
  | { kind: "positions"; positionIds: readonly string[] }
  | { kind: "boards" }
  | { kind: "site" };

/** Reads again what `change` makes out of date; resolves once what is on screen has been read again. */
export async function applyInventoryChange(qc: QueryClient, siteId: string, change: InventoryChange) {
  const k = inventoryKeys;
  const stale = (queryKey: QueryKey) => qc.invalidateQueries({ queryKey });
  switch (change.kind) {
    case "nothing":
      return;
    case "site":
      return stale(k.all(siteId));
    case "boards":
      await Promise.all([stale(k.boards(siteId)), stale(k.overview(siteId))]);
      return;
    case "board":
      await Promise.all([
        stale(k.boardAll(siteId, change.boardId)),
        stale(k.boards(siteId)),
        stale(k.overview(siteId)),
        stale(k.positions(siteId)),
        stale(k.lookups(siteId)),
        stale(k.allCustodyOptions(siteId)),
      ]);
      return;
    case "positions": {
      // One refresh per page; pages of one board one after another (a refresh checks the board did not move meanwhile).
      const byBoard = new Map<string, Set<number>>();
      for (const positionId of new Set(change.positionIds)) {
        const found = findTile(qc, siteId, { componentId: "", positionId });
        if (found) byBoard.set(found.boardId, (byBoard.get(found.boardId) ?? new Set()).add(found.page));
      }
      await Promise.all([
        ...[...byBoard].map(async ([boardId, pages]) => {
          for (const page of pages) await refreshBoardPage(qc, siteId, boardId, page);
        }),
        ...[...new Set(change.positionIds)].map((id) => stale(k.position(siteId, id))),
      ]);
      return;
    }
    case "component": {
      const found = findTile(qc, siteId, change);
      const positionId = change.positionId ?? found?.positionId;
      await Promise.all([
        found ? refreshBoardPage(qc, siteId, found.boardId, found.page) : Promise.resolve(),
        // The board's thumbnail; not knowing the board (none of the kept boards holds it), every thumbnail.
        found
          ? stale(k.thumbnail(siteId, found.boardId))
          : qc.invalidateQueries({
              predicate: (q) => isBoardKey(q.queryKey, siteId) && q.queryKey[4] === "thumbnail",
            }),
        stale(k.overview(siteId)),
        stale(k.boards(siteId)),
        stale(positionId ? k.position(siteId, positionId) : k.positions(siteId)),
        stale(k.custodyOptions(siteId, change.componentId)),
        stale(k.lookups(siteId)),
      ]);
      return;
    }
  }
}

/**
 * After a photo write (`photosFiled`, src/lib/photos-filed.ts): the positions it touched are read again
 * (`positions`); one not known reads the site's whole inventory; a photo of the board itself or unfiled, nothing.
 */
export async function afterPhotosFiled(
  qc: QueryClient,
  siteId: string,
  positions: ReadonlyArray<string | null | undefined>,
) {
  if (positions.some((p) => p === undefined)) return applyInventoryChange(qc, siteId, { kind: "site" });
  const positionIds = positions.filter((p): p is string => typeof p === "string");
  if (positionIds.length) await applyInventoryChange(qc, siteId, { kind: "positions", positionIds });
}

const isBoardKey = (key: QueryKey, siteId: string) =>
  key[0] === "inventory" && key[1] === siteId && key[2] === "board" && typeof key[3] === "string";

/** The kept board (and its page) that holds this position or component, if any board read so far does. */
function findTile(qc: QueryClient, siteId: string, c: { componentId: string; positionId?: string | null }) {
  for (const [key, data] of qc.getQueriesData<BoardPages>({
    predicate: (q) => isBoardKey(q.queryKey, siteId) && q.queryKey[4] === "pages",
  })) {
    if (!data) continue;
    const page = data.pages.findIndex((p) =>
      p.positions.some((t) => (c.positionId ? t.id === c.positionId : t.component?.id === c.componentId)),
    );
    if (page >= 0) {
      const tile = data.pages[page].positions.find((t) =>
        c.positionId ? t.id === c.positionId : t.component?.id === c.componentId,
      )!;
      return { boardId: key[3] as string, page, positionId: tile.id };
    }
  }
  return null;
}

/**
 * Reads page `i` of a kept board again and puts it in place of the old one; the whole board is read again instead
 * when the pages would no longer join up (the page's end or the board's total moved) or the board is being read.
 */
export async function refreshBoardPage(qc: QueryClient, siteId: string, boardId: string, i: number) {
  const key = inventoryKeys.board(siteId, boardId);
  const wholeBoard = () => qc.invalidateQueries({ queryKey: key });
  const before = qc.getQueryData<BoardPages>(key);
  if (!before || qc.getQueryState(key)?.fetchStatus !== "idle") return wholeBoard();
  let fresh: BoardPage;
  try {
    fresh = await fetchBoardPage(siteId, boardId, before.pageParams[i]);
  } catch {
    return wholeBoard(); // it will show its own error or keep what the phone has, as any read does
  }
  const now = qc.getQueryData<BoardPages>(key);
  const old = before.pages[i];
  const totalMoved = i === 0 && (old as { total?: number }).total !== (fresh as { total?: number }).total;
  if (now !== before || qc.getQueryState(key)?.fetchStatus !== "idle" || fresh.next !== old.next || totalMoved)
    return wholeBoard();
  qc.setQueryData<BoardPages>(key, {
    pages: before.pages.map((p, j) => (j === i ? fresh : p)),
    pageParams: before.pageParams,
  });
}

/** What the outbox sends for the inventory: an inspection or a custody move of one component. */
const QUEUED_COMPONENT_WRITE = /^\/api\/sites\/([^/]+)\/components\/([^/]+)\/(inspections|custody)$/;

/**
 * After the outbox has sent what was kept: when all of it was inventory survey writes (inspections, custody moves),
 * each one's board page is read again as if it had been saved online, and every other domain's queries as before;
 * anything else sent (a defect, a reading, a photo: a tile counts them too) reads everything again.
 */
export async function afterSync(qc: QueryClient, items: readonly { method: string; url: string }[]) {
  const writes = items.map((i) => (i.method === "POST" ? QUEUED_COMPONENT_WRITE.exec(i.url) : null));
  if (!writes.length || writes.some((m) => !m)) return qc.invalidateQueries();
  const changes = new Map(writes.map((m) => [`${m![1]}/${m![2]}`, { siteId: m![1], componentId: m![2] }]));
  await Promise.all([
    qc.invalidateQueries({ predicate: (q) => q.queryKey[0] !== "inventory" }),
    ...[...changes.values()].map((c) =>
      applyInventoryChange(qc, c.siteId, { kind: "component", componentId: c.componentId }),
    ),
  ]);
}

import { useCallback, useEffect, useMemo, useState } from "react";
import {
  infiniteQueryOptions,
  queryOptions,
  useInfiniteQuery,
  useMutation,
  useQuery,
  useQueryClient,
  type InfiniteData,
} from "@tanstack/react-query";
import type { z } from "zod";
import { api, qs } from "../../lib/api-client";
import { submitOrQueue, type Submitted } from "../../lib/outbox";
import { whenIdle } from "../../lib/when-idle";
import {
  applyInventoryChange,
  fetchBoardPage,
  fetchBoardRows,
  inventoryKeys,
  type BoardPage,
  type InventoryChange,
} from "./query-cache";
import {
  boardDetailResponse,
  boardListResponse,
  boardSchema,
  boardThumbnailResponse,
  componentSchema,
  createdPositionResponse,
  custodyOptionsResponse,
  custodyResponse,
  nextTagResponse,
  dispositionResponse,
  floodEventListResponse,
  floodEventSchema,
  generatedPositionsResponse,
  importResponse,
  inspectionSchema,
  lookupResponse,
  overviewResponse,
  positionDetailResponse,
  positionSchema,
  reorderedPositionsResponse,
  sectionSchema,
  type CreateBoardBody,
  type CreateFloodEventBody,
  type CreateInspectionBody,
  type CreatePositionBody,
  type CustodyBody,
  type DispositionBody,
  type GeneratePositionsBody,
  type PatchBoardBody,
  type PatchComponentBody,
  type PatchFloodEventBody,
  type PatchPositionBody,
  type PatchSectionBody,
} from "../../schemas/inventory";

export { applyInventoryChange } from "./query-cache";

const base = (siteId: string) => `/api/sites/${siteId}`;

export const overviewQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: inventoryKeys.overview(siteId),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/overview`, overviewResponse, signal),
  });
export const floodEventsQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: inventoryKeys.floodEvents(siteId),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/flood-events`, floodEventListResponse, signal),
  });
export const boardsQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: inventoryKeys.boards(siteId),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/boards`, boardListResponse, signal),
  });
/**
 * One board: its head (board, sections, total) with the first page of its positions, then the rest page by page
 * after the key the page before gave (`next`). A board of up to a page is one request, as before.
 */
export const boardQueryOptions = (siteId: string, boardId: string) =>
  infiniteQueryOptions({
    queryKey: inventoryKeys.board(siteId, boardId),
    queryFn: ({ signal, pageParam }): Promise<BoardPage> => fetchBoardPage(siteId, boardId, pageParam, signal),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.next,
  });

/** The board as its pages read so far: `complete` once the last page is in. */
export interface BoardRead extends z.infer<typeof boardDetailResponse> {
  complete: boolean;
}
/** One array of tiles over the pages read so far (kept per data object, so a render does not rebuild it). */
const flat = new WeakMap<object, BoardRead>();
export function boardOfPages(d: InfiniteData<BoardPage, string | null>): BoardRead {
  const known = flat.get(d);
  if (known) return known;
  const head = d.pages[0] as z.infer<typeof boardDetailResponse>;
  const last = d.pages[d.pages.length - 1];
  const read: BoardRead = {
    ...head,
    positions: d.pages.length === 1 ? head.positions : d.pages.flatMap((p) => p.positions),
    next: last.next,
    complete: last.next === null,
  };
  flat.set(d, read);
  return read;
}

export const positionQueryOptions = (siteId: string, positionId: string) =>
  queryOptions({
    queryKey: inventoryKeys.position(siteId, positionId),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/positions/${positionId}`, positionDetailResponse, signal),
  });

export const useOverview = (siteId: string) => useQuery(overviewQueryOptions(siteId));
export const useFloodEvents = (siteId: string) => useQuery(floodEventsQueryOptions(siteId));
export const useBoards = (siteId: string) => useQuery(boardsQueryOptions(siteId));
/**
 * A whole board: the first page comes at once (what is on a phone's screen first), the rest page by page at idle
 * time, so the copy kept on the phone holds every position of a board opened once (logging with no signal).
 */
export function useBoard(siteId: string, boardId: string) {
  const q = useInfiniteQuery({ ...boardQueryOptions(siteId, boardId), enabled: !!boardId, select: boardOfPages });
  const { hasNextPage, isFetching, isFetchNextPageError, fetchNextPage } = q;
  useEffect(() => {
    if (!hasNextPage || isFetching || isFetchNextPageError) return;
    return whenIdle(() => void fetchNextPage({ cancelRefetch: false }));
  }, [hasNextPage, isFetching, isFetchNextPageError, fetchNextPage]);
  return q;
}
/** A tile's place in board order: row, column, order in the cell, id (the pages' key). */
const beforeInOrder = (
  a: { gridRow: number; gridCol: number; sortOrder: number; id: string },
  b: { gridRow: number; gridCol: number; sortOrder: number; id: string },
) =>
  a.gridRow !== b.gridRow
    ? a.gridRow < b.gridRow
    : a.gridCol !== b.gridCol
      ? a.gridCol < b.gridCol
      : a.sortOrder !== b.sortOrder
        ? a.sortOrder < b.sortOrder
        : a.id < b.id;

/** How long the window must rest on rows not read before they are asked for (a fast scroll asks for none). */
const WINDOW_SETTLE_MS = 150;

/**
 * What a large board shows while its pages are still coming in order (`useBoard`): when the window rests on rows
 * past the last one read, the page that starts at the window's first row is asked for at once
 * (`…/tiles?after=<the key before that row>`), and its tiles are drawn beside those read in order, until the
 * in-order reading reaches them (it goes on at idle time, so the phone still keeps the whole board; those rows are
 * read twice). `onRows` is for the elevation's window; `comingRows` are the row ranges neither has read.
 */
export function useBoardOnScreen(siteId: string, boardId: string, read: BoardRead | undefined) {
  const last = read?.positions[read.positions.length - 1];
  const readTo = read && !read.complete ? (last?.gridRow ?? 0) : null;
  const [seen, setSeen] = useState<number | null>(null);
  const onRows = useCallback((first: number) => setSeen(first), []);
  // The window's first row if it is past the row after the last one read; asked for once it has rested there.
  const want = readTo !== null && seen !== null && seen > readTo + 1 ? seen : null;
  const [settled, setSettled] = useState<number | null>(null);
  useEffect(() => {
    if (want === null) return;
    const id = setTimeout(() => setSettled(want), WINDOW_SETTLE_MS);
    return () => clearTimeout(id);
  }, [want]);
  const startRow = want !== null && settled === want ? want : null;
  const rowsPage = useQuery({
    queryKey: [...inventoryKeys.boardAll(siteId, boardId), "rows-from", startRow ?? 0] as const,
    queryFn: ({ signal }) => fetchBoardRows(siteId, boardId, startRow!, signal),
    enabled: startRow !== null,
    placeholderData: (previous) => previous,
  });
  return useMemo(() => {
    if (!read || read.complete || !rowsPage.data || !last)
      return { positions: read?.positions ?? [], comingRows: undefined, onRows };
    const extra = rowsPage.data.positions.filter((t) => beforeInOrder(last, t));
    if (!extra.length) return { positions: read.positions, comingRows: undefined, onRows };
    const gridRows = read.board.gridRows;
    const from = extra[0].gridRow;
    const to = rowsPage.data.next === null ? gridRows : extra[extra.length - 1].gridRow;
    return {
      positions: [...read.positions, ...extra],
      comingRows: [
        [last.gridRow + 1, from - 1],
        [to + 1, gridRows],
      ] as const,
      onRows,
    };
  }, [read, last, rowsPage.data, onRows]);
}

/** A board's thumbnail, read only once `enabled` (the card is near the screen): never the board's own pages. */
export const useBoardThumbnail = (siteId: string, boardId: string, enabled: boolean) =>
  useQuery({
    queryKey: inventoryKeys.thumbnail(siteId, boardId),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/boards/${boardId}/thumbnail`, boardThumbnailResponse, signal),
    enabled,
  });
export const usePosition = (siteId: string, positionId: string | null) =>
  useQuery({ ...positionQueryOptions(siteId, positionId ?? ""), enabled: !!positionId });
export const useLookup = (siteId: string, q: string) =>
  useQuery({
    queryKey: inventoryKeys.lookup(siteId, q),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/positions/lookup${qs({ q })}`, lookupResponse, signal),
    enabled: q.trim().length > 0,
    staleTime: 10_000,
  });

/**
 * Every inventory write says what it changed, and only what shows that is read again (./query-cache.ts): a survey
 * write reads its board's one page again, not the whole board.
 */
function useInventoryMutation<V, R>(
  siteId: string,
  fn: (v: V) => Promise<R>,
  changed: (r: R, v: V) => InventoryChange,
) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: (r, v) => applyInventoryChange(qc, siteId, changed(r, v)),
  });
}
const ofBoard = (boardId: string) => (): InventoryChange => ({ kind: "board", boardId });
/** A write the outbox may have kept for later: nothing changed on the server yet (the sync reads it again). */
const unlessQueued =
  <T, V>(change: (data: T, v: V) => InventoryChange) =>
  (r: Submitted<T>, v: V): InventoryChange =>
    r.queued ? { kind: "nothing" } : change(r.data, v);

export const useCreateBoard = (siteId: string) =>
  useInventoryMutation(
    siteId,
    (b: CreateBoardBody) => api.send("POST", `${base(siteId)}/boards`, b, boardSchema),
    () => ({ kind: "boards" }),
  );
export const useUpdateBoard = (siteId: string, boardId: string) =>
  useInventoryMutation(
    siteId,
    (b: PatchBoardBody) => api.send("PATCH", `${base(siteId)}/boards/${boardId}`, b, boardSchema),
    ofBoard(boardId),
  );

export const useSectionMutations = (siteId: string, boardId: string) => ({
  create: useInventoryMutation(
    siteId,
    (b: { name: string }) => api.send("POST", `${base(siteId)}/boards/${boardId}/sections`, b, sectionSchema),
    ofBoard(boardId),
  ),
  update: useInventoryMutation(
    siteId,
    ({ id, ...b }: PatchSectionBody & { id: string }) =>
      api.send("PATCH", `${base(siteId)}/sections/${id}`, b, sectionSchema),
    ofBoard(boardId),
  ),
  remove: useInventoryMutation(
    siteId,
    ({ id, version }: { id: string; version: number }) =>
      api.raw("DELETE", `${base(siteId)}/sections/${id}${qs({ version })}`),
    ofBoard(boardId),
  ),
});

/** A position's writes change the board's shape (order, spans, how many): the whole board is read again. */
export const usePositionMutations = (siteId: string, boardId: string) => ({
  create: useInventoryMutation(
    siteId,
    (b: CreatePositionBody) =>
      api.send("POST", `${base(siteId)}/boards/${boardId}/positions`, b, createdPositionResponse),
    ofBoard(boardId),
  ),
  generate: useInventoryMutation(
    siteId,
    (b: GeneratePositionsBody) =>
      api.send("POST", `${base(siteId)}/boards/${boardId}/positions/generate`, b, generatedPositionsResponse),
    ofBoard(boardId),
  ),
  reorder: useInventoryMutation(
    siteId,
    (ids: string[]) =>
      api.send("POST", `${base(siteId)}/boards/${boardId}/positions/reorder`, { ids }, reorderedPositionsResponse),
    ofBoard(boardId),
  ),
  update: useInventoryMutation(
    siteId,
    ({ id, ...b }: PatchPositionBody & { id: string }) =>
      api.send("PATCH", `${base(siteId)}/positions/${id}`, b, positionSchema),
    ofBoard(boardId),
  ),
  remove: useInventoryMutation(
    siteId,
    ({ id, version }: { id: string; version: number }) =>
      api.raw("DELETE", `${base(siteId)}/positions/${id}${qs({ version })}`),
    ofBoard(boardId),
  ),
});

export const useUpdateComponent = (siteId: string) =>
  useInventoryMutation(
    siteId,
    ({ id, ...b }: PatchComponentBody & { id: string }) =>
      api.send("PATCH", `${base(siteId)}/components/${id}`, b, componentSchema),
    (c) => ({ kind: "component", componentId: c.id, positionId: c.positionId }),
  );

/** Online: saved at once, as before. No signal: kept in the phone's outbox and sent later. */
export const useLogInspection = (siteId: string) =>
  useInventoryMutation(
    siteId,
    ({ componentId, label, ...b }: CreateInspectionBody & { componentId: string; label: string }) =>
      submitOrQueue({
        siteId,
        kind: "inspection",
        label: `Inspection of ${label}`,
        url: `${base(siteId)}/components/${componentId}/inspections`,
        // When it was made: kept on the phone with no signal, it is sent later and keeps this (the server corrects
        // it by the phone's clock as it sends).
        body: { ...b, at: b.at ?? new Date().toISOString() },
        parse: (d) => inspectionSchema.parse(d),
      }),
    unlessQueued((i) => ({ kind: "component", componentId: i.componentId, positionId: i.positionId })),
  );

/** The chain's verdict on every move from where the component is now, and the proposed next one. */
export const useCustodyOptions = (siteId: string, componentId: string) =>
  useQuery({
    queryKey: inventoryKeys.custodyOptions(siteId, componentId),
    queryFn: ({ signal }) =>
      api.get(`${base(siteId)}/components/${componentId}/custody-options`, custodyOptionsResponse, signal),
  });
/** The next free generated tag (T-0001…), fetched when the person asks for one. */
export const fetchNextTag = (siteId: string) => api.get(`${base(siteId)}/tags/next`, nextTagResponse);

export const useMoveCustody = (siteId: string) =>
  useInventoryMutation(
    siteId,
    ({ componentId, label, ...b }: CustodyBody & { componentId: string; label: string }) =>
      submitOrQueue({
        siteId,
        kind: "custody",
        label: `Move of ${label}`,
        url: `${base(siteId)}/components/${componentId}/custody`,
        body: { ...b, at: b.at ?? new Date().toISOString() },
        parse: (d) => custodyResponse.parse(d),
      }),
    unlessQueued((r) => ({ kind: "component", componentId: r.component.id, positionId: r.component.positionId })),
  );

export const useDecideDisposition = (siteId: string) =>
  useInventoryMutation(
    siteId,
    ({ componentId, ...b }: DispositionBody & { componentId: string }) =>
      api.send("PUT", `${base(siteId)}/components/${componentId}/disposition`, b, dispositionResponse),
    (r) => ({ kind: "component", componentId: r.component.id, positionId: r.component.positionId }),
  );

/** A flood event moves every board's water line (each tile's "below the water line"): the site is read again. */
export const useFloodEventMutations = (siteId: string) => ({
  create: useInventoryMutation(
    siteId,
    (b: CreateFloodEventBody) => api.send("POST", `${base(siteId)}/flood-events`, b, floodEventSchema),
    () => ({ kind: "site" }),
  ),
  update: useInventoryMutation(
    siteId,
    ({ id, ...b }: PatchFloodEventBody & { id: string }) =>
      api.send("PATCH", `${base(siteId)}/flood-events/${id}`, b, floodEventSchema),
    () => ({ kind: "site" }),
  ),
});

/** Preview writes nothing; commit is all-or-nothing (a bad row → 400 import_invalid, nothing written). */
/** A chosen file goes as its bytes (the server detects its encoding); pasted text as JSON {csv}. */
export const useImportInventory = (siteId: string) =>
  useInventoryMutation(
    siteId,
    ({ csv, mode, expect }: { csv: string | Blob; mode: "preview" | "commit"; expect?: string }) =>
      api.send(
        "POST",
        `${base(siteId)}/inventory/import${qs({ mode, expect })}`,
        typeof csv === "string" ? { csv } : csv,
        importResponse,
      ),
    (_r, v) => ({ kind: v.mode === "preview" ? "nothing" : "site" }),
  );

export const inventoryCsvHref = (siteId: string) => `${base(siteId)}/inventory.csv`;

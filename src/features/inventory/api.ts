import { useEffect } from "react";
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
import { submitOrQueue } from "../../lib/outbox";
import {
  BOARD_LATER_PAGE,
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
  tilePageResponse,
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

/** Query keys for everything inventory; every write invalidates `all(siteId)`. */
export const inventoryKeys = {
  all: (siteId: string) => ["inventory", siteId] as const,
  overview: (siteId: string) => [...inventoryKeys.all(siteId), "overview"] as const,
  floodEvents: (siteId: string) => [...inventoryKeys.all(siteId), "flood-events"] as const,
  boards: (siteId: string) => [...inventoryKeys.all(siteId), "boards"] as const,
  /** A board read in pages (an infinite query: the head and first page, then the rest). */
  board: (siteId: string, boardId: string) => [...inventoryKeys.all(siteId), "board", boardId, "pages"] as const,
  /** A board's small picture on the board list (one compact cell per position). */
  thumbnail: (siteId: string, boardId: string) =>
    [...inventoryKeys.all(siteId), "board", boardId, "thumbnail"] as const,
  position: (siteId: string, positionId: string) => [...inventoryKeys.all(siteId), "position", positionId] as const,
  lookup: (siteId: string, q: string) => [...inventoryKeys.all(siteId), "lookup", q] as const,
  custodyOptions: (siteId: string, componentId: string) =>
    [...inventoryKeys.all(siteId), "custody-options", componentId] as const,
};

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
type BoardPage = z.infer<typeof boardDetailResponse> | z.infer<typeof tilePageResponse>;
/**
 * One board: its head (board, sections, total) with the first page of its positions, then the rest page by page
 * after the key the page before gave (`next`). A board of up to a page is one request, as before.
 */
export const boardQueryOptions = (siteId: string, boardId: string) =>
  infiniteQueryOptions({
    queryKey: inventoryKeys.board(siteId, boardId),
    queryFn: ({ signal, pageParam }): Promise<BoardPage> =>
      pageParam === null
        ? api.get(`${base(siteId)}/boards/${boardId}`, boardDetailResponse, signal)
        : api.get(
            `${base(siteId)}/boards/${boardId}/tiles${qs({ after: pageParam, size: BOARD_LATER_PAGE })}`,
            tilePageResponse,
            signal,
          ),
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

/** When the page is idle (after the first page has been drawn), or at once where the browser cannot say. */
const whenIdle = (fn: () => void) => {
  if (typeof requestIdleCallback === "function") {
    const id = requestIdleCallback(fn, { timeout: 500 });
    return () => cancelIdleCallback(id);
  }
  const id = setTimeout(fn, 0);
  return () => clearTimeout(id);
};
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

/** Every inventory write invalidates the site's inventory queries (tiles, overview, history). */
function useInventoryMutation<V, R>(siteId: string, fn: (v: V) => Promise<R>) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: () => qc.invalidateQueries({ queryKey: inventoryKeys.all(siteId) }),
  });
}

export const useCreateBoard = (siteId: string) =>
  useInventoryMutation(siteId, (b: CreateBoardBody) => api.send("POST", `${base(siteId)}/boards`, b, boardSchema));
export const useUpdateBoard = (siteId: string, boardId: string) =>
  useInventoryMutation(siteId, (b: PatchBoardBody) =>
    api.send("PATCH", `${base(siteId)}/boards/${boardId}`, b, boardSchema),
  );

export const useSectionMutations = (siteId: string, boardId: string) => ({
  create: useInventoryMutation(siteId, (b: { name: string }) =>
    api.send("POST", `${base(siteId)}/boards/${boardId}/sections`, b, sectionSchema),
  ),
  update: useInventoryMutation(siteId, ({ id, ...b }: PatchSectionBody & { id: string }) =>
    api.send("PATCH", `${base(siteId)}/sections/${id}`, b, sectionSchema),
  ),
  remove: useInventoryMutation(siteId, ({ id, version }: { id: string; version: number }) =>
    api.raw("DELETE", `${base(siteId)}/sections/${id}${qs({ version })}`),
  ),
});

export const usePositionMutations = (siteId: string, boardId: string) => ({
  create: useInventoryMutation(siteId, (b: CreatePositionBody) =>
    api.send("POST", `${base(siteId)}/boards/${boardId}/positions`, b, createdPositionResponse),
  ),
  generate: useInventoryMutation(siteId, (b: GeneratePositionsBody) =>
    api.send("POST", `${base(siteId)}/boards/${boardId}/positions/generate`, b, generatedPositionsResponse),
  ),
  reorder: useInventoryMutation(siteId, (ids: string[]) =>
    api.send("POST", `${base(siteId)}/boards/${boardId}/positions/reorder`, { ids }, reorderedPositionsResponse),
  ),
  update: useInventoryMutation(siteId, ({ id, ...b }: PatchPositionBody & { id: string }) =>
    api.send("PATCH", `${base(siteId)}/positions/${id}`, b, positionSchema),
  ),
  remove: useInventoryMutation(siteId, ({ id, version }: { id: string; version: number }) =>
    api.raw("DELETE", `${base(siteId)}/positions/${id}${qs({ version })}`),
  ),
});

export const useUpdateComponent = (siteId: string) =>
  useInventoryMutation(siteId, ({ id, ...b }: PatchComponentBody & { id: string }) =>
    api.send("PATCH", `${base(siteId)}/components/${id}`, b, componentSchema),
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
        body: b,
        parse: (d) => inspectionSchema.parse(d),
      }),
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
  useInventoryMutation(siteId, ({ componentId, label, ...b }: CustodyBody & { componentId: string; label: string }) =>
    submitOrQueue({
      siteId,
      kind: "custody",
      label: `Move of ${label}`,
      url: `${base(siteId)}/components/${componentId}/custody`,
      body: b,
      parse: (d) => custodyResponse.parse(d),
    }),
  );

export const useDecideDisposition = (siteId: string) =>
  useInventoryMutation(siteId, ({ componentId, ...b }: DispositionBody & { componentId: string }) =>
    api.send("PUT", `${base(siteId)}/components/${componentId}/disposition`, b, dispositionResponse),
  );

export const useFloodEventMutations = (siteId: string) => ({
  create: useInventoryMutation(siteId, (b: CreateFloodEventBody) =>
    api.send("POST", `${base(siteId)}/flood-events`, b, floodEventSchema),
  ),
  update: useInventoryMutation(siteId, ({ id, ...b }: PatchFloodEventBody & { id: string }) =>
    api.send("PATCH", `${base(siteId)}/flood-events/${id}`, b, floodEventSchema),
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
  );

export const inventoryCsvHref = (siteId: string) => `${base(siteId)}/inventory.csv`;

import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api, qs } from "../../lib/api-client";
import { photosFiled } from "../../lib/photos-filed";
import {
  photoSchema,
  boardPhotoTargetsResponse,
  matchNamesResponse,
  photoSettingsSchema,
  photoTargetBoardsResponse,
  shootListSchema,
  type BulkAssign,
  type Photo,
  type PhotoPatch,
} from "../../schemas/photos";
import type { PhotoKind } from "../../domain/vocab";

export interface PhotoFilter {
  boardId?: string;
  positionId?: string;
  componentId?: string;
  kind?: PhotoKind;
  inspectionId?: string;
  custodyMoveId?: string;
  defectId?: string;
  unassigned?: boolean;
  ids?: string[];
}

export const photoKeys = {
  all: (siteId: string) => ["photos", siteId] as const,
  list: (siteId: string, f: PhotoFilter) => [...photoKeys.all(siteId), "list", f] as const,
  /** Where photos can be filed: the boards (`targetBoards`) and one board's positions each (`boardTargets`). */
  targets: (siteId: string) => [...photoKeys.all(siteId), "targets"] as const,
  targetBoards: (siteId: string) => [...photoKeys.targets(siteId), "boards"] as const,
  boardTargets: (siteId: string, boardId: string) => [...photoKeys.targets(siteId), "board", boardId] as const,
  settings: (siteId: string) => [...photoKeys.all(siteId), "settings"] as const,
  shootList: (siteId: string, boardId: string) => [...photoKeys.all(siteId), "shoot-list", boardId] as const,
};

export const photoUrl = (siteId: string, photoId: string, rendition: "thumb" | "display" | "original") =>
  `/api/sites/${siteId}/photos/${photoId}/${rendition}`;

const listResponse = z.object({ photos: z.array(photoSchema) });

export const photosQueryOptions = (siteId: string, f: PhotoFilter) =>
  queryOptions({
    queryKey: photoKeys.list(siteId, f),
    queryFn: ({ signal }) =>
      api
        .get(
          `/api/sites/${siteId}/photos${qs({ boardId: f.boardId, positionId: f.positionId, componentId: f.componentId, kind: f.kind, inspectionId: f.inspectionId, custodyMoveId: f.custodyMoveId, defectId: f.defectId, unassigned: f.unassigned ? "1" : undefined, ids: f.ids?.join(",") })}`,
          listResponse,
          signal,
        )
        .then((d) => d.photos),
    // While a photo's renditions are being made, look again every two seconds.
    refetchInterval: (q) => (q.state.data?.some((p) => p.renditionState === "processing") ? 2000 : false),
  });
export const usePhotos = (siteId: string, f: PhotoFilter, enabled = true) =>
  useQuery({ ...photosQueryOptions(siteId, f), enabled });

/** The site's boards a photo can be filed to, with their counts of positions (never the positions). */
export const usePhotoBoards = (siteId: string) =>
  useQuery({
    queryKey: photoKeys.targetBoards(siteId),
    queryFn: ({ signal }) =>
      api.get(`/api/sites/${siteId}/photo-targets`, photoTargetBoardsResponse, signal).then((d) => d.boards),
    staleTime: 60_000,
  });

/** One board's positions a photo can be filed to, read once the board is chosen. */
export const useBoardPhotoTargets = (siteId: string, boardId: string | undefined) =>
  useQuery({
    queryKey: photoKeys.boardTargets(siteId, boardId ?? ""),
    queryFn: ({ signal }) =>
      api
        .get(`/api/sites/${siteId}/boards/${boardId}/photo-targets`, boardPhotoTargetsResponse, signal)
        .then((d) => d.targets),
    enabled: !!boardId,
    staleTime: 60_000,
  });

/** A shoot's file names matched to positions on the server (tags across the site, designations on `boardId`). */
export const useMatchNames = (siteId: string) =>
  useMutation({
    mutationFn: (body: { names: string[]; boardId?: string }) =>
      api.send("POST", `/api/sites/${siteId}/photo-targets/match`, body, matchNamesResponse),
  });

export const usePhotoSettings = (siteId: string) =>
  useQuery({
    queryKey: photoKeys.settings(siteId),
    queryFn: ({ signal }) =>
      api
        .get(`/api/sites/${siteId}/photo-settings`, z.object({ settings: photoSettingsSchema }), signal)
        .then((d) => d.settings),
  });

export const useShootList = (siteId: string, boardId: string | undefined) =>
  useQuery({
    queryKey: photoKeys.shootList(siteId, boardId ?? ""),
    queryFn: ({ signal }) => api.get(`/api/sites/${siteId}/boards/${boardId}/shoot-list`, shootListSchema, signal),
    enabled: !!boardId,
  });

/** Where a photo was filed, from the photo lists this client has read (null when none of them holds it). */
export function cachedPositionOf(qc: QueryClient, siteId: string, photoId: string): string | null | undefined {
  for (const [key, data] of qc.getQueriesData<Photo[]>({ queryKey: photoKeys.all(siteId) })) {
    if (key[2] !== "list" || !Array.isArray(data)) continue;
    const found = data.find((p) => p.id === photoId);
    if (found) return found.positionId;
  }
  return undefined;
}

/**
 * What a photo write makes the client read again: the site's photo queries but where photos can be filed (also after a
 * refused write, which changed nothing else), and whatever other features show of the positions the photos were filed at before and
 * after the write, announced through `photosFiled` (the app joins it to the inventory: the tiles' photo counts and
 * the positions' details, one board page each; never the overview, board list or another site). Before, every
 * photo write invalidated every inventory query of every site.
 */
export async function afterPhotoWrite(
  qc: QueryClient,
  siteId: string,
  positions: ReadonlyArray<string | null | undefined>,
) {
  await Promise.all([
    // Where photos can be filed (boards, positions) does not change with a photo: not read again.
    qc.invalidateQueries({ queryKey: photoKeys.all(siteId), predicate: (q) => q.queryKey[2] !== "targets" }),
    positions.length ? photosFiled({ siteId, positions }) : undefined,
  ]);
}

export function usePhotoMutations(siteId: string) {
  const qc = useQueryClient();
  /** After uploads (or anything else that filed these photos): their positions' tiles and details, the photo lists. */
  const invalidate = (photos: ReadonlyArray<Pick<Photo, "positionId">> = []) =>
    afterPhotoWrite(
      qc,
      siteId,
      photos.map((p) => p.positionId),
    );
  /** Where each photo was before the write, read before it is sent (the lists are read again after it). */
  const before = (ids: string[]) => ids.map((id) => cachedPositionOf(qc, siteId, id));
  return {
    patch: useMutation({
      mutationFn: ({ id, ...body }: PhotoPatch & { id: string }) =>
        api
          .send("PATCH", `/api/sites/${siteId}/photos/${id}`, body, z.object({ photo: photoSchema }))
          .then((d) => d.photo),
      onMutate: ({ id }) => ({ was: before([id]) }),
      onSettled: (photo, error, _v, ctx) =>
        afterPhotoWrite(qc, siteId, error || !photo ? [] : [...(ctx?.was ?? [undefined]), photo.positionId]),
    }),
    assign: useMutation({
      mutationFn: (body: BulkAssign) =>
        api.send("POST", `/api/sites/${siteId}/photos/assign`, body, listResponse).then((d) => d.photos),
      onMutate: (body) => ({ was: before(body.items.map((i) => i.photoId)) }),
      onSettled: (_photos, error, body, ctx) =>
        afterPhotoWrite(
          qc,
          siteId,
          error ? [] : [...(ctx?.was ?? [undefined]), ...body.items.map((i) => i.positionId)],
        ),
    }),
    remove: useMutation({
      mutationFn: (id: string) =>
        api.send("DELETE", `/api/sites/${siteId}/photos/${id}`, undefined, z.object({ ok: z.boolean() })),
      onMutate: (id) => ({ was: before([id]) }),
      onSettled: (_r, error, _id, ctx) => afterPhotoWrite(qc, siteId, error ? [] : (ctx?.was ?? [undefined])),
    }),
    saveSettings: useMutation({
      mutationFn: (body: { requiredKinds: PhotoKind[]; version: number }) =>
        api
          .send("PUT", `/api/sites/${siteId}/photo-settings`, body, z.object({ settings: photoSettingsSchema }))
          .then((d) => d.settings),
      // The required shots show on the shoot list only.
      onSettled: () => afterPhotoWrite(qc, siteId, []),
    }),
    invalidate,
  };
}

export interface UploadTags {
  kind: PhotoKind;
  caption: string;
  boardId?: string;
  positionId?: string;
  inspectionId?: string;
  custodyMoveId?: string;
  defectId?: string;
}

/**
 * One file, with upload progress: fetch() reports no upload progress, XMLHttpRequest
 * does (xhr.upload "progress" events). Resolves with the stored photo; rejects with
 * the server's message.
 */
/** Why an upload failed, and whether sending the same file again can help. */
export class UploadError extends Error {
  constructor(
    message: string,
    readonly retryable: boolean,
  ) {
    super(message);
  }
}

export function uploadOne(
  siteId: string,
  file: File,
  tags: UploadTags,
  onProgress: (fraction: number) => void,
  signal?: AbortSignal,
): Promise<Photo> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    const fd = new FormData();
    fd.append("kind", tags.kind);
    if (tags.caption) fd.append("caption", tags.caption);
    for (const k of ["boardId", "positionId", "inspectionId", "custodyMoveId", "defectId"] as const)
      if (tags[k]) fd.append(k, tags[k]!);
    fd.append("files", file, file.name);
    xhr.open("POST", `/api/sites/${siteId}/photos`);
    xhr.responseType = "json";
    xhr.upload.addEventListener("progress", (e) => e.lengthComputable && onProgress(e.loaded / e.total));
    xhr.addEventListener("load", () => {
      const body = xhr.response as { photos?: unknown[]; error?: { message?: string } } | null;
      if (xhr.status === 201 && body?.photos?.[0]) return resolve(photoSchema.parse(body.photos[0]));
      // A refusal of the file itself (not a picture, too large, bad input) is not helped by sending it again.
      const final =
        xhr.status >= 400 && xhr.status < 500 && xhr.status !== 401 && xhr.status !== 408 && xhr.status !== 429;
      reject(new UploadError(body?.error?.message ?? `The server answered ${xhr.status}.`, !final));
    });
    xhr.addEventListener("error", () =>
      reject(
        new UploadError(
          navigator.onLine
            ? "The connection dropped during the upload."
            : "No signal: the photo was not sent. Retry once the connection is back.",
          true,
        ),
      ),
    );
    xhr.addEventListener("abort", () => reject(new Error("Upload cancelled.")));
    signal?.addEventListener("abort", () => xhr.abort());
    xhr.send(fd);
  });
}

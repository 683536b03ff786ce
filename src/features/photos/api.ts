import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api, qs } from "../../lib/api-client";
import {
  photoSchema,
  photoSettingsSchema,
  photoTargetSchema,
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
  targets: (siteId: string) => [...photoKeys.all(siteId), "targets"] as const,
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

export const usePhotoTargets = (siteId: string) =>
  useQuery({
    queryKey: photoKeys.targets(siteId),
    queryFn: ({ signal }) =>
      api
        .get(`/api/sites/${siteId}/photo-targets`, z.object({ targets: z.array(photoTargetSchema) }), signal)
        .then((d) => d.targets),
    staleTime: 60_000,
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

function useInvalidate(siteId: string) {
  const qc = useQueryClient();
  // Board tiles count photos too (their photoCount comes from the inventory's queries).
  return () =>
    Promise.all([
      qc.invalidateQueries({ queryKey: photoKeys.all(siteId) }),
      qc.invalidateQueries({ queryKey: ["inventory"] }),
    ]);
}

export function usePhotoMutations(siteId: string) {
  const invalidate = useInvalidate(siteId);
  return {
    patch: useMutation({
      mutationFn: ({ id, ...body }: PhotoPatch & { id: string }) =>
        api
          .send("PATCH", `/api/sites/${siteId}/photos/${id}`, body, z.object({ photo: photoSchema }))
          .then((d) => d.photo),
      onSettled: invalidate,
    }),
    assign: useMutation({
      mutationFn: (body: BulkAssign) =>
        api.send("POST", `/api/sites/${siteId}/photos/assign`, body, listResponse).then((d) => d.photos),
      onSettled: invalidate,
    }),
    remove: useMutation({
      mutationFn: (id: string) =>
        api.send("DELETE", `/api/sites/${siteId}/photos/${id}`, undefined, z.object({ ok: z.boolean() })),
      onSettled: invalidate,
    }),
    saveSettings: useMutation({
      mutationFn: (body: { requiredKinds: PhotoKind[]; version: number }) =>
        api
          .send("PUT", `/api/sites/${siteId}/photo-settings`, body, z.object({ settings: photoSettingsSchema }))
          .then((d) => d.settings),
      onSettled: invalidate,
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
      reject(new Error(body?.error?.message ?? `The server answered ${xhr.status}.`));
    });
    xhr.addEventListener("error", () => reject(new Error("The connection dropped during the upload.")));
    xhr.addEventListener("abort", () => reject(new Error("Upload cancelled.")));
    signal?.addEventListener("abort", () => xhr.abort());
    xhr.send(fd);
  });
}

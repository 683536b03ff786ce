import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../lib/api-client";
import { submitOrQueue } from "../../lib/outbox";
import type { QualifiedPerson, RtsBoardView, RtsOverviewBoard, RtsSettings } from "../../schemas/return-to-service";

const site = (siteId: string) => `/api/sites/${siteId}`;
export const rtsKeys = {
  all: (siteId: string) => ["rts", siteId] as const,
  board: (siteId: string, boardId: string) => [...rtsKeys.all(siteId), "board", boardId] as const,
  overview: (siteId: string) => [...rtsKeys.all(siteId), "overview"] as const,
  qualified: (siteId: string) => [...rtsKeys.all(siteId), "qualified"] as const,
};

export const useRtsBoard = (siteId: string, boardId: string) =>
  useQuery({
    queryKey: rtsKeys.board(siteId, boardId),
    queryFn: ({ signal }) =>
      api.raw("GET", `${site(siteId)}/boards/${boardId}/return-to-service`, undefined, signal) as Promise<RtsBoardView>,
    refetchInterval: 60_000,
  });
export const useRtsOverview = (siteId: string) =>
  useQuery({
    queryKey: rtsKeys.overview(siteId),
    queryFn: ({ signal }) =>
      (
        api.raw("GET", `${site(siteId)}/return-to-service`, undefined, signal) as Promise<{
          boards: RtsOverviewBoard[];
        }>
      ).then((d) => d.boards),
  });
export const useQualifiedPersons = (siteId: string) =>
  useQuery({
    queryKey: rtsKeys.qualified(siteId),
    queryFn: ({ signal }) =>
      (
        api.raw("GET", `${site(siteId)}/return-to-service/qualified-persons`, undefined, signal) as Promise<{
          people: QualifiedPerson[];
        }>
      ).then((d) => d.people),
  });

/** One mutation hook for every write of the feature: method, path under the site, body. Invalidates the feature. */
export function useRtsAction(siteId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { method: "POST" | "PUT" | "PATCH" | "DELETE"; path: string; body?: unknown }) =>
      api.raw(v.method, `${site(siteId)}${v.path}`, v.body ?? {}),
    onSettled: () => qc.invalidateQueries({ queryKey: rtsKeys.all(siteId) }),
  });
}

/**
 * A watch check from the phone. It carries the time it was made (`at`), so a check kept
 * on the phone with no signal is logged at the minute it was made, not when it arrives. Online it
 * is saved at once; with no signal it waits in the outbox and `{queued: true}` comes back.
 */
export function useRecordWatchCheck(siteId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { stageId: string; stageName: string; body: Record<string, unknown> }) =>
      submitOrQueue({
        siteId,
        kind: "watch_check",
        label: `Watch check, ${v.stageName}`,
        url: `${site(siteId)}/return-to-service/stages/${v.stageId}/watch-checks`,
        body: { at: new Date().toISOString(), ...v.body },
        parse: (d) => d as { incidents: Array<{ defectRef: number; defectId: string }> },
      }),
    onSettled: () => qc.invalidateQueries({ queryKey: rtsKeys.all(siteId) }),
  });
}

export const useRtsSettings = (siteId: string) =>
  useQuery({
    queryKey: [...rtsKeys.all(siteId), "settings"] as const,
    queryFn: ({ signal }) =>
      (
        api.raw("GET", `${site(siteId)}/return-to-service/settings`, undefined, signal) as Promise<{
          settings: RtsSettings;
        }>
      ).then((d) => d.settings),
  });

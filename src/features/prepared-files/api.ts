/**
 * Prepared files: the report and large CSV exports made in the background (server/prepared-files).
 * The list polls while a file is waiting or being made; the notices poll gently while signed in.
 */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../lib/api-client";
import {
  preparedFileResponse,
  preparedListResponse,
  preparedNoticesResponse,
  type PrepareBody,
  type PreparedFile,
} from "../../schemas/prepared-files";

export const preparedKeys = {
  all: ["prepared-files"] as const,
  list: (siteId: string) => [...preparedKeys.all, "list", siteId] as const,
  notices: () => [...preparedKeys.all, "notices"] as const,
};

const base = (siteId: string) => `/api/sites/${siteId}/prepared-files`;
export const inProgress = (f: Pick<PreparedFile, "state">) => f.state === "queued" || f.state === "rendering";

export const preparedListQuery = (siteId: string) =>
  queryOptions({
    queryKey: preparedKeys.list(siteId),
    queryFn: ({ signal }) => api.get(base(siteId), preparedListResponse, signal),
    // Progress: every 1.5 s while something is being made, otherwise not at all.
    refetchInterval: (q) => (q.state.data?.files.some(inProgress) ? 1500 : false),
  });
export const usePreparedFiles = (siteId: string) => useQuery(preparedListQuery(siteId));

/** Files made (or failed) and not yet seen, on every site of the person. */
export const useNotices = (enabled = true) =>
  useQuery({
    queryKey: preparedKeys.notices(),
    queryFn: ({ signal }) => api.get("/api/prepared-files/notices", preparedNoticesResponse, signal),
    refetchInterval: 10_000,
    enabled,
  });

function useInvalidate() {
  const qc = useQueryClient();
  return () => qc.invalidateQueries({ queryKey: preparedKeys.all });
}

export function usePrepareFile(siteId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (body: PrepareBody) => api.send("POST", base(siteId), body, preparedFileResponse),
    onSuccess: invalidate,
  });
}

export function useRetryFile() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (f: Pick<PreparedFile, "statusUrl">) =>
      api.send("POST", `${f.statusUrl}/retry`, {}, preparedFileResponse),
    onSuccess: invalidate,
  });
}

export function useMarkSeen() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (f: Pick<PreparedFile, "statusUrl">) =>
      api.send("POST", `${f.statusUrl}/seen`, {}, preparedFileResponse),
    onSuccess: invalidate,
  });
}

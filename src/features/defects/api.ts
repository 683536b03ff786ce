import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api, ApiError, qs } from "../../lib/api-client";
import { submitOrQueue, useOutbox } from "../../lib/outbox";
import {
  contextResponse,
  defectDetailSchema,
  evidenceResponse,
  defectRowSchema,
  listResponse,
  optionsResponse,
  boardPlanResponse,
  planResponse,
  positionsResponse,
  viewSchema,
  type BulkBody,
  type CreateDefectBody,
  type LinkReadingBody,
  type PatchDefectBody,
} from "../../schemas/defects";
import { DEFECT_STATUS_LABELS, type DefectStatus } from "../../domain/vocab";

export const defectKeys = {
  all: (siteId: string) => ["defects", siteId] as const,
  list: (siteId: string, query: string) => [...defectKeys.all(siteId), "list", query] as const,
  detail: (siteId: string, id: string) => [...defectKeys.all(siteId), "detail", id] as const,
  options: (siteId: string) => [...defectKeys.all(siteId), "options"] as const,
  positions: (siteId: string, boardId: string) => [...defectKeys.all(siteId), "positions", boardId] as const,
  views: (siteId: string) => [...defectKeys.all(siteId), "views"] as const,
  plan: (siteId: string) => [...defectKeys.all(siteId), "plan"] as const,
  boardPlan: (siteId: string, boardId: string) => [...defectKeys.all(siteId), "plan", boardId] as const,
  evidence: (siteId: string, id: string) => [...defectKeys.all(siteId), "evidence", id] as const,
};
const base = (siteId: string) => `/api/sites/${siteId}/defects`;
const one = z.object({ defect: defectRowSchema });

export const defectListOptions = (siteId: string, query: string) =>
  queryOptions({
    queryKey: defectKeys.list(siteId, query),
    queryFn: ({ signal }) => api.get(`${base(siteId)}?${query}`, listResponse, signal),
    placeholderData: keepPreviousData,
  });
export const useDefectList = (siteId: string, query: string) => useQuery(defectListOptions(siteId, query));

/** The choices the register's filters and the defect forms offer (boards, assignees). */
export const defectChoicesOptions = (siteId: string) =>
  queryOptions({
    queryKey: defectKeys.options(siteId),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/options`, optionsResponse, signal),
    staleTime: 60_000,
  });
export const useDefectOptions = (siteId: string) => useQuery(defectChoicesOptions(siteId));

export const useBoardPositions = (siteId: string, boardId: string) =>
  useQuery({
    queryKey: defectKeys.positions(siteId, boardId),
    queryFn: ({ signal }) =>
      api.get(`/api/sites/${siteId}/defect-positions/${boardId}`, positionsResponse, signal).then((d) => d.positions),
    enabled: !!boardId,
    staleTime: 60_000,
  });

export const useFindingContext = (
  siteId: string,
  q: { positionId?: string; componentId?: string; inspectionId?: string },
) =>
  useQuery({
    queryKey: [...defectKeys.all(siteId), "context", q] as const,
    queryFn: ({ signal }) =>
      api.get(`/api/sites/${siteId}/defect-context${qs(q)}`, contextResponse, signal).then((d) => d.context),
    enabled: !!(q.positionId || q.componentId || q.inspectionId),
  });

export const useDefect = (siteId: string, id: string) =>
  useQuery({
    queryKey: defectKeys.detail(siteId, id),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/${id}`, defectDetailSchema, signal),
  });

export const useRepairPlan = (siteId: string) =>
  useQuery({
    queryKey: defectKeys.plan(siteId),
    queryFn: ({ signal }) => api.get(`/api/sites/${siteId}/repair-plan`, planResponse, signal),
  });

/** One board's part of the plan, read only once a board is chosen. */
export const useBoardRepairPlan = (siteId: string, boardId: string | null) =>
  useQuery({
    queryKey: defectKeys.boardPlan(siteId, boardId ?? ""),
    queryFn: ({ signal }) => api.get(`/api/sites/${siteId}/repair-plan/boards/${boardId}`, boardPlanResponse, signal),
    enabled: !!boardId,
  });

export const useSavedViews = (siteId: string) =>
  useQuery({
    queryKey: defectKeys.views(siteId),
    queryFn: ({ signal }) =>
      api.get(`${base(siteId)}/views`, z.object({ views: z.array(viewSchema) }), signal).then((d) => d.views),
  });

/** Every write refreshes the whole feature's cache for the site (lists, detail, plan). */
function useWrite<TVars, TOut>(siteId: string, fn: (v: TVars) => Promise<TOut>) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    // a 409 means our copy is stale: refetch so the page shows the current record
    onSettled: (_d, err) => {
      if (!err || (err instanceof ApiError && err.status === 409))
        void qc.invalidateQueries({ queryKey: defectKeys.all(siteId) });
    },
  });
}

/** Raising a defect from the phone: saved at once online; with no signal kept in the outbox. */
export const useCreateDefect = (siteId: string) =>
  useWrite(siteId, (b: CreateDefectBody) =>
    submitOrQueue({
      siteId,
      kind: "defect",
      label: `Defect: ${b.title || "untitled"}`,
      url: base(siteId),
      body: b,
      parse: (d) => one.parse(d).defect,
    }),
  );
/**
 * A defect's fields, edited on the phone: saved at once online; with no signal kept in the outbox
 * with the version it was based on. A defect changed meanwhile comes back 409 with the
 * current one, compared field by field in the sync bar.
 */
export const usePatchDefect = (siteId: string, id: string, ref: number) =>
  useWrite(siteId, (b: PatchDefectBody) =>
    submitOrQueue({
      siteId,
      kind: "defect_edit",
      label: `Edit of D-${ref}`,
      url: `${base(siteId)}/${id}`,
      method: "PATCH",
      edit: {},
      body: b,
      parse: (d) => one.parse(d).defect,
    }),
  );
/** What proves the repair: linked readings (judged), after-work photos, and readings of the component to link. */
export const useEvidence = (siteId: string, id: string) =>
  useQuery({
    queryKey: defectKeys.evidence(siteId, id),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/${id}/evidence`, evidenceResponse, signal),
  });
/** For the photo upload beside the evidence: an after-work photo filed here counts towards the close. */
export function useRefreshEvidence(siteId: string, id: string) {
  const qc = useQueryClient();
  return () => void qc.invalidateQueries({ queryKey: defectKeys.evidence(siteId, id) });
}
export const useLinkReading = (siteId: string, id: string) =>
  useWrite(siteId, (b: LinkReadingBody) => api.send("POST", `${base(siteId)}/${id}/readings`, b, evidenceResponse));

/** A status move (the ones the person's role may make), kept on the phone like an edit with no signal. */
export const useMoveDefect = (siteId: string, id: string, ref: number) =>
  useWrite(siteId, (b: { to: DefectStatus; reason: string; version: number }) =>
    submitOrQueue({
      siteId,
      kind: "defect_status",
      label: `D-${ref} to ${DEFECT_STATUS_LABELS[b.to]}`,
      url: `${base(siteId)}/${id}/status`,
      edit: { compareAs: { to: "status" } },
      body: b,
      parse: (d) => one.parse(d).defect,
    }),
  );
export const useAssignDefect = (siteId: string, id: string) =>
  useWrite(siteId, (b: { assigneeId: string | null; version: number }) =>
    api.send("POST", `${base(siteId)}/${id}/assignee`, b, one).then((d) => d.defect),
  );
export const usePinDefect = (siteId: string, id: string) =>
  useWrite(siteId, (b: { direction: "above" | "below"; relativeTo: string; reason: string }) =>
    api.send("PUT", `${base(siteId)}/${id}/pin`, b, defectDetailSchema),
  );
export const useUnpinDefect = (siteId: string, id: string) =>
  useWrite(siteId, (b: { reason: string }) => api.send("DELETE", `${base(siteId)}/${id}/pin`, b, defectDetailSchema));
export const useBulkDefects = (siteId: string) =>
  useWrite(siteId, (b: BulkBody) => api.send("POST", `${base(siteId)}/bulk`, b, z.object({ updated: z.number() })));
export const useSaveView = (siteId: string) =>
  useWrite(siteId, (b: { name: string; query: string }) =>
    api.send("POST", `${base(siteId)}/views`, b, z.object({ view: viewSchema })).then((d) => d.view),
  );
export const useDeleteView = (siteId: string) =>
  useWrite(siteId, (id: string) => api.raw("DELETE", `${base(siteId)}/views/${id}`));

/** Finds a defect by its D-number for the pin form. */
export const findByRef = (siteId: string, ref: string) =>
  api
    .get(`${base(siteId)}?q=${encodeURIComponent(ref)}&sort=ref&size=5`, listResponse)
    .then((d) => d.rows.find((r) => `D-${r.ref}` === ref.toUpperCase().replace(/^D?-?/, "D-")) ?? null);

export const csvHref = (siteId: string, query: string) => `${base(siteId)}.csv?${query}`;

/**
 * This defect's edits and status moves still waiting on the phone, merged in the order
 * they were made: the page shows these values, marked as waiting, instead of the server's older ones
 * until they are sent. `fields` holds the record's fields they change (a move's `to` is `status`, its
 * reason `statusReason`); the version they were based on is not among them.
 */
export function usePendingDefect(siteId: string, id: string): { fields: Record<string, unknown>; count: number } {
  const { items } = useOutbox();
  const url = `${base(siteId)}/${id}`;
  const mine = items.filter((i) => i.state === "waiting" && (i.url === url || i.url === `${url}/status`));
  const fields: Record<string, unknown> = {};
  for (const i of mine) {
    const b = (i.body ?? {}) as Record<string, unknown>;
    if (i.url === url) {
      for (const [k, v] of Object.entries(b)) if (k !== "version") fields[k] = v;
    } else {
      fields.status = b.to;
      fields.statusReason = b.reason ?? "";
    }
  }
  return { fields, count: mine.length };
}

import {
  keepPreviousData,
  queryOptions,
  useInfiniteQuery,
  useMutation,
  useQuery,
  useQueryClient,
} from "@tanstack/react-query";
import { z } from "zod";
import { api, qs } from "../../lib/api-client";
import {
  LINE_LINKS_PAGE,
  leadSchema,
  lineDetailResponse,
  lineLinksResponse,
  lineSchema,
  listResponse,
  shareLinkSchema,
  sharedListResponse,
  type CreateLineBody,
  type LeadBody,
  type ListQuery,
  type StatusBody,
  type UpdateLineBody,
} from "../../schemas/parts";
import type { HeritageRule } from "../../domain/vocab";

export const partsKeys = {
  all: (siteId: string) => ["parts", siteId] as const,
  list: (siteId: string, f: ListQuery) => [...partsKeys.all(siteId), "list", f] as const,
  detail: (siteId: string, lineId: string) => [...partsKeys.all(siteId), "detail", lineId] as const,
  links: (siteId: string, lineId: string) => [...partsKeys.all(siteId), "links", lineId] as const,
  shareLinks: (siteId: string) => [...partsKeys.all(siteId), "share-links"] as const,
  shared: (token: string) => ["shared-parts", token] as const,
};

const base = (siteId: string) => `/api/sites/${siteId}/parts`;
const filterQs = (f: ListQuery) =>
  qs({
    status: f.status,
    boardId: f.boardId,
    kind: f.kind,
    heritageRule: f.heritageRule,
    q: f.q,
    sort: f.sort,
    dir: f.dir,
    page: f.page as number | undefined,
    size: f.size as number | undefined,
  });
/** The CSV holds every line of the filter, in the list's order (no page). */
export const csvUrl = (siteId: string, f: ListQuery) =>
  `${base(siteId)}.csv${filterQs({ ...f, page: undefined, size: undefined })}`;
export const thumbUrl = (siteId: string, photoId: string) => `${base(siteId)}/photos/${photoId}/thumb`;

export const partsListQueryOptions = (siteId: string, f: ListQuery) =>
  queryOptions({
    queryKey: partsKeys.list(siteId, f),
    queryFn: ({ signal }) => api.get(`${base(siteId)}${filterQs(f)}`, listResponse, signal),
    placeholderData: keepPreviousData,
  });
export const usePartsList = (siteId: string, f: ListQuery) => useQuery(partsListQueryOptions(siteId, f));

export const useLineDetail = (siteId: string, lineId: string) =>
  useQuery({
    queryKey: partsKeys.detail(siteId, lineId),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/${lineId}`, lineDetailResponse, signal),
  });

/**
 * Every link of a line (withdrawn ones too), a page of LINE_LINKS_PAGE at a time: the line's page reads the
 * first page when it opens and the next when the person asks for more. A row of the list carries only its
 * first few (LINKS_IN_ROW) and their count.
 */
export const useLineLinks = (siteId: string, lineId: string) =>
  useInfiniteQuery({
    queryKey: partsKeys.links(siteId, lineId),
    queryFn: ({ pageParam, signal }) =>
      api.get(
        `${base(siteId)}/${lineId}/links${qs({ page: pageParam, size: LINE_LINKS_PAGE })}`,
        lineLinksResponse,
        signal,
      ),
    initialPageParam: 1,
    getNextPageParam: (last) => (last.page * last.size < last.total ? last.page + 1 : undefined),
  });

const lineResponse = z.object({ line: lineSchema });

/** Every write invalidates the site's parts queries: the list, the line and the budget move together. */
function useWrite<TVars, TData>(siteId: string, fn: (v: TVars) => Promise<TData>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => qc.invalidateQueries({ queryKey: partsKeys.all(siteId) }) });
}

export const useCreateLine = (siteId: string) =>
  useWrite(siteId, (b: CreateLineBody) => api.send("POST", base(siteId), b, lineResponse).then((d) => d.line));
export const useUpdateLine = (siteId: string, lineId: string) =>
  useWrite(siteId, (b: UpdateLineBody) => api.send("PATCH", `${base(siteId)}/${lineId}`, b, lineResponse));
export const useSetHeritageRule = (siteId: string, lineId: string) =>
  useWrite(siteId, (b: { version: number; heritageRule: HeritageRule }) =>
    api.send("PUT", `${base(siteId)}/${lineId}/heritage-rule`, b, lineResponse),
  );
export const useMoveStatus = (siteId: string, lineId: string) =>
  useWrite(siteId, (b: StatusBody) => api.send("POST", `${base(siteId)}/${lineId}/status`, b, lineResponse));
export const useAddLead = (siteId: string, lineId: string) =>
  useWrite(siteId, (b: LeadBody) =>
    api.send("POST", `${base(siteId)}/${lineId}/leads`, b, z.object({ lead: leadSchema })),
  );
export const useUpdateLead = (siteId: string) =>
  useWrite(siteId, (b: { leadId: string; version: number } & Partial<LeadBody>) => {
    const { leadId, ...body } = b;
    return api.send("PATCH", `${base(siteId)}/leads/${leadId}`, body, z.object({ ok: z.boolean() }));
  });

const linksResponse = z.object({ links: z.array(shareLinkSchema) });
export const useShareLinks = (siteId: string, enabled: boolean) =>
  useQuery({
    queryKey: partsKeys.shareLinks(siteId),
    queryFn: ({ signal }) => api.get(`${base(siteId)}/share-links`, linksResponse, signal),
    enabled,
  });
export const useCreateShareLink = (siteId: string) =>
  useWrite(siteId, (b: { label: string }) =>
    api.send(
      "POST",
      `${base(siteId)}/share-links`,
      b,
      z.object({ link: shareLinkSchema, token: z.string(), url: z.string() }),
    ),
  );
export const useRevokeShareLink = (siteId: string) =>
  useWrite(siteId, (id: string) => api.send("DELETE", `${base(siteId)}/share-links/${id}`, undefined, linksResponse));

export const useSharedList = (token: string) =>
  useQuery({
    queryKey: partsKeys.shared(token),
    queryFn: ({ signal }) => api.get(`/api/share/parts/${token}`, sharedListResponse, signal),
    retry: false,
  });

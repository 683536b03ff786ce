import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api, ApiError, qs } from "../../lib/api-client";
import { tagLookupResponse, type SurveyReportQuery } from "../../schemas/reports";
import type { LabelSheetId } from "../../domain/label-sheets";
import { pageCounter } from "./pdf-progress";

export const reportKeys = {
  tag: (tag: string) => ["tags", tag.toLowerCase()] as const,
};

/** The survey's options as query text: the direct download's URL and the background job's params alike. */
export function surveyReportParams(q: SurveyReportQuery): Record<string, string> {
  const p: Record<string, string> = { photos: q.photos, paper: q.paper };
  if (q.sections) p.sections = q.sections.join(",");
  if (q.boardId) p.boardId = q.boardId;
  if (q.from) p.from = q.from;
  if (q.to) p.to = q.to;
  return p;
}

export const surveyReportUrl = (siteId: string, q: SurveyReportQuery) =>
  `/api/sites/${siteId}/reports/survey.pdf${qs(surveyReportParams(q))}`;

export interface LabelOptions {
  boardId?: string;
  sectionId?: string;
  positionIds?: string[];
  sheet: LabelSheetId;
  start: number;
  copies: number;
}
export const labelsUrl = (siteId: string, o: LabelOptions) =>
  `/api/sites/${siteId}/labels.pdf${qs({ boardId: o.boardId, sectionId: o.sectionId, positionIds: o.positionIds?.join(","), sheet: o.sheet, start: o.start, copies: o.copies })}`;

export interface Progress {
  pages: number;
  totalPages: number | null;
  bytes: number;
}

async function errorOf(res: Response) {
  const body = (await res.json().catch(() => null)) as {
    error?: { code?: string; message?: string; fields?: Record<string, string> };
  } | null;
  return new ApiError(
    res.status,
    body?.error?.code ?? `http_${res.status}`,
    body?.error?.message ?? `The server answered ${res.status}.`,
    body?.error?.fields,
  );
}

/**
 * Downloads a PDF while it renders, reporting pages received of the total the server
 * announced (X-Report-Pages) — the server numbers the pages before it streams them.
 */
export async function fetchPdf(url: string, onProgress: (p: Progress) => void, signal?: AbortSignal): Promise<Blob> {
  let res: Response;
  try {
    res = await fetch(url, { credentials: "same-origin", signal });
  } catch (e) {
    if ((e as Error).name === "AbortError") throw e;
    throw new ApiError(0, "offline", "Tideline's server cannot be reached. Check the connection and try again.");
  }
  if (!res.ok) throw await errorOf(res);
  const total = Number(res.headers.get("X-Report-Pages")) || null;
  const counter = pageCounter();
  const parts: Uint8Array[] = [];
  let bytes = 0;
  const reader = res.body!.getReader();
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    parts.push(value);
    bytes += value.length;
    onProgress({ pages: counter.push(value), totalPages: total, bytes });
  }
  if (total && counter.pages < total)
    throw new ApiError(0, "cut_off", "The report stopped before its last page. Try again.");
  return new Blob(parts as BlobPart[], { type: "application/pdf" });
}

const assignResponse = z.object({
  assigned: z.array(z.object({ positionId: z.string(), tagNumber: z.string() })),
  alreadyTagged: z.array(z.object({ positionId: z.string(), tagNumber: z.string() })),
  withoutComponent: z.array(z.string()),
});

export const useAssignTags = (siteId: string) => {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (positionIds: string[]) =>
      api.send("POST", `/api/sites/${siteId}/tags/assign`, { positionIds }, assignResponse),
    // A tag looked up before it was given ("no such tag") is answered again.
    onSuccess: () => qc.invalidateQueries({ queryKey: ["tags"] }),
  });
};

export const useTagLookup = (tag: string) =>
  useQuery({
    queryKey: reportKeys.tag(tag),
    queryFn: ({ signal }) => api.get(`/api/tags/${encodeURIComponent(tag)}`, tagLookupResponse, signal),
    retry: false,
    enabled: !!tag,
  });

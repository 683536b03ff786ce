import { afterEach, describe, expect, it, vi } from "vitest";
import { z } from "zod";
import { earlyReads } from "../../src/app/router";
import { sessionQueryOptions } from "../../src/features/auth/api";
import { defectChoicesOptions, defectListOptions } from "../../src/features/defects/api";
import { apiQuery, localToday, readState } from "../../src/features/defects/url-state";
import { partsListQueryOptions } from "../../src/features/parts/api";
import { listQuery as partsQuery } from "../../src/schemas/parts";
import { boardQueryOptions, boardsQueryOptions, overviewQueryOptions } from "../../src/features/inventory/api";
import { siteQueryOptions } from "../../src/features/sites/api";
import { latestGroundQueryOptions } from "../../src/features/readings/latest-ground-check";
import { api } from "../../src/lib/api-client";
import { startRead } from "../../src/lib/early-reads";

const S = "0b7c4a1e-2f7d-4c55-9a43-6c1d2e3f4a5b";
const B = "5e1f0c2d-8a9b-4c3d-9e8f-7a6b5c4d3e2f";

/** The URLs a query's queryFn asks for, for its first page (its answer is refused: only the address matters here). */
async function urlsOf(queryFn: unknown): Promise<string[]> {
  const asked: string[] = [];
  vi.stubGlobal("fetch", async (url: string) => {
    asked.push(url);
    return new Response("{}", { status: 500 });
  });
  await (queryFn as (c: unknown) => Promise<unknown>)({ signal: new AbortController().signal, pageParam: null }).catch(
    () => undefined,
  );
  vi.unstubAllGlobals();
  return asked;
}

describe("reads started at page start (src/lib/early-reads.ts, src/app/router.tsx)", () => {
  afterEach(() => vi.unstubAllGlobals());

  it("names, for an address, the reads its routes make, outermost first", () => {
    expect(earlyReads(`/sites/${S}/boards/${B}`)).toEqual([
      "/api/session",
      `/api/sites/${S}`,
      `/api/sites/${S}/boards/${B}`,
      `/api/sites/${S}/boards/${B}/ground-checks/latest`,
    ]);
    expect(earlyReads(`/sites/${S}`)).toEqual(["/api/session", `/api/sites/${S}`, `/api/sites/${S}/overview`]);
    expect(earlyReads("/sign-in")).toEqual([]);
  });

  it("names a list's first view only when the address asks for nothing else (no zod at page start)", () => {
    const today = localToday();
    const first = [`/api/sites/${S}/defects?today=${today}`, `/api/sites/${S}/defects/options`];
    expect(earlyReads(`/sites/${S}/defects`).slice(2)).toEqual(first);
    // Columns hidden or reordered: the same rows.
    expect(earlyReads(`/sites/${S}/defects?hide=board&cols=title,status`).slice(2)).toEqual(first);
    // A filter, a sort or a page: read by the route's loader with the feature's schemas, once they have arrived.
    expect(earlyReads(`/sites/${S}/defects?severity=high`).slice(2)).toEqual([`/api/sites/${S}/defects/options`]);
    expect(earlyReads(`/sites/${S}/defects?page=2`).slice(2)).toEqual([`/api/sites/${S}/defects/options`]);
    expect(earlyReads(`/sites/${S}/parts`).slice(2)).toEqual([`/api/sites/${S}/parts?status=open`]);
    expect(earlyReads(`/sites/${S}/parts?status=all`).slice(2)).toEqual([]);
  });

  it("each is the URL the page's own query asks for, so the page takes it up instead of asking again", async () => {
    expect(await urlsOf(sessionQueryOptions().queryFn)).toEqual(["/api/session"]);
    expect(await urlsOf(siteQueryOptions(S).queryFn)).toEqual(earlyReads(`/sites/${S}/members`).slice(1));
    expect(await urlsOf(overviewQueryOptions(S).queryFn)).toEqual(earlyReads(`/sites/${S}`).slice(2));
    expect(await urlsOf(boardsQueryOptions(S).queryFn)).toEqual(earlyReads(`/sites/${S}/boards`).slice(2));
    expect([
      ...(await urlsOf(boardQueryOptions(S, B).queryFn)),
      ...(await urlsOf(latestGroundQueryOptions(S, B).queryFn)),
    ]).toEqual(earlyReads(`/sites/${S}/boards/${B}`).slice(2));
    // The register and the wanted list as their pages ask with an address of no query (url-state.ts, the parts
    // list's useFilterParams): the same URLs, in the same order.
    const register = apiQuery(readState(new URLSearchParams()), localToday());
    expect([
      ...(await urlsOf(defectListOptions(S, register).queryFn)),
      ...(await urlsOf(defectChoicesOptions(S).queryFn)),
    ]).toEqual(earlyReads(`/sites/${S}/defects`).slice(2));
    expect(await urlsOf(partsListQueryOptions(S, partsQuery.parse({})).queryFn)).toEqual(
      earlyReads(`/sites/${S}/parts`).slice(2),
    );
  });

  it("api.get takes a started answer once; the next read and any read after a write ask the server", async () => {
    let calls = 0;
    vi.stubGlobal("fetch", async () => {
      calls += 1;
      return new Response(JSON.stringify({ n: calls }), { status: 200 });
    });
    const answer = z.object({ n: z.number() });
    startRead("/api/x");
    expect(calls).toBe(1);
    expect(await api.get("/api/x", answer)).toEqual({ n: 1 });
    expect(calls).toBe(1);
    expect(await api.get("/api/x", answer)).toEqual({ n: 2 });
    startRead("/api/y");
    await api.send("POST", "/api/z", {}, answer);
    expect(await api.get("/api/y", answer)).toEqual({ n: 5 });
  });
});

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { QueryClient, QueryObserver } from "@tanstack/react-query";
import type { PersistedClient } from "@tanstack/react-query-persist-client";
import {
  MAX_BYTES,
  boundedSerialize,
  serializeBounded,
  keptState,
  serializeInPieces,
  shouldKeepQuery,
} from "../../src/app/persist";

type Q = PersistedClient["clientState"]["queries"][number];
const query = (key: unknown[], state: Partial<Q["state"]>): Q =>
  ({
    queryKey: key,
    queryHash: JSON.stringify(key),
    dehydratedAt: 1,
    state: {
      data: undefined,
      dataUpdateCount: 1,
      dataUpdatedAt: 1,
      error: null,
      errorUpdateCount: 0,
      errorUpdatedAt: 0,
      fetchFailureCount: 0,
      fetchFailureReason: null,
      fetchMeta: null,
      isInvalidated: false,
      status: "success",
      fetchStatus: "idle",
      ...state,
    },
  }) as Q;
const client = (queries: Q[]): PersistedClient => ({
  timestamp: 1,
  buster: "t",
  clientState: { queries, mutations: [] },
});

describe("the reads kept on the phone (src/app/persist.ts)", () => {
  it("keeps reads of the field kinds that hold data, and nothing else", () => {
    expect(shouldKeepQuery(query(["readings", "s", "board", "b"], { data: { insulation: [] } }))).toBe(true);
    expect(shouldKeepQuery(query(["readings", "s", "board", "b"], { status: "pending", data: undefined }))).toBe(false);
    expect(shouldKeepQuery(query(["parts", "s", "list"], { data: { lines: [] } }))).toBe(false);
    expect(shouldKeepQuery(query(["prepared-files", "notices"], { data: [] }))).toBe(false);
  });

  it("keeps a read whose last refetch failed, as the data it had (dead Wi-Fi must not drop it)", () => {
    const failed = query(["rts", "s", "board", "b"], {
      status: "error",
      data: { stages: [1] },
      error: { message: "Failed to fetch" } as Error,
      fetchFailureCount: 3,
    });
    expect(shouldKeepQuery(failed)).toBe(true);
    const kept = JSON.parse(boundedSerialize(client([failed]))) as PersistedClient;
    expect(kept.clientState.queries[0].state).toMatchObject({
      status: "success",
      error: null,
      fetchFailureCount: 0,
      data: { stages: [1] },
    });
  });

  it("stays under its bound: newest reads first, an older one that does not fit is left out", () => {
    const big = "x".repeat(Math.floor(MAX_BYTES * 0.6));
    const older = query(["inventory", "s", "board", "old"], { data: big, dataUpdatedAt: 1 });
    const newer = query(["inventory", "s", "board", "new"], { data: big, dataUpdatedAt: 2 });
    const small = query(["auth", "session"], { data: { user: "v" }, dataUpdatedAt: 0 });
    const text = boundedSerialize(client([older, newer, small]));
    expect(text.length).toBeLessThanOrEqual(MAX_BYTES);
    const keys = (JSON.parse(text) as PersistedClient).clientState.queries.map((q) => q.queryKey[3] ?? q.queryKey[1]);
    expect(keys).toEqual(["new", "session"]);
  });

  it('says which reads one write kept and which the bound left out (the sync bar\'s "kept for no signal")', () => {
    const big = "x".repeat(Math.floor(MAX_BYTES * 0.6));
    const older = query(["inventory", "s", "board", "old"], { data: big, dataUpdatedAt: 1 });
    const newer = query(["inventory", "s", "board", "new"], { data: big, dataUpdatedAt: 2 });
    const { text, index } = serializeBounded(client([older, newer]));
    expect(text).toBe(boundedSerialize(client([older, newer])));
    expect([...index.kept]).toEqual([[newer.queryHash, 2]]);
    expect([...index.tooLarge]).toEqual([[older.queryHash, 1]]);
  });

  it("writes the same JSON as stringifying the kept client whole (each query is stringified once)", () => {
    const a = query(["defects", "s", { q: '\u0000 "queries":[] ,]' }], {
      data: { rows: [1, "a,b"] },
      dataUpdatedAt: 5,
    });
    const b = query(["readings", "s"], { data: [{ v: 1.5 }], dataUpdatedAt: 9 });
    const c = client([a, b]);
    const whole = JSON.stringify({ ...c, clientState: { ...c.clientState, queries: [b, a], mutations: [] } });
    expect(boundedSerialize(c)).toBe(whole);
    expect(boundedSerialize(client([]))).toBe(
      JSON.stringify({ ...client([]), clientState: { queries: [], mutations: [] } }),
    );
  });

  it("writes the same text in pieces as at once, whatever the data (fast-check against JSON.stringify)", async () => {
    // Values JSON writes, leaves out (undefined, functions in objects) or writes as null (in arrays), nested deep and
    // in arrays long enough to be cut into pieces; a piece of 0 ms pauses before every item.
    const leaf = fc.oneof(
      fc.jsonValue({ maxDepth: 1 }),
      fc.constant(undefined),
      fc.constant(() => 1),
    );
    const value = fc.letrec((tie) => ({
      node: fc.oneof({ depthSize: "small" }, leaf, tie("arr"), tie("obj")),
      arr: fc.array(tie("node"), { maxLength: 40 }),
      obj: fc.dictionary(fc.string(), tie("node"), { maxKeys: 6 }),
    })).node;
    await fc.assert(
      fc.asyncProperty(fc.array(value, { minLength: 1, maxLength: 4 }), async (datas) => {
        const queries = datas.map((data, i) =>
          query(["inventory", "s", "board", String(i)], { data: data ?? null, dataUpdatedAt: i }),
        );
        const c = client(queries);
        const whole = JSON.stringify({
          ...c,
          clientState: { ...c.clientState, queries: [...queries].reverse(), mutations: [] },
        });
        expect((await serializeInPieces(c, 0)).text).toBe(whole);
        expect(boundedSerialize(c)).toBe(whole);
      }),
      { numRuns: 60 },
    );
  });

  it("reuses an unchanged read's text but writes its new state (the read refetched, then invalidated)", async () => {
    const data = { positions: Array.from({ length: 100 }, (_, i) => ({ id: `p${i}`, grade: i % 5 })) };
    const first = query(["inventory", "s", "board", "b"], { data, dataUpdatedAt: 5 });
    const once = await serializeInPieces(client([first]), 0);
    const later = query(["inventory", "s", "board", "b"], { data, dataUpdatedAt: 5, isInvalidated: true });
    const c = client([later]);
    const text = (await serializeInPieces(c, 0)).text;
    expect(text).not.toBe(once.text);
    expect(text).toBe(JSON.stringify({ ...c, clientState: { ...c.clientState, queries: [later], mutations: [] } }));
    // a new data object (a refetch) is written as it is now, never as the text of the old one
    const changed = query(["inventory", "s", "board", "b"], {
      data: { positions: [{ id: "p0", grade: 9 }] },
      dataUpdatedAt: 6,
    });
    expect(JSON.parse(boundedSerialize(client([changed]))).clientState.queries[0].state.data).toEqual({
      positions: [{ id: "p0", grade: 9 }],
    });
  });

  it("a read the page no longer shows (a tab left) still counts as not kept until a copy newer than it is written", () => {
    // No copy has been written in this test process (nothing stored): every kept read with data is still to keep.
    const qc = new QueryClient();
    qc.setQueryData(["inventory", "s", "custody-options", "c"], { choices: ["bench"] }); // no observer: a tab left
    const shown = new QueryObserver(qc, { queryKey: ["inventory", "s", "board", "b"], enabled: false });
    const stop = shown.subscribe(() => {});
    qc.setQueryData(["inventory", "s", "board", "b"], { positions: [] });
    qc.setQueryData(["parts", "s", "list"], { rows: [] }); // not a kept root: never counted
    expect(keptState(qc)).toEqual({ keeping: 2, tooLarge: 0, kept: 0 });
    stop();
    qc.clear();
  });
});

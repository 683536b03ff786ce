import { describe, expect, it } from "vitest";
import type { PersistedClient } from "@tanstack/react-query-persist-client";
import { MAX_BYTES, boundedSerialize, serializeBounded, shouldKeepQuery } from "../../src/app/persist";

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
});

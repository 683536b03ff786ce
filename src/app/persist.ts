/**
 * Reads kept on the phone (issue 16): TanStack Query's own persistence (react-query-persist-client
 * with the async-storage persister) writes the query cache to IndexedDB through idb-keyval, so the
 * boards, positions, grades, dispositions, open defects, readings and watch checks a person has
 * opened show with no signal. Bounded: only those kinds of query, only successful ones, at most
 * MAX_BYTES (newest first), for at most MAX_AGE; removed at sign-out.
 */
import { createAsyncStoragePersister } from "@tanstack/query-async-storage-persister";
import type { PersistedClient } from "@tanstack/react-query-persist-client";
import type { Query } from "@tanstack/react-query";
import { createStore, del, get, set } from "idb-keyval";

export const MAX_AGE_MS = 3 * 24 * 3600_000;
export const MAX_BYTES = 8 * 1024 * 1024;
/** Query key roots worth having in a hull with no signal. */
const KEPT_ROOTS = new Set(["auth", "sites", "inventory", "readings", "rts", "defects", "photos"]);

const idb = typeof indexedDB === "undefined" ? null : createStore("tideline-cache", "queries");

export const shouldKeepQuery = (q: Query) => q.state.status === "success" && KEPT_ROOTS.has(String(q.queryKey[0]));

/** Newest queries first until MAX_BYTES: a 500-position board fits many times over (DEVELOPERS.md). */
export function boundedSerialize(client: PersistedClient): string {
  const queries = [...client.clientState.queries].sort((a, b) => b.state.dataUpdatedAt - a.state.dataUpdatedAt);
  const kept: typeof queries = [];
  let bytes = 200;
  for (const q of queries) {
    const size = JSON.stringify(q).length;
    if (bytes + size > MAX_BYTES) continue;
    bytes += size;
    kept.push(q);
  }
  return JSON.stringify({ ...client, clientState: { ...client.clientState, queries: kept, mutations: [] } });
}

export const persister = createAsyncStoragePersister({
  storage: idb
    ? {
        getItem: (k: string) => get<string>(k, idb).then((v) => v ?? null),
        setItem: (k: string, v: string) => set(k, v, idb),
        removeItem: (k: string) => del(k, idb),
      }
    : null,
  key: "tideline-query-cache",
  throttleTime: 1000,
  serialize: boundedSerialize,
});

/** Sign-out: nothing of this person's reads stays on the phone. */
export async function forgetPersistedReads() {
  await persister.removeClient();
}

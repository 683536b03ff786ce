/**
 * Reads kept on the phone, for a crew with no signal: TanStack Query's own persistence (react-query-persist-client
 * with the async-storage persister) writes the query cache to IndexedDB through idb-keyval, so the
 * boards, positions, grades, dispositions, open defects, readings and watch checks a person has
 * opened show with no signal. Bounded: only those kinds of query, only ones holding data, at most
 * MAX_BYTES (newest first), for at most MAX_AGE; removed at sign-out.
 *
 * The persister writes at most once a second. A page closed, reloaded or sent to the background
 * inside that second (the phone locked on the way down the ladder, the camera opened) used to lose
 * what it had just read: the newest copy is now also written at once when the page is hidden or
 * left (`pagehide`, `visibilitychange`), and `keptOnPhone()` says whether a read is written yet.
 */
import { createAsyncStoragePersister } from "@tanstack/query-async-storage-persister";
import type { PersistedClient, Persister } from "@tanstack/react-query-persist-client";
import type { Query, QueryClient } from "@tanstack/react-query";
import { useSyncExternalStore } from "react";
import { createStore, del, get, set } from "idb-keyval";

export const MAX_AGE_MS = 3 * 24 * 3600_000;
export const MAX_BYTES = 8 * 1024 * 1024;
/** Query key roots worth having in a hull with no signal. */
export const KEPT_ROOTS = new Set(["auth", "sites", "inventory", "readings", "rts", "defects", "photos"]);
/** IndexedDB database, store and key of the kept reads (the size measure in DEVELOPERS.md reads this entry). */
export const CACHE_DB = "tideline-cache";
export const CACHE_STORE = "queries";
export const CACHE_KEY = "tideline-query-cache";

const idb = typeof indexedDB === "undefined" ? null : createStore(CACHE_DB, CACHE_STORE);

/**
 * Kept: a read of a kept kind that holds data. A read whose last refetch failed (a dead Wi-Fi that
 * still says "connected") keeps its older data and is kept too: leaving it out would drop from the
 * phone exactly what the person will need in the hull.
 */
export const shouldKeepQuery = (q: Pick<Query, "queryKey" | "state">) =>
  q.state.data !== undefined && KEPT_ROOTS.has(String(q.queryKey[0]));

type Dehydrated = PersistedClient["clientState"]["queries"][number];

/** A kept read comes back as the data it had: a failed refetch's error is not kept with it. */
function asKept(q: Dehydrated): Dehydrated {
  if (q.state.status !== "error") return q;
  return {
    ...q,
    state: { ...q.state, status: "success", error: null, fetchFailureCount: 0, fetchFailureReason: null },
  };
}

/**
 * What one write put on the phone: each read's hash with the time of the data written
 * (`dataUpdatedAt`), and the reads left out because the bound was reached.
 */
export interface KeptIndex {
  kept: Map<string, number>;
  tooLarge: Map<string, number>;
}
const emptyIndex = (): KeptIndex => ({ kept: new Map(), tooLarge: new Map() });

/**
 * Newest queries first until MAX_BYTES; what does not fit is left out (and counted as too large).
 * Each query is turned into JSON once (its size is that text's length) and the pieces are joined into
 * the client's own JSON: stringifying the kept queries a second time doubled the main thread's work
 * on every save (up to 8 MB of text).
 */
export function serializeBounded(client: PersistedClient): { text: string; index: KeptIndex } {
  const queries = [...client.clientState.queries].sort((a, b) => b.state.dataUpdatedAt - a.state.dataUpdatedAt);
  const kept: string[] = [];
  const index = emptyIndex();
  let bytes = 200;
  for (const q of queries) {
    const json = JSON.stringify(asKept(q));
    if (bytes + json.length > MAX_BYTES) {
      index.tooLarge.set(q.queryHash, q.state.dataUpdatedAt);
      continue;
    }
    bytes += json.length;
    kept.push(json);
    index.kept.set(q.queryHash, q.state.dataUpdatedAt);
  }
  // The client without its queries, with a marker where they go: the marker is the only string in that
  // shell that could be it (the shell holds the buster, the time stamp and no data).
  const shell = JSON.stringify({
    ...client,
    clientState: { ...client.clientState, queries: [QUERIES_HERE], mutations: [] },
  });
  const marker = JSON.stringify(QUERIES_HERE);
  const at = shell.indexOf(marker);
  const text = shell.slice(0, at) + kept.join(",") + shell.slice(at + marker.length);
  return { text, index };
}
const QUERIES_HERE = "\u0000tideline-kept-queries\u0000";

/**
 * serializeBounded with a User Timing measure around it (`KEEP_MEASURE`, its detail the bytes and reads kept):
 * the main thread's cost of each write, which `npm run bench`'s board case reads from the page.
 */
function timedSerialize(client: PersistedClient) {
  const start = performance.now();
  const out = serializeBounded(client);
  try {
    // Only the newest stays in the page's timeline (a PerformanceObserver sees every one): a day of writes
    // once a second would otherwise pile up there.
    performance.clearMeasures(KEEP_MEASURE);
    performance.measure(KEEP_MEASURE, { start, detail: { bytes: out.text.length, kept: out.index.kept.size } });
  } catch {
    // a browser without User Timing Level 3 writes the same text, unmeasured
  }
  return out;
}
/** The User Timing measure of one write's serialization. */
export const KEEP_MEASURE = "tideline:keep-reads";

/** The stored text of the kept reads: a 500-position board fits many times over (DEVELOPERS.md). */
export const boundedSerialize = (client: PersistedClient): string => serializeBounded(client).text;

// ---- what is on the phone now (written, not just handed to the writer) ----
let committed: KeptIndex = emptyIndex();
/** The text handed to storage last and its index: committed once IndexedDB has it. */
let handedOver: { text: string; index: KeptIndex } | null = null;
const keptListeners = new Set<() => void>();
function commit(index: KeptIndex) {
  committed = index;
  for (const l of keptListeners) l();
}

const storage = idb
  ? {
      getItem: (k: string) => get<string>(k, idb).then((v) => v ?? null),
      setItem: async (k: string, v: string) => {
        const index = handedOver?.text === v ? handedOver.index : null;
        await set(k, v, idb);
        if (index) commit(index);
      },
      removeItem: (k: string) => del(k, idb),
    }
  : null;

/** Which copy each save handed over, and the newest one given to storage: a flush writes only what is newer. */
const seqOf = new WeakMap<PersistedClient, number>();
let lastSeq = 0;
let writtenSeq = 0;
let latest: PersistedClient | null = null;

const throttled = createAsyncStoragePersister({
  storage,
  key: CACHE_KEY,
  throttleTime: 1000,
  serialize: (client) => {
    writtenSeq = Math.max(writtenSeq, seqOf.get(client) ?? 0);
    handedOver = timedSerialize(client);
    return handedOver.text;
  },
});

export const persister: Persister = {
  persistClient: (client) => {
    seqOf.set(client, ++lastSeq);
    latest = client;
    return throttled.persistClient(client);
  },
  restoreClient: async () => {
    const c = await throttled.restoreClient();
    if (c) {
      const index = emptyIndex();
      for (const q of c.clientState.queries) index.kept.set(q.queryHash, q.state.dataUpdatedAt);
      commit(index);
    }
    return c;
  },
  removeClient: async () => {
    latest = null;
    handedOver = null;
    await throttled.removeClient();
    commit(emptyIndex());
  },
};

/** Writes the newest copy now, without waiting for the throttle (the page is being hidden or left). */
export async function flushPersistedReads(): Promise<void> {
  const client = latest;
  if (!client || !storage || (seqOf.get(client) ?? 0) <= writtenSeq) return;
  writtenSeq = seqOf.get(client)!;
  handedOver = timedSerialize(client);
  await storage.setItem(CACHE_KEY, handedOver.text);
}

/**
 * The reads the open page uses that are not on the phone yet (`keeping`: being read, or read but
 * not written — the write is throttled to once a second), and those left out because the bound was
 * reached (`tooLarge`). A person about to go below decks waits for `keeping` to reach 0; the sync
 * bar says it, and e2e tests wait on it (`expectPageKept`).
 */
export function keptState(qc: QueryClient): KeptState {
  let keeping = 0;
  let tooLarge = 0;
  let kept = 0;
  for (const q of qc.getQueryCache().getAll()) {
    if (!KEPT_ROOTS.has(String(q.queryKey[0])) || !q.getObserversCount()) continue;
    if (q.state.data === undefined) {
      if (q.state.fetchStatus === "fetching") keeping += 1;
      continue;
    }
    if (committed.kept.get(q.queryHash) === q.state.dataUpdatedAt) kept += 1;
    else if (committed.tooLarge.get(q.queryHash) === q.state.dataUpdatedAt) tooLarge += 1;
    else keeping += 1;
  }
  return { keeping, tooLarge, kept };
}

/** Told when a write reaches IndexedDB (with the query cache's own events, `keptState` is current). */
export function subscribeKept(l: () => void): () => void {
  keptListeners.add(l);
  return () => void keptListeners.delete(l);
}

export interface KeptState {
  keeping: number;
  tooLarge: number;
  kept: number;
}
/** `keptState` for React: follows the query cache and each write to IndexedDB. */
export function useKeptState(qc: QueryClient): KeptState {
  const key = useSyncExternalStore(
    (l) => {
      const stopCache = qc.getQueryCache().subscribe(l);
      const stopKept = subscribeKept(l);
      return () => {
        stopCache();
        stopKept();
      };
    },
    () => {
      const k = keptState(qc);
      return `${k.keeping}:${k.tooLarge}:${k.kept}`;
    },
  );
  const [keeping, tooLarge, kept] = key.split(":").map(Number);
  return { keeping, tooLarge, kept };
}

/** Sign-out: nothing of this person's reads stays on the phone. */
export async function forgetPersistedReads() {
  await persister.removeClient();
}

if (typeof window !== "undefined") {
  window.addEventListener("pagehide", () => void flushPersistedReads());
  document.addEventListener("visibilitychange", () => {
    if (document.visibilityState === "hidden") void flushPersistedReads();
  });
}

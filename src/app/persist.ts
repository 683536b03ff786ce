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
  /** When the written copy was taken (the persisted client's timestamp): a read newer than it is not on the phone. */
  at: number;
}
const emptyIndex = (at = 0): KeptIndex => ({ kept: new Map(), tooLarge: new Map(), at });

/**
 * Where the main thread's time goes while a write is cut into pieces: `spent()` says the current piece has had its
 * share, `pause()` lets the page run (input, rendering) before the next piece. A plain call (`flushPersistedReads`,
 * the tests) never pauses.
 */
interface Slicer {
  spent(): boolean;
  pause(): Promise<void>;
  /** Ends the current piece; returns the longest piece (its start and ms) and the main thread's ms in all pieces. */
  end(): { start: number; longest: number; busy: number; pieces: number };
}
/** How long one piece of a write may hold the main thread, ms (a frame's share; the 4 × slower phone counts). */
const SLICE_MS = 8;
const idle = (): Promise<void> =>
  new Promise((resolve) => {
    if (typeof requestIdleCallback === "function") requestIdleCallback(() => resolve(), { timeout: 1000 });
    else setTimeout(resolve, 0);
  });
function slicer(sliceMs = SLICE_MS): Slicer {
  let since = performance.now();
  const longest = { start: since, ms: 0 };
  let busy = 0;
  let pieces = 0;
  const close = () => {
    const ms = performance.now() - since;
    busy += ms;
    pieces += 1;
    if (ms > longest.ms) Object.assign(longest, { start: since, ms });
  };
  return {
    spent: () => performance.now() - since > sliceMs,
    pause: async () => {
      close();
      await idle();
      since = performance.now();
    },
    end: () => {
      close();
      return { start: longest.start, longest: longest.ms, busy, pieces };
    },
  };
}

const isPlainObject = (v: object) => {
  const proto = Object.getPrototypeOf(v) as unknown;
  return (proto === Object.prototype || proto === null) && typeof (v as { toJSON?: unknown }).toJSON !== "function";
};
/** Array items and object values JSON leaves out (object) or writes as null (array). */
const unwritable = (v: unknown) => v === undefined || typeof v === "function" || typeof v === "symbol";

/**
 * JSON.stringify(value), the same text, pausing between the items of large arrays and objects (a board's 500
 * tiles) whenever the piece's time is spent. Anything but a plain array or object is stringified whole.
 */
async function stringifySliced(value: unknown, s: Slicer): Promise<string> {
  if (value === null || typeof value !== "object") return JSON.stringify(value);
  const parts: string[] = [];
  if (Array.isArray(value)) {
    // A short array of plain values is cheap whole; a short one of objects (a board read in pages) is not.
    if (
      typeof (value as { toJSON?: unknown }).toJSON === "function" ||
      (value.length < 32 && (value as unknown[]).every((v) => v === null || typeof v !== "object"))
    )
      return JSON.stringify(value);
    for (const item of value as unknown[]) {
      if (s.spent()) await s.pause();
      parts.push(unwritable(item) ? "null" : await stringifySliced(item, s));
    }
    return `[${parts.join(",")}]`;
  }
  if (!isPlainObject(value)) return JSON.stringify(value);
  for (const key of Object.keys(value)) {
    const item = (value as Record<string, unknown>)[key];
    if (unwritable(item)) continue;
    if (s.spent()) await s.pause();
    parts.push(`${JSON.stringify(key)}:${await stringifySliced(item, s)}`);
  }
  return `{${parts.join(",")}}`;
}

/**
 * The JSON of each read's data, kept as long as that data object lives: the query cache gives a read new data as a
 * new object, so an unchanged read (the session, the site, a board read a minute ago) is not stringified again on
 * the next write — only its few state fields are.
 */
const dataJson = new WeakMap<object, string>();
/** Stands for the data (or the queries) in a shell stringified without them; random, so no read's text holds it. */
const marker = (what: string) => `\u0000tideline-${what}-${Math.random().toString(36).slice(2)}\u0000`;
const DATA_HERE = marker("data");
const QUERIES_HERE = marker("queries");
/** `shell` (JSON holding the marker `here` once, as a string) with `text` in the marker's place. */
function splice(shell: string, here: string, text: string) {
  const m = JSON.stringify(here);
  const at = shell.indexOf(m);
  return shell.slice(0, at) + text + shell.slice(at + m.length);
}

/** One kept read as JSON: the same text as JSON.stringify(asKept(q)), its data's text reused when unchanged. */
function queryJson(q: Dehydrated): string {
  const kept = asKept(q);
  const data: unknown = kept.state.data;
  if (data === null || typeof data !== "object") return JSON.stringify(kept);
  let json = dataJson.get(data);
  if (json === undefined) {
    json = JSON.stringify(data);
    dataJson.set(data, json);
  }
  return splice(JSON.stringify({ ...kept, state: { ...kept.state, data: DATA_HERE } }), DATA_HERE, json);
}

/** Stringifies, piece by piece, the data of every read not yet stringified, so serializeBounded finds it ready. */
async function prepareSliced(client: PersistedClient, s: Slicer): Promise<void> {
  for (const q of client.clientState.queries) {
    const data: unknown = q.state.data;
    if (data === null || typeof data !== "object" || dataJson.has(data)) continue;
    if (s.spent()) await s.pause();
    dataJson.set(data, await stringifySliced(data, s));
  }
}

/**
 * Newest queries first until MAX_BYTES; what does not fit is left out (and counted as too large).
 * Each query is turned into JSON once (its size is that text's length) and the pieces are joined into
 * the client's own JSON: stringifying the kept queries a second time doubled the main thread's work
 * on every save (up to 8 MB of text). A read's data already stringified (prepareSliced, or an earlier
 * write of the same data) is not stringified again.
 */
export function serializeBounded(client: PersistedClient): { text: string; index: KeptIndex } {
  const queries = [...client.clientState.queries].sort((a, b) => b.state.dataUpdatedAt - a.state.dataUpdatedAt);
  const kept: string[] = [];
  const index = emptyIndex(client.timestamp);
  let bytes = 200;
  for (const q of queries) {
    const json = queryJson(q);
    if (bytes + json.length > MAX_BYTES) {
      index.tooLarge.set(q.queryHash, q.state.dataUpdatedAt);
      continue;
    }
    bytes += json.length;
    kept.push(json);
    index.kept.set(q.queryHash, q.state.dataUpdatedAt);
  }
  // The client without its queries, with a marker where they go.
  const shell = JSON.stringify({
    ...client,
    clientState: { ...client.clientState, queries: [QUERIES_HERE], mutations: [] },
  });
  return { text: splice(shell, QUERIES_HERE, kept.join(",")), index };
}

/**
 * serializeBounded with a User Timing measure (`KEEP_MEASURE`) of the longest piece of the write — the longest
 * the write held the main thread at once —, its detail the bytes and reads kept, the main thread's ms over all the
 * write's pieces and their number: what each write costs the page, which `npm run bench`'s board case reads.
 */
function timedSerialize(client: PersistedClient, s: Slicer) {
  const out = serializeBounded(client);
  const { start, longest, busy, pieces } = s.end();
  try {
    // Only the newest stays in the page's timeline (a PerformanceObserver sees every one): a day of writes
    // once a second would otherwise pile up there.
    performance.clearMeasures(KEEP_MEASURE);
    performance.measure(KEEP_MEASURE, {
      start,
      duration: longest,
      detail: { bytes: out.text.length, kept: out.index.kept.size, busy, pieces },
    });
  } catch {
    // a browser without User Timing Level 3 writes the same text, unmeasured
  }
  return out;
}
/**
 * serializeBounded's text and index, the work cut into pieces of at most about `sliceMs` between which the page
 * runs: each read's data not yet stringified is stringified piece by piece, then the join is a piece of its own.
 */
export async function serializeInPieces(client: PersistedClient, sliceMs = SLICE_MS) {
  const s = slicer(sliceMs);
  await prepareSliced(client, s);
  await s.pause();
  return timedSerialize(client, s);
}
/** The User Timing measure of one write's serialization. */
export const KEEP_MEASURE = "tideline:keep-reads";

/** The stored text of the kept reads: a 500-position board fits many times over (DEVELOPERS.md). */
export const boundedSerialize = (client: PersistedClient): string => serializeBounded(client).text;

// ---- what is on the phone now (written, not just handed to the writer) ----
let committed: KeptIndex = emptyIndex();
const keptListeners = new Set<() => void>();
function commit(index: KeptIndex) {
  committed = index;
  for (const l of keptListeners) l();
}

/** Which copy each save handed over (newer copies, higher numbers). */
const seqOf = new WeakMap<PersistedClient, number>();
let lastSeq = 0;
/** The newest copy given to IndexedDB: an older one finishing its pieces later is not written over it. */
let storedSeq = 0;
let latest: PersistedClient | null = null;
/** Counts sign-outs: a write begun before one never lands after it (the next person would find those reads). */
let generation = 0;

interface Handed {
  text: string;
  index: KeptIndex;
  seq: number;
  generation: number;
}
/** The text the throttled writer serialized last, with what it stands for, until storage takes it. */
let handedOver: Handed | null = null;

async function store(h: Handed) {
  if (!idb || h.generation !== generation || h.seq <= storedSeq) return;
  storedSeq = h.seq;
  await set(CACHE_KEY, h.text, idb);
  if (h.generation === generation) commit(h.index);
}

const storage = idb
  ? {
      getItem: (k: string) => get<string>(k, idb).then((v) => v ?? null),
      setItem: async (k: string, v: string) => {
        const h = handedOver?.text === v ? handedOver : null;
        if (!h) return set(k, v, idb);
        // IndexedDB's copy of a large text is work of its own on the main thread: a task of its own.
        await idle();
        await store(h);
      },
      removeItem: (k: string) => del(k, idb),
    }
  : null;

const throttled = createAsyncStoragePersister({
  storage,
  key: CACHE_KEY,
  throttleTime: 1000,
  // At most once a second, in pieces of SLICE_MS between which the page runs: each read's data is stringified in
  // idle time (and only when it is new), then the pieces are joined in a piece of their own.
  serialize: async (client) => {
    const h = { seq: seqOf.get(client) ?? 0, generation };
    handedOver = { ...h, ...(await serializeInPieces(client)) };
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
      const index = emptyIndex(c.timestamp);
      for (const q of c.clientState.queries) index.kept.set(q.queryHash, q.state.dataUpdatedAt);
      commit(index);
    }
    return c;
  },
  removeClient: async () => {
    generation += 1;
    latest = null;
    handedOver = null;
    await throttled.removeClient();
    commit(emptyIndex());
  },
};

/** Writes the newest copy now, whole, without waiting for the throttle (the page is being hidden or left). */
export async function flushPersistedReads(): Promise<void> {
  const client = latest;
  const seq = client ? (seqOf.get(client) ?? 0) : 0;
  if (!client || !storage || seq <= storedSeq) return;
  await store({ ...timedSerialize(client, slicer()), seq, generation });
}

/** An infinite query's data whose last page names a page after it (`next`, as the board's pages do). */
function morePagesToRead(data: unknown) {
  const pages = (data as { pages?: unknown } | undefined)?.pages;
  if (!Array.isArray(pages) || !pages.length) return false;
  const next = (pages[pages.length - 1] as { next?: unknown } | null)?.next;
  return typeof next === "string";
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
    if (!KEPT_ROOTS.has(String(q.queryKey[0]))) continue;
    // A read no part of the page shows now (a tab left, a list closed) still counts while it is newer than the
    // copy on the phone: it was read on this page and will be written with the next copy (or left out of it).
    if (!q.getObserversCount() && !(q.state.data !== undefined && q.state.dataUpdatedAt > committed.at)) continue;
    if (q.state.data === undefined) {
      if (q.state.fetchStatus === "fetching") keeping += 1;
      continue;
    }
    // A read in pages (a large board) is on the phone once its last page is: until then it is still being kept.
    if (morePagesToRead(q.state.data)) keeping += 1;
    else if (committed.kept.get(q.queryHash) === q.state.dataUpdatedAt) kept += 1;
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

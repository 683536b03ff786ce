/**
 * The phone's outbox, wired to the browser: items live in IndexedDB through idb-keyval
 * (a database of their own, "tideline-outbox"), so a closed page or phone loses nothing; they are
 * sent by the engine in ./queue.ts when the connection returns, on start, every 30 s while any
 * wait, and on "Sync now". One tab sends at a time (Web Locks API). Items belong to the person who
 * made them: only the signed-in person's are shown and sent.
 */
import { useSyncExternalStore } from "react";
import { createStore, del, entries, set } from "idb-keyval";
import { DEVICE_TIME_HEADER } from "../../domain/device-clock";
import { ApiError } from "../api-client";
import {
  byOrder,
  drain,
  resubmitted,
  type OutboxItem,
  type OutboxPhoto,
  type OutboxStore,
  type SendResult,
  type Transport,
} from "./queue";

export type { OutboxItem } from "./queue";

const idb = typeof indexedDB === "undefined" ? null : createStore("tideline-outbox", "items");

const store: OutboxStore = {
  all: async () => (idb ? (await entries<string, OutboxItem>(idb)).map(([, v]) => v) : []),
  put: async (i) => {
    if (idb) await set(i.id, i, idb);
  },
  remove: async (id) => {
    if (idb) await del(id, idb);
  },
};

export interface OutboxSnapshot {
  userId: string | null;
  items: OutboxItem[];
  online: boolean;
  syncing: boolean;
  lastSyncAt: string | null;
  /** Upload progress of the photo being sent now. */
  upload: { itemId: string; label: string; fraction: number } | null;
  /** Photos sent in this round of syncing, and how many there are in all: the progress bar's scale. */
  photos: { sent: number; total: number };
}

let snapshot: OutboxSnapshot = {
  userId: null,
  items: [],
  online: typeof navigator === "undefined" ? true : navigator.onLine,
  syncing: false,
  lastSyncAt: null,
  upload: null,
  photos: { sent: 0, total: 0 },
};
const listeners = new Set<() => void>();
const syncedListeners = new Set<(items: OutboxItem[]) => void>();
function update(patch: Partial<OutboxSnapshot>) {
  snapshot = { ...snapshot, ...patch };
  for (const l of listeners) l();
}
const lastSyncKey = (userId: string) => `tideline:last-sync:${userId}`;

async function reload() {
  const uid = snapshot.userId;
  const items = uid ? (await store.all()).filter((i) => i.userId === uid).sort(byOrder) : [];
  update({ items });
}

// ---- sending ----
function errorOf(status: number, body: unknown, fallback: string) {
  const e = (
    body as { error?: { code?: string; message?: string; fields?: Record<string, string>; current?: unknown } }
  )?.error;
  return {
    status,
    code: e?.code ?? `http_${status}`,
    message: e?.message ?? fallback,
    fields: e?.fields,
    current: e?.current,
  };
}

const deviceNow = () => new Date().toISOString();

const NO_ANSWER = {
  ok: false as const,
  status: 0 as const,
  error: { status: 0, code: "offline", message: "No connection to Tideline's server." },
};

async function sendJson(item: OutboxItem): Promise<SendResult> {
  let res: Response;
  try {
    res = await fetch(item.url, {
      method: item.method,
      credentials: "same-origin",
      // What this phone's clock reads now: the server judges the times the phone gave by it.
      headers: { "Content-Type": "application/json", "Idempotency-Key": item.id, [DEVICE_TIME_HEADER]: deviceNow() },
      body: JSON.stringify(item.body ?? {}),
    });
  } catch {
    return NO_ANSWER;
  }
  const text = await res.text().catch(() => "");
  let body: unknown;
  try {
    body = text ? JSON.parse(text) : null;
  } catch {
    body = null;
  }
  if (res.ok) return { ok: true, status: res.status, body };
  return { ok: false, status: res.status, error: errorOf(res.status, body, `The server answered ${res.status}.`) };
}

/** Photos go over XMLHttpRequest: fetch() reports no upload progress. */
function sendPhoto(item: OutboxItem, onProgress?: (f: number) => void): Promise<SendResult> {
  const p = item.photo!;
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    const fd = new FormData();
    for (const [k, v] of Object.entries(p.fields)) fd.append(k, v);
    fd.append("files", p.blob, p.name);
    xhr.open(item.method, item.url);
    xhr.setRequestHeader("Idempotency-Key", item.id);
    xhr.setRequestHeader(DEVICE_TIME_HEADER, deviceNow());
    xhr.responseType = "json";
    xhr.upload.addEventListener("progress", (e) => e.lengthComputable && onProgress?.(e.loaded / e.total));
    xhr.addEventListener("load", () => {
      if (xhr.status >= 200 && xhr.status < 300) resolve({ ok: true, status: xhr.status, body: xhr.response });
      else if (xhr.status === 0) resolve(NO_ANSWER);
      else resolve({ ok: false, status: xhr.status, error: errorOf(xhr.status, xhr.response, "Upload refused.") });
    });
    xhr.addEventListener("error", () => resolve(NO_ANSWER));
    xhr.addEventListener("abort", () => resolve(NO_ANSWER));
    xhr.send(fd);
  });
}

const transport: Transport = (item, onProgress) => (item.photo ? sendPhoto(item, onProgress) : sendJson(item));

let retryTimer: ReturnType<typeof setTimeout> | null = null;
let running: Promise<void> | null = null;

/** Sends what waits, now. `force` ignores the backoff ("Sync now"). */
export function syncNow(force = true): Promise<void> {
  if (running) return running;
  const uid = snapshot.userId;
  if (!uid) return Promise.resolve();
  const work = async () => {
    update({ syncing: true });
    const photosWaiting = snapshot.items.filter((i) => i.photo && i.state === "waiting").length;
    update({ photos: { sent: 0, total: photosWaiting } });
    try {
      if (!snapshot.online) return;
      const report = await drain(store, uid, transport, {
        force,
        onProgress: (item, fraction) => update({ upload: { itemId: item.id, label: item.label, fraction } }),
        onSent: (item) => {
          if (item.photo) update({ photos: { ...snapshot.photos, sent: snapshot.photos.sent + 1 }, upload: null });
          void reload();
        },
      });
      if (report.stoppedAt?.error?.status === 0) update({ online: false });
      if (!report.stoppedAt) {
        const at = new Date().toISOString();
        localStorage.setItem(lastSyncKey(uid), at);
        update({ lastSyncAt: at });
      }
      if (report.sent.length) for (const l of syncedListeners) l(report.sent);
      if (retryTimer) clearTimeout(retryTimer);
      retryTimer = report.retryAt ? setTimeout(() => void syncNow(false), report.retryAt - Date.now()) : null;
    } finally {
      update({ syncing: false, upload: null });
      await reload();
    }
  };
  const locked =
    typeof navigator !== "undefined" && navigator.locks ? navigator.locks.request("tideline-outbox", work) : work();
  running = Promise.resolve(locked).finally(() => {
    running = null;
  });
  return running;
}

// ---- who owns the outbox now ----
/** Called by the app layout with the signed-in person (null when signed out). */
export function setOutboxUser(userId: string | null) {
  if (snapshot.userId === userId) return;
  update({
    userId,
    items: [],
    lastSyncAt: userId ? localStorage.getItem(lastSyncKey(userId)) : null,
  });
  void reload().then(() => {
    if (userId && snapshot.online) void syncNow(false);
  });
}

/**
 * Is Tideline's server reachable? navigator.onLine only knows whether a network is attached (a
 * phone on a hull's dead Wi-Fi says "online"), so a small GET of /api/health decides; the service
 * worker never answers /api from its cache.
 */
export async function probe(): Promise<boolean> {
  let ok = false;
  if (typeof navigator === "undefined" || navigator.onLine) {
    try {
      const res = await fetch("/api/health", { cache: "no-store", credentials: "same-origin" });
      ok = res.status < 500;
      // The answer's body is not needed: read to its end, the request is finished (an unread body leaves it open in
      // the browser's eyes, so a page never counts as settled).
      await res.text().catch(() => "");
    } catch {
      ok = false;
    }
  }
  const was = snapshot.online;
  update({ online: ok });
  if (ok && !was) void syncNow(true);
  return ok;
}

if (typeof window !== "undefined") {
  window.addEventListener("online", () => void probe());
  window.addEventListener("offline", () => update({ online: false }));
  void probe();
  setInterval(() => {
    if (!snapshot.online) void probe();
    else if (snapshot.items.some((i) => i.state === "waiting")) void syncNow(false);
  }, 15_000);
}

// ---- what forms call ----
let lastSeq = 0;
function newItem(p: {
  siteId: string;
  kind: string;
  label: string;
  url: string;
  method?: OutboxItem["method"];
  edit?: OutboxItem["edit"];
  body?: unknown;
  photo?: OutboxPhoto;
  dependsOn?: OutboxItem["dependsOn"];
  id?: string;
}): OutboxItem {
  const now = Date.now();
  return {
    id: p.id ?? crypto.randomUUID(),
    userId: snapshot.userId ?? "",
    siteId: p.siteId,
    seq: (lastSeq = Math.max(now, lastSeq + 1)),
    createdAt: new Date(now).toISOString(),
    label: p.label,
    kind: p.kind,
    method: p.method ?? "POST",
    url: p.url,
    edit: p.edit,
    body: p.body,
    photo: p.photo,
    dependsOn: p.dependsOn,
    state: "waiting",
    attempts: 0,
    nextAttemptAt: now,
  };
}

async function enqueue(item: OutboxItem) {
  await store.put(item);
  await reload();
  if (snapshot.online) void syncNow(false);
}

/** The result of a create made through the outbox: sent now, or kept on the phone to send later. */
export type Submitted<T> = { queued: false; data: T } | { queued: true; item: OutboxItem };

/**
 * A create from a field form, or an edit of an existing record (`method` PATCH/PUT or a move, with
 * `edit`, its body carrying the `version` it was based on). Online it is sent at once exactly as
 * before (with an Idempotency-Key, so a lost answer can be repeated safely) and its answer returned;
 * the server's refusals (a stale version's 409 too) throw as ApiError for the form to show. With no
 * signal, or when the request gets no answer, it is kept in the outbox and `{queued: true}` comes
 * back; a conflict met later is shown side by side in the sync bar.
 */
export async function submitOrQueue<T>(p: {
  siteId: string;
  kind: string;
  label: string;
  url: string;
  method?: OutboxItem["method"];
  edit?: OutboxItem["edit"];
  body: unknown;
  parse: (data: unknown) => T;
}): Promise<Submitted<T>> {
  const item = newItem(p);
  if (!snapshot.userId) {
    // No session known (should not happen behind sign-in): behave as a plain request.
    return { queued: false, data: p.parse(await plainSend(item)) };
  }
  if (!navigator.onLine || !snapshot.online) {
    await enqueue(item);
    return { queued: true, item };
  }
  const r = await sendJson(item);
  if (r.ok) return { queued: false, data: p.parse(r.body) };
  if (r.status === 0 || r.status >= 500) {
    if (r.status === 0) update({ online: false });
    await enqueue(item);
    return { queued: true, item };
  }
  const e = r.error;
  throw new ApiError(e.status, e.code, e.message, e.fields ?? {}, e.current);
}

async function plainSend(item: OutboxItem): Promise<unknown> {
  const r = await sendJson(item);
  if (r.ok) return r.body;
  throw new ApiError(r.error.status, r.error.code, r.error.message, r.error.fields ?? {}, r.error.current);
}

/** A photo kept for later: with no signal, or belonging to a record that is itself still waiting. */
export async function queuePhoto(p: {
  siteId: string;
  label: string;
  file: Blob;
  name: string;
  fields: Record<string, string>;
  dependsOn?: OutboxItem["dependsOn"];
}): Promise<OutboxItem> {
  const item = newItem({
    siteId: p.siteId,
    kind: "photo",
    label: p.label,
    url: `/api/sites/${p.siteId}/photos`,
    photo: { blob: p.file, name: p.name, fields: p.fields },
    dependsOn: p.dependsOn,
  });
  await enqueue(item);
  return item;
}

/** The person discards a refused or conflicting item (or one they no longer want sent). */
export async function discard(id: string) {
  await store.remove(id);
  await reload();
}

/** The person edited a refused item, or chose their value over the server's: send it again. */
export async function resend(id: string, body: unknown) {
  const item = snapshot.items.find((i) => i.id === id);
  if (!item) return;
  await store.put(resubmitted(item, body, Date.now()));
  await reload();
  if (snapshot.online) await syncNow(true);
}

/**
 * Follow this outbox's idea of "online" (the /api/health probe, not just an attached network):
 * TanStack Query's onlineManager takes it, so reads pause with no signal and keep what the phone
 * has instead of failing, and resume when the server answers again.
 */
export function subscribeOnline(setOnline: (online: boolean) => void): () => void {
  let last = snapshot.online;
  setOnline(last);
  const l = () => {
    if (snapshot.online !== last) setOnline((last = snapshot.online));
  };
  listeners.add(l);
  return () => void listeners.delete(l);
}

/** Called after a round of syncing sent something (the app refreshes its queries). */
export function onSynced(cb: (items: OutboxItem[]) => void) {
  syncedListeners.add(cb);
  return () => syncedListeners.delete(cb);
}

export function useOutbox(): OutboxSnapshot {
  return useSyncExternalStore(
    (l) => {
      listeners.add(l);
      return () => listeners.delete(l);
    },
    () => snapshot,
    () => snapshot,
  );
}

/** Waiting items of a record kind, for "pending" marks beside a list (e.g. a position's inspections). */
export function pendingFor(items: OutboxItem[], urlPart: string) {
  return items.filter((i) => i.url.includes(urlPart));
}

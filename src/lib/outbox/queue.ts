/**
 * The outbox: creates made with no signal wait on the phone and are sent in the order
 * they were made once the connection returns. This file is the engine — no browser APIs, so it is
 * unit-tested in node with a memory store and a fake transport (tests/lib/outbox-queue.test.ts);
 * `src/lib/outbox/index.ts` wires it to IndexedDB (idb-keyval) and fetch.
 *
 * Each item carries its own id, sent as the `Idempotency-Key`: a send whose answer was lost is sent
 * again with the same key and the server answers the first result (server/idempotency) — never a
 * second row. Outcomes:
 * - 2xx: the item leaves the outbox; items waiting on it get its new id (a photo of an inspection
 *   logged offline);
 * - no answer, 5xx, 408, 429 or 409 "still being processed": the connection or server is the
 *   problem, so the drain stops and the item is tried again after a backoff (2 s doubling to 5 min,
 *   with jitter) — later items keep their place behind it;
 * - 409 with the server's current record: a conflict, kept for the person to compare and choose;
 * - any other 4xx (400, 403, 404, 422, 409 without a record): refused for a reason a retry will not
 *   fix, kept with the reason until the person edits or discards it.
 */

export type OutboxState = "waiting" | "refused" | "conflict";

export interface OutboxError {
  status: number;
  code: string;
  message: string;
  fields?: Record<string, string>;
  /** On a conflict: the record as it is now on the server. */
  current?: unknown;
}

/** A photo waiting to go: the picture itself and its form fields. */
export interface OutboxPhoto {
  blob: Blob;
  name: string;
  fields: Record<string, string>;
}

export interface OutboxItem {
  /** Also the Idempotency-Key. */
  id: string;
  /** The person who made it: an outbox never crosses accounts. */
  userId: string;
  siteId: string;
  /** Creation order (sent oldest first). */
  seq: number;
  createdAt: string;
  /** What it is, in words, for the list ("Inspection of 2-4"). */
  label: string;
  kind: string;
  method: "POST" | "PUT" | "PATCH";
  url: string;
  body?: unknown;
  photo?: OutboxPhoto;
  /**
   * An edit of an existing record (PATCH/PUT, or a move with `version`): on a conflict the person
   * compares field by field what they sent with the record now on the server. `compareAs` names the
   * server's field for a sent one where they differ (a status move's `to` is the record's `status`).
   */
  edit?: { compareAs?: Record<string, string> };
  /** Waits for another item: its created record's id goes into `field` (of body or photo fields). */
  dependsOn?: { itemId: string; field: string };
  state: OutboxState;
  attempts: number;
  /** Not before this time (epoch ms). */
  nextAttemptAt: number;
  error?: OutboxError;
}

export interface OutboxStore {
  all(): Promise<OutboxItem[]>;
  put(item: OutboxItem): Promise<void>;
  remove(id: string): Promise<void>;
}

export type SendResult =
  | { ok: true; status: number; body: unknown }
  | { ok: false; status: number; error: OutboxError }
  /** No answer at all (offline, connection dropped). */
  | { ok: false; status: 0; error: OutboxError };

export type Transport = (item: OutboxItem, onProgress?: (fraction: number) => void) => Promise<SendResult>;

export const BACKOFF_BASE_MS = 2_000;
export const BACKOFF_MAX_MS = 5 * 60_000;

/** Exponential backoff with ±20 % jitter, so a crew's phones do not all retry at the same instant. */
export function backoffMs(attempts: number, random: () => number = Math.random): number {
  const plain = Math.min(BACKOFF_MAX_MS, BACKOFF_BASE_MS * 2 ** Math.max(0, attempts - 1));
  return Math.round(plain * (0.8 + 0.4 * random()));
}

/** What a failed answer means for the item. */
export function classify(r: Exclude<SendResult, { ok: true }>): "retry" | "conflict" | "refused" {
  const s = r.status;
  if (s === 0 || s >= 500 || s === 408 || s === 429) return "retry";
  if (s === 409 && r.error.code === "idempotency_key_in_use") return "retry";
  if (s === 409 && r.error.current !== undefined && r.error.current !== null) return "conflict";
  return "refused";
}

export const byOrder = (a: OutboxItem, b: OutboxItem) => a.seq - b.seq;

/** Where Tideline's creates put the new record in their answers, most specific first. */
const CREATED_KEYS = ["move", "inspection", "reading", "scan", "check", "test", "step", "defect", "photos", "stage"];

/** The id of what the server created, from the answers Tideline's creates give. */
export function createdIdOf(body: unknown): string | null {
  if (!body || typeof body !== "object") return null;
  const b = body as Record<string, unknown>;
  if (typeof b.id === "string") return b.id;
  const idOf = (v: unknown): string | null => {
    const x = Array.isArray(v) ? v[0] : v;
    return x && typeof x === "object" && typeof (x as { id?: unknown }).id === "string"
      ? (x as { id: string }).id
      : null;
  };
  for (const k of CREATED_KEYS) if (k in b && idOf(b[k])) return idOf(b[k]);
  return null;
}

/** The edited record in an edit's answer (`{ defect: { id, version } }` or the record itself), if it has a version. */
export function editedRecordOf(body: unknown): { id: string; version: number } | null {
  if (!body || typeof body !== "object") return null;
  const asRecord = (v: unknown) =>
    v && typeof v === "object" && typeof (v as { id?: unknown }).id === "string"
      ? typeof (v as { version?: unknown }).version === "number"
        ? (v as { id: string; version: number })
        : null
      : null;
  const top = asRecord(body);
  if (top) return { id: top.id, version: top.version };
  for (const v of Object.values(body as Record<string, unknown>)) {
    const r = asRecord(v);
    if (r) return { id: r.id, version: r.version };
  }
  return null;
}

/**
 * A later edit of the same record, made on the phone from the same version as the one just sent,
 * builds on it rather than competing with it: it goes with the version the server now has. (Two
 * edits of one defect made with no signal are the same person's, one after the other; without this
 * the second came back as a conflict with the first.) An edit based on another version is left as
 * it is, so a real conflict with someone else's change still shows.
 */
function followsOn(later: OutboxItem, sent: OutboxItem, record: { id: string }): boolean {
  if (later.state !== "waiting" || !later.edit || later.seq <= sent.seq) return false;
  const sentVersion = (sent.body as { version?: unknown } | undefined)?.version;
  const laterVersion = (later.body as { version?: unknown } | undefined)?.version;
  if (typeof sentVersion !== "number" || laterVersion !== sentVersion) return false;
  const names = (url: string) => url.split("?")[0].split("/").includes(record.id);
  return names(later.url) && names(sent.url);
}

function withParent(item: OutboxItem, field: string, id: string): OutboxItem {
  const next: OutboxItem = { ...item, dependsOn: undefined };
  if (item.photo) next.photo = { ...item.photo, fields: { ...item.photo.fields, [field]: id } };
  else next.body = { ...(item.body as Record<string, unknown>), [field]: id };
  return next;
}

export interface DrainReport {
  sent: OutboxItem[];
  refused: OutboxItem[];
  conflicts: OutboxItem[];
  /** The drain stopped here: the connection or the server is down; try again at `retryAt`. */
  stoppedAt: OutboxItem | null;
  retryAt: number | null;
}

export interface DrainOptions {
  now?: () => number;
  random?: () => number;
  onSent?: (item: OutboxItem, body: unknown) => void;
  onProgress?: (item: OutboxItem, fraction: number) => void;
  /** Ignore backoff ("sync now"). */
  force?: boolean;
}

/**
 * Sends one person's waiting items in order. Items of other people are never touched. Returns
 * what happened; the store holds the truth at every step, so a closed page loses nothing.
 */
export async function drain(
  store: OutboxStore,
  userId: string,
  send: Transport,
  opts: DrainOptions = {},
): Promise<DrainReport> {
  const now = opts.now ?? Date.now;
  const report: DrainReport = { sent: [], refused: [], conflicts: [], stoppedAt: null, retryAt: null };
  const mine = (await store.all()).filter((i) => i.userId === userId).sort(byOrder);
  const pending = new Map(mine.map((i) => [i.id, i]));
  for (const original of mine) {
    let item = pending.get(original.id)!;
    if (item.state !== "waiting") continue;
    if (item.dependsOn) {
      const parent = pending.get(item.dependsOn.itemId);
      if (parent) continue; // its record does not exist yet (or was refused): wait for it
      // The parent is gone without giving us its id (discarded): this one cannot go as it is.
      item = {
        ...item,
        state: "refused",
        error: {
          status: 0,
          code: "parent_discarded",
          message: "The record this belongs to was discarded, so it cannot be sent.",
        },
      };
      await store.put(item);
      pending.set(item.id, item);
      report.refused.push(item);
      continue;
    }
    if (!opts.force && item.nextAttemptAt > now()) {
      report.stoppedAt = item;
      report.retryAt = item.nextAttemptAt;
      break;
    }
    const r = await send(item, (f) => opts.onProgress?.(item, f));
    if (r.ok) {
      await store.remove(item.id);
      pending.delete(item.id);
      report.sent.push(item);
      const newId = createdIdOf(r.body);
      for (const child of [...pending.values()].filter((c) => c.dependsOn?.itemId === item.id)) {
        if (!newId) continue;
        const updated = withParent(child, child.dependsOn!.field, newId);
        await store.put(updated);
        pending.set(updated.id, updated);
      }
      const edited = item.edit ? editedRecordOf(r.body) : null;
      if (edited) {
        for (const later of [...pending.values()].filter((l) => followsOn(l, item, edited))) {
          const updated = { ...later, body: { ...(later.body as Record<string, unknown>), version: edited.version } };
          await store.put(updated);
          pending.set(updated.id, updated);
        }
      }
      opts.onSent?.(item, r.body);
      continue;
    }
    const verdict = classify(r);
    if (verdict === "retry") {
      const attempts = item.attempts + 1;
      const retryAt = now() + backoffMs(attempts, opts.random);
      const next = { ...item, attempts, nextAttemptAt: retryAt, error: r.error };
      await store.put(next);
      report.stoppedAt = next;
      report.retryAt = retryAt;
      break; // keep the order: nothing later overtakes it
    }
    const kept: OutboxItem = { ...item, state: verdict, error: r.error };
    await store.put(kept);
    pending.set(kept.id, kept);
    (verdict === "conflict" ? report.conflicts : report.refused).push(kept);
  }
  return report;
}

/**
 * The person edited a refused item or chose theirs in a conflict: it goes again, in its old place.
 * The key stays: the server gave it back when it refused (only a 2xx answer is kept with a key).
 */
export function resubmitted(item: OutboxItem, body: unknown, now: number): OutboxItem {
  return {
    ...item,
    body: item.photo ? item.body : body,
    state: "waiting",
    attempts: 0,
    nextAttemptAt: now,
    error: undefined,
  };
}

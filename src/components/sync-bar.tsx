import { useQueryClient } from "@tanstack/react-query";
import { useState, useSyncExternalStore } from "react";
import { discard, resend, syncNow, useOutbox, type OutboxItem } from "../lib/outbox";
import { clockTime } from "../lib/clock";
import { fieldLabel } from "../schemas/field-labels";
import { Conflict, primitives } from "./outbox-conflict";
import { serverRefused } from "./status";

/** The sync bar says times as `clockTime` writes them: 24-hour, with the date when it was not today. */
const time = (at: string | number | null) => clockTime(at);

/** When the newest read on this phone came from the server (the persisted cache keeps its time). */
function useLastRead(): number | null {
  const qc = useQueryClient();
  return useSyncExternalStore(
    (l) => qc.getQueryCache().subscribe(l),
    () => {
      let max = 0;
      for (const q of qc.getQueryCache().getAll()) if (q.state.dataUpdatedAt > max) max = q.state.dataUpdatedAt;
      return max || null;
    },
  );
}

/**
 * Reads on this page whose refresh failed for want of an answer (no signal, a dead Wi-Fi, a 5xx)
 * while they still hold what was read before: the page keeps showing that copy (pages show their
 * ErrorPanel only when there is nothing to show, or the server refused — `serverRefused`), and the
 * bar says how old it is. Returns the oldest such copy's time and how many there are.
 */
function useFailedRefresh(): { count: number; since: number | null } {
  const qc = useQueryClient();
  const key = useSyncExternalStore(
    (l) => qc.getQueryCache().subscribe(l),
    () => {
      let count = 0;
      let since = Infinity;
      for (const q of qc.getQueryCache().getAll()) {
        const s = q.state;
        if (s.status !== "error" || s.data === undefined || !q.getObserversCount() || serverRefused(s.error)) continue;
        count += 1;
        since = Math.min(since, s.dataUpdatedAt);
      }
      return count ? `${count}:${since}` : "";
    },
  );
  if (!key) return { count: 0, since: null };
  const [count, since] = key.split(":").map(Number);
  return { count, since: since || null };
}

/** A refused item: the reason, its fields to correct, send again or discard. */
function Refused({ item }: { item: OutboxItem }) {
  const fields = primitives(item.body);
  const [draft, setDraft] = useState<Record<string, string>>(
    Object.fromEntries(Object.entries(fields).map(([k, v]) => [k, v === null ? "" : String(v)])),
  );
  const [editing, setEditing] = useState(false);
  const send = () => {
    const body = { ...(item.body as Record<string, unknown>) };
    for (const [k, v] of Object.entries(draft)) {
      const before = fields[k];
      body[k] =
        typeof before === "number"
          ? v.trim() === ""
            ? null
            : Number(v)
          : typeof before === "boolean"
            ? v === "true"
            : v;
    }
    void resend(item.id, body);
  };
  return (
    <li className="rounded-md border-l-4 border-flare-400 bg-hull-850 p-2" data-testid="outbox-refused">
      <p className="font-semibold">{item.label}</p>
      <p className="text-sm text-flare-300">
        Not accepted ({item.error?.status || "—"}): {item.error?.message}
      </p>
      {item.error?.fields && (
        <ul className="list-disc pl-5 text-sm text-flare-300">
          {Object.entries(item.error.fields).map(([k, m]) => (
            <li key={k}>
              {fieldLabel(item.kind, k)}: {m}
            </li>
          ))}
        </ul>
      )}
      {editing && !item.photo && (
        <div className="mt-2 grid gap-2 sm:grid-cols-2">
          {Object.keys(fields).map((k) => (
            <label key={k} className="text-sm text-mist">
              {fieldLabel(item.kind, k)}
              <input
                className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
                value={draft[k]}
                onChange={(e) => setDraft({ ...draft, [k]: e.target.value })}
              />
            </label>
          ))}
        </div>
      )}
      <div className="mt-2 flex flex-wrap gap-2 text-sm">
        {!item.photo &&
          (editing ? (
            <button
              type="button"
              className="min-h-11 rounded-md bg-brass-400 px-3 font-semibold text-hull-950"
              onClick={send}
            >
              Send corrected
            </button>
          ) : (
            <button
              type="button"
              className="min-h-11 rounded-md px-3 ring-1 ring-hull-500"
              onClick={() => setEditing(true)}
            >
              Edit
            </button>
          ))}
        <button
          type="button"
          className="min-h-11 rounded-md px-3 ring-1 ring-flare-400"
          onClick={() => void discard(item.id)}
        >
          Discard
        </button>
      </div>
    </li>
  );
}

/**
 * The field state, on every page behind sign-in: online or offline, how many changes
 * wait on this phone, the last sync, "Sync now", a progress bar while photos upload, and the
 * changes the server refused or that meet a newer record, until the person deals with each.
 */
export function SyncBar({ kept }: { kept?: { keeping: number; tooLarge: number; kept: number } }) {
  const o = useOutbox();
  const lastRead = useLastRead();
  const failed = useFailedRefresh();
  const qc = useQueryClient();
  const [open, setOpen] = useState(false);
  const waiting = o.items.filter((i) => i.state === "waiting");
  const attention = o.items.filter((i) => i.state !== "waiting");
  const photo = o.upload;
  const photosTotal = o.photos.total;
  return (
    <section
      aria-label="Connection and changes waiting"
      className="no-print border-b border-hull-700 bg-hull-950 px-4 py-1 text-sm"
      data-testid="sync-bar"
    >
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
        <span
          data-testid="connection"
          className={`inline-flex items-center gap-1 font-semibold ${o.online ? "text-kelp-300" : "text-flare-300"}`}
        >
          <span aria-hidden="true">{o.online ? "●" : "○"}</span>
          {o.online ? "Online" : "Offline"}
        </span>
        {!o.online && (
          <span className="text-mist" data-testid="offline-marker">
            showing what was last synced at {time(lastRead)}
          </span>
        )}
        {o.online && failed.count > 0 && (
          <span className="text-flare-300" data-testid="stale-marker" role="status">
            Could not refresh: showing what was last synced at {time(failed.since)}{" "}
            <button
              type="button"
              className="min-h-9 rounded-md px-2 text-chalk underline"
              onClick={() =>
                void qc.refetchQueries({
                  predicate: (q) => q.state.status === "error" && q.state.data !== undefined,
                  type: "active",
                })
              }
            >
              Try again
            </button>
          </span>
        )}
        {o.online && kept && kept.keeping + kept.kept + kept.tooLarge > 0 && (
          <span data-testid="kept-state" data-keeping={kept.keeping} className="text-fog">
            {kept.keeping > 0
              ? "keeping this page for no signal…"
              : kept.tooLarge > 0
                ? `${kept.tooLarge} read${kept.tooLarge === 1 ? "" : "s"} too large to keep for no signal`
                : "✓ kept for no signal"}
          </span>
        )}
        <span data-testid="waiting-count" className={waiting.length ? "text-tide-300" : "text-fog"}>
          {waiting.length === 0 ? "nothing waiting" : `${waiting.length} waiting to send`}
        </span>
        <span className="text-fog">last sync {time(o.lastSyncAt)}</span>
        {attention.length > 0 && (
          <button
            type="button"
            className="min-h-9 rounded-md px-2 font-semibold text-flare-300 ring-1 ring-flare-400"
            aria-expanded={open}
            onClick={() => setOpen(!open)}
            data-testid="outbox-attention"
          >
            {attention.length} need{attention.length === 1 ? "s" : ""} you
          </button>
        )}
        {o.items.length > 0 && attention.length === 0 && (
          <button
            type="button"
            className="min-h-9 rounded-md px-2 text-mist underline"
            aria-expanded={open}
            onClick={() => setOpen(!open)}
          >
            {open ? "Hide" : "Show"} list
          </button>
        )}
        <button
          type="button"
          className="ml-auto min-h-9 rounded-md px-3 font-semibold text-chalk ring-1 ring-hull-600 disabled:opacity-50"
          disabled={!o.online || o.syncing || waiting.length === 0}
          onClick={() => void syncNow(true)}
        >
          {o.syncing ? "Syncing…" : "Sync now"}
        </button>
      </div>
      {o.syncing && photosTotal > 0 && (
        <div className="py-1" data-testid="photo-progress">
          <p className="text-xs text-mist">
            Sending photos: {o.photos.sent} of {photosTotal}
            {photo ? ` — ${photo.label} ${Math.round(photo.fraction * 100)} %` : ""}
          </p>
          <progress
            className="h-2 w-full"
            max={photosTotal}
            value={o.photos.sent + (photo?.fraction ?? 0)}
            aria-label="Photo upload progress"
          />
        </div>
      )}
      {open && (
        <ul className="space-y-2 py-2" aria-label="Changes on this phone">
          {attention.map((i) =>
            i.state === "conflict" ? <Conflict key={i.id} item={i} /> : <Refused key={i.id} item={i} />,
          )}
          {waiting.map((i) => (
            <li key={i.id} className="flex items-center justify-between gap-2 text-mist" data-testid="outbox-waiting">
              <span>
                {i.label} <span className="text-fog">— waiting since {time(i.createdAt)}</span>
                {i.error && <span className="text-fog"> ({i.error.message})</span>}
              </span>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

import { Button } from "../../../components/button";
import { ApiError } from "../../../lib/api-client";

/** A value in words: blank as "—", yes/no for a flag; `words` turns a field's stored value into its label. */
const show = (v: unknown, words?: (v: string) => string) =>
  v === null || v === undefined || v === ""
    ? "—"
    : typeof v === "boolean"
      ? v
        ? "yes"
        : "no"
      : Array.isArray(v)
        ? v.join(", ")
        : words && typeof v === "string"
          ? words(v)
          : String(v);

/** Fields whose value on the server now differs from the one the form started from. */
export function changedOnServer(
  base: Record<string, unknown>,
  current: Record<string, unknown>,
  labels: Record<string, string>,
) {
  return Object.keys(labels)
    .filter((k) => JSON.stringify(base[k] ?? null) !== JSON.stringify(current[k] ?? null))
    .map((k) => ({ key: k, label: labels[k], was: base[k], now: current[k] }));
}

/** The 409 record, when the error is a conflict that carries one. */
export function conflictRecord<T = Record<string, unknown>>(e: unknown): T | null {
  return e instanceof ApiError && e.status === 409 && e.current && typeof e.current === "object"
    ? (e.current as T)
    : null;
}

/**
 * Shown when a save met a newer version: the user's input is kept, the server's changes
 * are listed, and they choose to take the server's values or apply theirs on top.
 */
export function ConflictNotice({
  base,
  current,
  labels,
  onUseTheirs,
  onApplyMine,
  busy,
  words = {},
}: {
  base: Record<string, unknown>;
  current: Record<string, unknown>;
  labels: Record<string, string>;
  /** Per field, its stored value in the words the form shows ("clean" → "Clean"). */
  words?: Record<string, (v: string) => string>;
  onUseTheirs: () => void;
  onApplyMine: () => void;
  busy?: boolean;
}) {
  const changes = changedOnServer(base, current, labels);
  return (
    <div
      role="alert"
      className="rounded-md border-2 border-brass-400 bg-brass-700/25 p-3 text-sm"
      data-testid="conflict-notice"
    >
      <p className="font-semibold text-brass-300">Someone else saved this while you were editing.</p>
      <p className="mt-1 text-mist">Your input is kept below. What changed on the server:</p>
      {changes.length ? (
        <ul className="mt-2 space-y-1">
          {changes.map((c) => (
            <li key={c.key}>
              <span className="font-semibold">{c.label}:</span> <s className="text-fog">{show(c.was, words[c.key])}</s>{" "}
              → <span className="text-chalk">{show(c.now, words[c.key])}</span>
            </li>
          ))}
        </ul>
      ) : (
        <p className="mt-2 text-mist">Nothing you can see here changed (a field of another form was saved).</p>
      )}
      <div className="mt-3 flex flex-wrap gap-2">
        <Button tone="quiet" onClick={onUseTheirs} disabled={busy}>
          Use theirs
        </Button>
        <Button onClick={onApplyMine} disabled={busy}>
          Apply mine again
        </Button>
      </div>
    </div>
  );
}

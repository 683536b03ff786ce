import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { ApiError } from "../../../lib/api-client";
import type { DefectDetail } from "../../../schemas/defects";
import { findByRef, usePinDefect, useUnpinDefect } from "../api";

const when = (iso: string) => iso.slice(0, 16).replace("T", " ");

/** The curator's order: a defect placed just before or after another, with the reason, who and when; the curator sets or lifts it. */
export function PinPanel({ siteId, detail, canManage }: { siteId: string; detail: DefectDetail; canManage: boolean }) {
  const d = detail.defect;
  const pin = usePinDefect(siteId, d.id);
  const unpin = useUnpinDefect(siteId, d.id);
  const [error, setError] = useState<string | null>(null);
  const active = detail.pins.find((p) => !p.removedAt);
  const fail = (e: unknown) =>
    setError(e instanceof ApiError ? (Object.values(e.fields)[0] ?? e.message) : "That did not work.");

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setError(null);
    const f = new FormData(e.currentTarget);
    const target = await findByRef(siteId, String(f.get("ref")).trim()).catch(() => null);
    if (!target) return setError("No defect has that reference on this site.");
    pin.mutate(
      { direction: f.get("direction") as "above" | "below", relativeTo: target.id, reason: String(f.get("reason")) },
      { onError: fail },
    );
  }
  return (
    <section aria-labelledby="pin-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="pin-title" className="text-lg font-bold">
        Curator's order
      </h2>
      {detail.pins.length === 0 && (
        <p className="text-mist">Not placed by the curator: it sits where its priority score puts it.</p>
      )}
      <ul className="space-y-2">
        {detail.pins.map((p) => (
          <li
            key={p.id}
            className={`rounded-md p-2 ring-1 ${p.removedAt ? "ring-hull-700 text-fog" : "ring-tide-400"}`}
          >
            <p>
              Placed <strong>{p.direction === "above" ? "before" : "after"}</strong> D-{p.relativeRef ?? "?"} by{" "}
              {p.pinnedByName ?? "someone"} on {when(p.pinnedAt)} {p.removedAt ? "(lifted)" : "(in force)"}
            </p>
            <p className="text-sm">Reason: {p.reason}</p>
            {p.removedAt && (
              <p className="text-sm">
                Lifted by {p.removedByName ?? "someone"} on {when(p.removedAt)}
                {p.removedReason ? `: ${p.removedReason}` : ""}
              </p>
            )}
          </li>
        ))}
      </ul>
      {canManage && active && (
        <Button
          tone="quiet"
          className="mt-2"
          onClick={() => unpin.mutate({ reason: "Lifted by the curator" }, { onError: fail })}
        >
          Back to its score's place
        </Button>
      )}
      {canManage && (
        <form onSubmit={submit} className="mt-3 grid gap-2 sm:grid-cols-[auto_8rem_1fr_auto] sm:items-end">
          <label className="text-sm font-semibold text-mist">
            Do it
            <select
              name="direction"
              className="mt-1 block min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
            >
              <option value="above">before</option>
              <option value="below">after</option>
            </select>
          </label>
          <label className="text-sm font-semibold text-mist">
            defect
            <input
              name="ref"
              required
              placeholder="D-12"
              className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-2 font-mono text-chalk"
            />
          </label>
          <label className="text-sm font-semibold text-mist">
            because
            <input
              name="reason"
              required
              minLength={3}
              className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
            />
          </label>
          <Button type="submit" disabled={pin.isPending}>
            Set the order
          </Button>
        </form>
      )}
      {error && (
        <p role="alert" className="mt-2 text-flare-300">
          {error}
        </p>
      )}
    </section>
  );
}

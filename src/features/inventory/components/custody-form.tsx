import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { CUSTODY_LABELS, type Custody } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { CustodyMove } from "../../../schemas/inventory";
import { fetchNextTag, useCustodyOptions, useMoveCustody } from "../api";
import type { Component } from "../contract";
import { ConflictNotice } from "./conflict-notice";

type Held = Pick<Component, "id" | "custody" | "version" | "tagNumber"> & { custodyLocation?: string };
const LABELS = { custody: "Where it is", custodyLocation: "Location", tagNumber: "Tag" };

/**
 * Log a move of the part along the tag-and-return chain (src/domain/custody-chain.ts): the
 * server's proposal is chosen first, each move it would refuse says why, a removal asks for a
 * tag (typed, scanned with a keyboard-wedge scanner, or generated), and the curator may
 * release a refused move with a written reason.
 */
export function CustodyForm({
  siteId,
  component,
  label,
  canRelease,
  onSaved,
}: {
  siteId: string;
  component: Held;
  /** The position's designation, for the outbox's list when saved with no signal. */
  label: string;
  canRelease: boolean;
  /** The move as saved, or, with no signal, the outbox item it waits in and where it goes. */
  onSaved: (saved: { move: CustodyMove } | { queuedId: string; toState: Custody }) => void;
}) {
  const [base, setBase] = useState<Held>(component);
  const options = useCustodyOptions(siteId, base.id);
  // The person's own pick, else the server's proposal: derived on each render, so a refetch of
  // the options after a save can never leave the form with no move chosen.
  const [picked, setPicked] = useState<Custody | null>(null);
  const to: Custody | null = picked ?? options.data?.proposed ?? null;
  const [location, setLocation] = useState("");
  const [tag, setTag] = useState("");
  const [note, setNote] = useState("");
  const [release, setRelease] = useState("");
  const [tagError, setTagError] = useState<string | null>(null);
  const move = useMoveCustody(siteId);

  const err = move.error instanceof ApiError ? move.error : null;
  const conflict = err?.status === 409 && err.code === "conflict" && err.current ? (err.current as Held) : null;
  const needsTag = !base.tagNumber && to === "removed";
  const chosen = options.data?.moves.find((m) => m.to === to);
  const refusals = (chosen?.refusals ?? []).filter((r) => !(r.rule === "tag_required" && tag.trim()));
  const releasable = refusals.length > 0 && refusals.every((r) => r.releasable);
  const blocked = refusals.length > 0 && !(canRelease && releasable && release.trim().length >= 5);

  function save(version: number) {
    if (!to) return;
    move.mutate(
      {
        componentId: base.id,
        toState: to,
        location: location.trim(),
        note: note.trim(),
        version,
        label,
        ...(needsTag && tag.trim() ? { tagNumber: tag.trim() } : {}),
        ...(refusals.length && release.trim() ? { releaseReason: release.trim() } : {}),
      },
      {
        onSuccess: (r) => {
          if (r.queued) {
            // Waiting in the outbox: show the move as made, so the next one follows from it.
            setBase({ ...base, custody: to, tagNumber: base.tagNumber ?? (tag.trim() || null) });
          } else setBase(r.data.component);
          setPicked(null);
          setLocation("");
          setNote("");
          setTag("");
          setRelease("");
          onSaved(r.queued ? { queuedId: r.item.id, toState: to } : { move: r.data.move });
        },
      },
    );
  }
  const submit = (e: FormEvent) => {
    e.preventDefault();
    save(base.version);
  };
  const generate = () => {
    setTagError(null);
    fetchNextTag(siteId).then(
      (r) => setTag(r.tagNumber),
      () => setTagError("No tag could be generated: type one."),
    );
  };
  const choose = (c: Custody) => {
    setPicked(c);
    move.reset();
  };
  const moves = options.data?.moves ?? [];
  const ordered = [...moves].sort((a, b) =>
    a.to === options.data?.proposed ? -1 : b.to === options.data?.proposed ? 1 : a.refusals.length - b.refusals.length,
  );
  return (
    <form onSubmit={submit} className="space-y-3" aria-label="Log a custody move">
      <p className="text-sm">
        Now: <strong data-testid="custody-now">{CUSTODY_LABELS[base.custody]}</strong>
        {base.tagNumber && <span className="font-mono text-mist"> · tag {base.tagNumber}</span>}
      </p>
      {options.data && (
        <p className="text-sm text-mist" data-testid="custody-proposal">
          {options.data.proposed ? (
            <>
              Next on the chain: <strong className="text-chalk">{CUSTODY_LABELS[options.data.proposed]}</strong>
            </>
          ) : (
            "The chain is complete here: choose a move only if the part moves again."
          )}
        </p>
      )}
      <fieldset>
        <legend className="text-sm font-semibold text-mist">Move it to</legend>
        <div className="mt-1 grid grid-cols-2 gap-2">
          {ordered.map((m) => (
            <button
              key={m.to}
              type="button"
              aria-pressed={to === m.to}
              onClick={() => choose(m.to)}
              className={`min-h-12 rounded-md px-3 py-1 text-left font-semibold ring-1 ${to === m.to ? "bg-tide-300 text-hull-950 ring-tide-300" : m.refusals.length ? "bg-hull-850 text-mist ring-hull-700" : "bg-hull-800 ring-hull-600"}`}
            >
              {CUSTODY_LABELS[m.to]}
              {m.refusals.some((r) => r.rule !== "tag_required") && (
                <span className="block text-xs font-normal">
                  {m.refusals.some((r) => r.status === 409) ? "✕ not on the chain" : "△ needs a proof"}
                </span>
              )}
            </button>
          ))}
        </div>
      </fieldset>
      {refusals.length > 0 && (
        <div
          role="note"
          aria-label="What this move still needs"
          className="rounded-md border-l-4 border-rust-400 bg-hull-850 p-2 text-sm"
          data-testid="custody-refusals"
        >
          <ul className="list-disc space-y-1 pl-5">
            {refusals.map((r) => (
              <li key={r.rule}>{r.message}</li>
            ))}
          </ul>
          {canRelease && releasable ? (
            <TextField
              label="Release it anyway — the reason is recorded and shown"
              value={release}
              onChange={(e) => setRelease(e.target.value)}
              placeholder="e.g. refitted for a dry fit only, locked out"
              error={err?.fields.releaseReason}
              className="mt-2"
            />
          ) : (
            <p className="mt-1 text-mist">
              {releasable ? "The curator can release it with a written reason." : "Fix this first."}
            </p>
          )}
        </div>
      )}
      {needsTag && (
        <div className="flex items-end gap-2">
          <TextField
            label="Tag number on the bag"
            value={tag}
            onChange={(e) => setTag(e.target.value)}
            error={err?.fields.tagNumber ?? tagError ?? undefined}
            className="flex-1 [&_input]:font-mono"
            required
            autoComplete="off"
          />
          <Button type="button" tone="quiet" className="mb-0.5" onClick={generate}>
            Generate a tag
          </Button>
        </div>
      )}
      <TextField
        label="Where is it now?"
        placeholder="e.g. workshop bench 2, crate B"
        value={location}
        onChange={(e) => setLocation(e.target.value)}
        error={err?.fields.location}
      />
      <TextField
        label="Note (optional)"
        value={note}
        onChange={(e) => setNote(e.target.value)}
        error={err?.fields.note}
      />
      {conflict && (
        <ConflictNotice
          base={base}
          current={conflict}
          labels={LABELS}
          busy={move.isPending}
          onUseTheirs={() => {
            setBase(conflict);
            setPicked(null);
            move.reset();
          }}
          onApplyMine={() => {
            setBase(conflict);
            save(conflict.version);
          }}
        />
      )}
      {err && !conflict && (
        <p role="alert" className="text-sm text-flare-300">
          {err.message}
        </p>
      )}
      <Button
        type="submit"
        className="w-full min-h-14 text-lg"
        disabled={move.isPending || options.isFetching || !to || blocked}
      >
        {move.isPending
          ? "Saving…"
          : to
            ? `Save move: ${CUSTODY_LABELS[to]}${refusals.length && !blocked ? " (released)" : ""}`
            : "Choose where it went"}
      </Button>
    </form>
  );
}

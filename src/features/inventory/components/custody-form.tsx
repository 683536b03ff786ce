import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { CUSTODY, CUSTODY_LABELS, type Custody } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { useMoveCustody } from "../api";
import type { Component } from "../contract";
import { ConflictNotice } from "./conflict-notice";

type Held = Pick<Component, "id" | "custody" | "version" | "tagNumber"> & { custodyLocation?: string };
const LABELS = { custody: "Where it is", custodyLocation: "Location", tagNumber: "Tag" };
/** The usual next step from each state, offered first (Tideline's own ordering of the teardown path). */
const NEXT: Record<Custody, Custody> = {
  in_place: "removed", removed: "in_workshop", in_workshop: "ready_to_refit", ready_to_refit: "refitted",
  refitted: "removed", scrapped: "in_workshop", missing: "in_workshop",
};

/** Log a move of the part: to which state, where it is now, and a tag when it comes off. */
export function CustodyForm({ siteId, component, onSaved }: { siteId: string; component: Held; onSaved: (to: Custody) => void }) {
  const [base, setBase] = useState<Held>(component);
  const [to, setTo] = useState<Custody>(NEXT[component.custody]);
  const [location, setLocation] = useState("");
  const [tag, setTag] = useState("");
  const [note, setNote] = useState("");
  const move = useMoveCustody(siteId);
  const err = move.error instanceof ApiError ? move.error : null;
  const conflict = err?.status === 409 && err.code === "conflict" && err.current ? (err.current as Held) : null;
  const needsTag = !base.tagNumber && to === "removed";

  function save(version: number) {
    move.mutate(
      { componentId: base.id, toState: to, location: location.trim(), note: note.trim(), version, ...(needsTag && tag.trim() ? { tagNumber: tag.trim() } : {}) },
      { onSuccess: (r) => { setBase(r.component); setTo(NEXT[r.component.custody]); setLocation(""); setNote(""); setTag(""); onSaved(r.component.custody); } },
    );
  }
  const submit = (e: FormEvent) => { e.preventDefault(); save(base.version); };
  const states = [NEXT[base.custody], ...CUSTODY.filter((c) => c !== NEXT[base.custody] && c !== base.custody)];
  return (
    <form onSubmit={submit} className="space-y-3" aria-label="Log a custody move">
      <p className="text-sm">Now: <strong data-testid="custody-now">{CUSTODY_LABELS[base.custody]}</strong>{base.tagNumber && <span className="font-mono text-mist"> · tag {base.tagNumber}</span>}</p>
      <fieldset>
        <legend className="text-sm font-semibold text-mist">Move it to</legend>
        <div className="mt-1 grid grid-cols-2 gap-2">
          {states.map((c) => (
            <button key={c} type="button" aria-pressed={to === c} onClick={() => setTo(c)}
              className={`min-h-12 rounded-md px-3 text-left font-semibold ring-1 ${to === c ? "bg-tide-300 text-hull-950 ring-tide-300" : "bg-hull-800 ring-hull-600"}`}>
              {CUSTODY_LABELS[c]}
            </button>
          ))}
        </div>
      </fieldset>
      {needsTag && <TextField label="Tag number on the bag" value={tag} onChange={(e) => setTag(e.target.value)} error={err?.fields.tagNumber} className="font-mono" />}
      <TextField label="Where is it now?" placeholder="e.g. workshop bench 2, crate B" value={location} onChange={(e) => setLocation(e.target.value)} error={err?.fields.location} />
      <TextField label="Note (optional)" value={note} onChange={(e) => setNote(e.target.value)} error={err?.fields.note} />
      {conflict && (
        <ConflictNotice base={base} current={conflict} labels={LABELS} busy={move.isPending}
          onUseTheirs={() => { setBase(conflict); setTo(NEXT[conflict.custody]); move.reset(); }}
          onApplyMine={() => { setBase(conflict); save(conflict.version); }} />
      )}
      {err && !conflict && !Object.keys(err.fields).length && <p role="alert" className="text-sm text-flare-300">{err.message}</p>}
      <Button type="submit" className="w-full min-h-14 text-lg" disabled={move.isPending}>{move.isPending ? "Saving…" : `Save move: ${CUSTODY_LABELS[to]}`}</Button>
    </form>
  );
}

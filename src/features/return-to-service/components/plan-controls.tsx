import { useState } from "react";
import { Button } from "../../../components/button";
import { STEP_KINDS, STEP_KIND_LABELS, type StepKind } from "../../../domain/return-to-service";
import { ApiError } from "../../../lib/api-client";
import type { RtsStage } from "../../../schemas/return-to-service";
import { useRtsAction } from "../api";

const box = "mt-1 w-full min-h-11 rounded-md bg-hull-900 px-2 ring-1 ring-hull-600";
const errorOf = (e: unknown) => (e instanceof ApiError ? e.message : e ? String(e) : null);

/**
 * The curator's controls on a stage: edit, move up or down (the server refuses a move ahead of
 * a stage it depends on, and says which), and remove a stage that has nothing on record.
 */
export function StageActions({
  siteId,
  stage,
  index,
  count,
  onEdit,
}: {
  siteId: string;
  stage: RtsStage;
  index: number;
  count: number;
  onEdit: () => void;
}) {
  const act = useRtsAction(siteId);
  const [removing, setRemoving] = useState(false);
  const move = (toIndex: number) =>
    act.mutate({ method: "POST", path: `/return-to-service/stages/${stage.id}/move`, body: { toIndex } });
  const removable = stage.status === "planned" && stage.attempt === 1 && stage.steps.every((s) => !s.entries.length);
  return (
    <div className="mt-3 space-y-2 border-t border-hull-700 pt-3" aria-label={`Plan of ${stage.name}`} role="group">
      <div className="flex flex-wrap gap-2 text-sm">
        {stage.status !== "released" && (
          <Button tone="quiet" onClick={onEdit}>
            Edit the stage
          </Button>
        )}
        <Button tone="quiet" disabled={index === 0 || act.isPending} onClick={() => move(index - 1)}>
          <span aria-hidden>↑</span> Earlier
        </Button>
        <Button tone="quiet" disabled={index === count - 1 || act.isPending} onClick={() => move(index + 1)}>
          <span aria-hidden>↓</span> Later
        </Button>
        {removable && !removing && (
          <Button tone="quiet" onClick={() => setRemoving(true)}>
            Remove the stage
          </Button>
        )}
      </div>
      {removing && (
        <p className="flex flex-wrap items-center gap-2 text-sm">
          Remove “{stage.name}” and its hold points from the plan?
          <Button
            tone="danger"
            disabled={act.isPending}
            onClick={() => act.mutate({ method: "DELETE", path: `/return-to-service/stages/${stage.id}` })}
          >
            Yes, remove the stage
          </Button>
          <Button tone="quiet" onClick={() => setRemoving(false)}>
            Keep it
          </Button>
        </p>
      )}
      {act.error && (
        <p role="alert" className="text-sm text-rust-300">
          {errorOf(act.error)}
        </p>
      )}
    </div>
  );
}

/** Adds a hold point to a stage being prepared: one of the trade's kinds or the crew's own, at a chosen place. */
export function AddHoldPoint({ siteId, stage }: { siteId: string; stage: RtsStage }) {
  const act = useRtsAction(siteId);
  const [open, setOpen] = useState(false);
  const [kind, setKind] = useState<StepKind>("custom");
  const [title, setTitle] = useState("");
  const [detail, setDetail] = useState("");
  const [at, setAt] = useState(String(stage.steps.length));
  if (!open)
    return (
      <Button tone="quiet" onClick={() => setOpen(true)}>
        Add a hold point
      </Button>
    );
  return (
    <form
      className="w-full space-y-2 rounded-md bg-hull-900 p-3"
      aria-label={`Add a hold point to ${stage.name}`}
      onSubmit={(e) => {
        e.preventDefault();
        act.mutate(
          {
            method: "POST",
            path: `/return-to-service/stages/${stage.id}/steps`,
            body: { kind, title, detail, atIndex: Number(at) },
          },
          {
            onSuccess: () => {
              setOpen(false);
              setTitle("");
              setDetail("");
            },
          },
        );
      }}
    >
      <div className="grid gap-2 sm:grid-cols-2">
        <label className="block text-sm">
          Kind
          <select
            className={box}
            value={kind}
            onChange={(e) => {
              const k = e.target.value as StepKind;
              setKind(k);
              if (!title && k !== "custom") setTitle(STEP_KIND_LABELS[k]);
            }}
          >
            {STEP_KINDS.map((k) => (
              <option key={k} value={k}>
                {STEP_KIND_LABELS[k]}
              </option>
            ))}
          </select>
        </label>
        <label className="block text-sm">
          Place
          <select className={box} value={at} onChange={(e) => setAt(e.target.value)}>
            {stage.steps.map((s, i) => (
              <option key={s.id} value={i}>
                Before “{s.title}”
              </option>
            ))}
            <option value={stage.steps.length}>At the end</option>
          </select>
        </label>
      </div>
      <label className="block text-sm">
        Hold point
        <input className={box} value={title} onChange={(e) => setTitle(e.target.value)} required minLength={2} />
      </label>
      <label className="block text-sm">
        What it asks for
        <textarea
          className="mt-1 w-full rounded-md bg-hull-900 p-2 ring-1 ring-hull-600"
          value={detail}
          onChange={(e) => setDetail(e.target.value)}
        />
      </label>
      {act.error && (
        <p role="alert" className="text-sm text-rust-300">
          {errorOf(act.error)}
        </p>
      )}
      <div className="flex gap-2">
        <Button type="submit" disabled={act.isPending}>
          Add the hold point
        </Button>
        <Button tone="quiet" onClick={() => setOpen(false)}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

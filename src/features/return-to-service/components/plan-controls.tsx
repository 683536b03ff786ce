import { useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { STEP_KINDS, STEP_KIND_LABELS, type StepKind } from "../../../domain/return-to-service";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { stepBody, type RtsStage } from "../../../schemas/return-to-service";
import { useRtsAction } from "../api";

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

/** The form's text → the request body; stepBody (the server's own schema) validates it. */
const addStepForm = z
  .object({ kind: z.string(), title: z.string(), detail: z.string(), atIndex: z.string() })
  .transform((v) => ({ ...v, atIndex: Number(v.atIndex) }) as z.input<typeof stepBody>)
  .pipe(stepBody);

/** Adds a hold point to a stage being prepared: one of the trade's kinds or the crew's own, at a chosen place. */
export function AddHoldPoint({ siteId, stage }: { siteId: string; stage: RtsStage }) {
  const [open, setOpen] = useState(false);
  if (!open)
    return (
      <Button tone="quiet" onClick={() => setOpen(true)}>
        Add a hold point
      </Button>
    );
  return <AddHoldPointForm siteId={siteId} stage={stage} onDone={() => setOpen(false)} />;
}

function AddHoldPointForm({ siteId, stage, onDone }: { siteId: string; stage: RtsStage; onDone: () => void }) {
  const act = useRtsAction(siteId);
  const form = useSchemaForm(addStepForm, {
    kind: "custom",
    title: "",
    detail: "",
    atIndex: String(stage.steps.length),
  });
  const { register, formState, getValues, setValue } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const kind = register("kind");
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync({ method: "POST", path: `/return-to-service/stages/${stage.id}/steps`, body })
      .then(onDone, (err: unknown) => showSaveError(form, err)),
  );
  const message = formMessage(formState.errors);
  return (
    <form
      className="w-full space-y-2 rounded-md bg-hull-900 p-3"
      aria-label={`Add a hold point to ${stage.name}`}
      onSubmit={(ev) => void submit(ev)}
      noValidate
    >
      <div className="grid gap-2 sm:grid-cols-2">
        <SelectField
          label="Kind"
          {...kind}
          onChange={(ev) => {
            void kind.onChange(ev);
            // A kind of the trade names the hold point, unless a name is typed already.
            const k = ev.target.value as StepKind;
            if (!getValues("title") && k !== "custom") setValue("title", STEP_KIND_LABELS[k]);
          }}
          error={e("kind")}
        >
          {STEP_KINDS.map((k) => (
            <option key={k} value={k}>
              {STEP_KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Place" {...register("atIndex")} error={e("atIndex")}>
          {stage.steps.map((s, i) => (
            <option key={s.id} value={i}>
              Before “{s.title}”
            </option>
          ))}
          <option value={stage.steps.length}>At the end</option>
        </SelectField>
      </div>
      <TextField label="Hold point" {...register("title")} required error={e("title")} />
      <TextArea label="What it asks for" {...register("detail")} error={e("detail")} />
      {message && (
        <p role="alert" className="text-sm text-rust-300">
          {message}
        </p>
      )}
      <div className="flex gap-2">
        <Button type="submit" disabled={formState.isSubmitting}>
          Add the hold point
        </Button>
        <Button tone="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

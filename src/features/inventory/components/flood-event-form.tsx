import { useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { WATER_TYPE_LABELS, WATER_TYPES } from "../../../domain/vocab";
import { fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { createFloodEventBody } from "../../../schemas/inventory";
import { useFloodEventMutations } from "../api";
import type { FloodEvent } from "../contract";
import { ConflictNotice, conflictRecord } from "./conflict-notice";

const LABELS = {
  occurredOn: "Date",
  waterType: "Water",
  maxDepthM: "Max depth (m)",
  hoursSubmerged: "Hours submerged",
  notes: "Notes",
};

/**
 * The form's text → the request body; createFloodEventBody (the server's own schema) validates it.
 * A correction sends every field, so the same schema holds for it; the version is the record's, added on sending.
 */
const floodEventForm = z
  .object({
    occurredOn: z.string(),
    waterType: z.string(),
    maxDepthM: numberText,
    hoursSubmerged: numberText,
    notes: z.string(),
  })
  .transform((v) => v as z.input<typeof createFloodEventBody>)
  .pipe(createFloodEventBody);
type Draft = z.input<typeof floodEventForm>;
const toDraft = (e?: FloodEvent | null): Draft => ({
  occurredOn: e?.occurredOn ?? "",
  waterType: e?.waterType ?? "salt",
  maxDepthM: e?.maxDepthM?.toString() ?? "",
  hoursSubmerged: e?.hoursSubmerged?.toString() ?? "",
  notes: e?.notes ?? "",
});

/** Records (or corrects) the site's flood: the water type drives every recommendation. */
export function FloodEventForm({
  siteId,
  event,
  onDone,
}: {
  siteId: string;
  event?: FloodEvent | null;
  onDone?: () => void;
}) {
  // The record the form started from (its version goes with the save): not an input.
  const [base, setBase] = useState<FloodEvent | null>(event ?? null);
  const form = useSchemaForm(floodEventForm, toDraft(event));
  const { register, formState } = form;
  const errors = formState.errors;
  const e = (name: keyof Draft) => fieldError(errors, name);
  const m = useFloodEventMutations(siteId);
  const active = base ? m.update : m.create;
  const conflict = conflictRecord<FloodEvent>(m.update.error);
  // A stale version shows as the conflict notice below, not as a message.
  const message = conflict ? null : formMessage(errors, "above");

  const save = (version?: number) =>
    form.handleSubmit((body) =>
      (base
        ? m.update.mutateAsync({ id: base.id, version: version ?? base.version, ...body })
        : m.create.mutateAsync(body)
      ).then(
        (r) => {
          setBase(r);
          onDone?.();
        },
        (err: unknown) => {
          if (!conflictRecord(err)) showSaveError(form, err);
        },
      ),
    )();

  return (
    <form
      onSubmit={(ev) => {
        ev.preventDefault();
        void save();
      }}
      noValidate
      className="grid gap-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 sm:grid-cols-2"
      aria-label="Flood event"
    >
      <TextField label="Date of the flood" type="date" required {...register("occurredOn")} error={e("occurredOn")} />
      <SelectField
        label="Water"
        {...register("waterType")}
        error={e("waterType")}
        hint="Salt, brackish and sewage water leave corrosive, conductive residue."
      >
        {WATER_TYPES.map((w) => (
          <option key={w} value={w}>
            {WATER_TYPE_LABELS[w]}
          </option>
        ))}
      </SelectField>
      <TextField label="Deepest water (m)" inputMode="decimal" {...register("maxDepthM")} error={e("maxDepthM")} />
      <TextField
        label="Hours submerged"
        inputMode="decimal"
        {...register("hoursSubmerged")}
        error={e("hoursSubmerged")}
      />
      <TextArea className="sm:col-span-2" label="Notes" {...register("notes")} error={e("notes")} />
      {conflict && base && (
        <div className="sm:col-span-2">
          <ConflictNotice
            base={base}
            current={conflict}
            labels={LABELS}
            busy={m.update.isPending}
            onUseTheirs={() => {
              setBase(conflict);
              form.reset(toDraft(conflict));
              m.update.reset();
            }}
            onApplyMine={() => {
              setBase(conflict);
              void save(conflict.version);
            }}
          />
        </div>
      )}
      {message && (
        <p role="alert" className="text-sm text-flare-300 sm:col-span-2">
          {message}
        </p>
      )}
      {active.isSuccess && (
        <p role="status" className="text-sm text-kelp-300 sm:col-span-2">
          Flood event saved.
        </p>
      )}
      <div className="sm:col-span-2">
        <Button type="submit" disabled={active.isPending}>
          {base ? "Save changes" : "Record the flood"}
        </Button>
      </div>
    </form>
  );
}

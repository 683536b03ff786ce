import { useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import { COMPONENT_KIND_LABELS, COMPONENT_KINDS } from "../../../domain/vocab";
import { fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { createLineBody, type CreateLineBody } from "../../../schemas/parts";
import { useCreateLine } from "../api";

/** The form's text → the request body; createLineBody (the server's own schema) validates it. */
const newLineForm = z
  .object({
    kind: z.string(),
    need: z.string(),
    qty: numberText,
    maker: z.string(),
    model: z.string(),
    ratingAmps: numberText,
    voltageRating: numberText,
    estimatedUnitCost: numberText,
    notes: z.string(),
  })
  .transform((v) => v as CreateLineBody)
  .pipe(createLineBody);
const blank = {
  kind: "other",
  need: "",
  qty: "1",
  maker: "",
  model: "",
  ratingAmps: "",
  voltageRating: "",
  estimatedUnitCost: "",
  notes: "",
};

/** Spares, consumables and tools no position asks for: added by the scrounger or the curator. */
export function NewLineForm({ siteId }: { siteId: string }) {
  const create = useCreateLine(siteId);
  const form = useSchemaForm(newLineForm, blank);
  const { register, formState } = form;
  const e = (name: keyof typeof blank) => fieldError(formState.errors, name);
  const [ok, setOk] = useState<string | null>(null);
  const submit = form.handleSubmit((body) =>
    create.mutateAsync(body).then(
      () => {
        form.reset();
        setOk("Added to the list.");
      },
      (err: unknown) => showSaveError(form, err, { fallback: "That did not work." }),
    ),
  );
  const message = formMessage(formState.errors) ?? ok;

  return (
    <details className="no-print rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <summary className="min-h-11 cursor-pointer py-2 font-semibold">
        Add a part by hand (spares, consumables, tools)
      </summary>
      <form
        onSubmit={(ev) => {
          setOk(null);
          void submit(ev);
        }}
        noValidate
        className="mt-3 grid gap-3 sm:grid-cols-3"
      >
        <SelectField label="Kind" {...register("kind")} error={e("kind")}>
          {COMPONENT_KINDS.map((k) => (
            <option key={k} value={k}>
              {COMPONENT_KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <TextField
          label="What exactly"
          {...register("need")}
          hint="e.g. spare lamps, arc chute, contact fingers"
          error={e("need")}
        />
        <TextField label="Quantity" {...register("qty")} type="number" min={1} required error={e("qty")} />
        <TextField
          label="Rating (A)"
          {...register("ratingAmps")}
          type="number"
          step="any"
          min={0}
          error={e("ratingAmps")}
        />
        <TextField
          label="Voltage rating (V)"
          {...register("voltageRating")}
          type="number"
          min={1}
          error={e("voltageRating")}
        />
        <MoneyField label="Estimated unit cost" {...register("estimatedUnitCost")} error={e("estimatedUnitCost")} />
        <TextField label="Maker" {...register("maker")} error={e("maker")} />
        <TextField label="Model" {...register("model")} error={e("model")} />
        <TextField label="Internal notes" {...register("notes")} error={e("notes")} />
        <div className="sm:col-span-3 flex items-center gap-3">
          <Button type="submit" disabled={create.isPending}>
            Add to the list
          </Button>
          {message && (
            <p role="status" className="text-mist">
              {message}
            </p>
          )}
        </div>
      </form>
    </details>
  );
}

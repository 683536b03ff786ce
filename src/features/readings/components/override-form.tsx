import { useMemo } from "react";
import { z } from "zod";
import { TextField } from "../../../components/field";
import { fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { overrideBody, type ComponentOverride, type OverrideBody } from "../../../schemas/readings";
import { useRemoveOverride, useSaveOverride } from "../api";
import { FormShell, NumberField } from "./form-bits";

/** The form's text → the request body; overrideBody (the server's own schema) validates it. */
const overrideForm = (version: number | undefined) =>
  z
    .object({ minimumMegohms: numberText, maximumMicroOhms: numberText, source: z.string() })
    .transform((v) => ({ ...v, version }) as OverrideBody)
    .pipe(overrideBody);

/** A manufacturer's value replaces the table for this one component (curator only). */
export function OverrideForm({
  siteId,
  componentId,
  current,
}: {
  siteId: string;
  componentId: string;
  current: ComponentOverride | null;
}) {
  const remove = useRemoveOverride(siteId, componentId);
  return (
    <div className="space-y-2">
      {/* A saved or removed override starts the form again from the stored values. */}
      <OverrideFields key={current?.version ?? 0} siteId={siteId} componentId={componentId} current={current} />
      {current && (
        <button
          type="button"
          onClick={() => remove.mutate(undefined)}
          className="min-h-11 rounded-md px-4 ring-1 ring-hull-600 hover:bg-hull-700"
        >
          Remove the manufacturer's values (back to the site criteria)
        </button>
      )}
    </div>
  );
}

function OverrideFields({
  siteId,
  componentId,
  current,
}: {
  siteId: string;
  componentId: string;
  current: ComponentOverride | null;
}) {
  const save = useSaveOverride(siteId, componentId);
  const schema = useMemo(() => overrideForm(current?.version), [current?.version]);
  const form = useSchemaForm(schema, {
    minimumMegohms: current?.minimumMegohms == null ? "" : String(current.minimumMegohms),
    maximumMicroOhms: current?.maximumMicroOhms == null ? "" : String(current.maximumMicroOhms),
    source: current?.source ?? "",
  });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const submit = form.handleSubmit((body) =>
    save.mutateAsync(body).then(undefined, (err: unknown) => showSaveError(form, err)),
  );
  return (
    <FormShell
      title="Manufacturer's values for this component"
      onSubmit={(ev) => void submit(ev)}
      error={formMessage(formState.errors)}
      busy={save.isPending}
      submitLabel="Save manufacturer's values"
    >
      <NumberField label="Minimum insulation (MΩ)" {...register("minimumMegohms")} error={e("minimumMegohms")} />
      <NumberField
        label="Maximum contact resistance per pole (µΩ)"
        {...register("maximumMicroOhms")}
        error={e("maximumMicroOhms")}
      />
      <TextField
        label="Source (document, page)"
        {...register("source")}
        error={e("source")}
        className="sm:col-span-2"
      />
    </FormShell>
  );
}

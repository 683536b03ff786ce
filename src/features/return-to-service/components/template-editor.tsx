import { useState } from "react";
import { useFieldArray } from "react-hook-form";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { DEFAULT_TEMPLATE, STEP_KINDS, STEP_KIND_LABELS } from "../../../domain/return-to-service";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { settingsBody, type RtsSettings } from "../../../schemas/return-to-service";
import { useRtsAction } from "../api";

/** The form's text → the request body; settingsBody (the server's own schema) validates it. */
const templateForm = z
  .object({
    insulationMaxAgeDays: numberText,
    template: z.array(z.object({ kind: z.string(), title: z.string(), detail: z.string() })),
    version: z.number(),
  })
  .transform((v) => v as z.input<typeof settingsBody>)
  .pipe(settingsBody);
type TemplateFormValues = z.input<typeof templateForm>;

const valuesOf = (s: RtsSettings): TemplateFormValues => ({
  insulationMaxAgeDays: String(s.insulationMaxAgeDays),
  template: s.template.map(({ kind, title, detail }) => ({ kind, title, detail })),
  version: s.version,
});

/**
 * The site's hold-point template, edited by the curator: new stages copy it; stages already
 * planned keep their own hold points. A stale save gets 409 and the template as it is now.
 */
export function TemplateEditor({
  siteId,
  settings,
  canEdit,
}: {
  siteId: string;
  settings: RtsSettings;
  canEdit: boolean;
}) {
  const act = useRtsAction(siteId);
  const form = useSchemaForm(templateForm, valuesOf(settings));
  const { register, control, formState } = form;
  const errors = formState.errors;
  const e = (name: Parameters<typeof register>[0]) => fieldError(errors, name);
  const rows = useFieldArray({ control, name: "template" });
  // "Saved" stays until the next change.
  const [saved, setSaved] = useState(false);
  const submit = form.handleSubmit((body) => {
    setSaved(false);
    return act.mutateAsync({ method: "PUT", path: "/return-to-service/settings", body }).then(
      (r) => {
        form.reset(valuesOf((r as { settings: RtsSettings }).settings));
        setSaved(true);
      },
      (err: unknown) => {
        // Someone saved first: show theirs, so nothing is overwritten unseen.
        const cur =
          err instanceof ApiError && err.status === 409 ? (err.current as RtsSettings | undefined) : undefined;
        if (cur) form.reset(valuesOf(cur));
        showSaveError(form, err);
      },
    );
  });
  const message = formMessage(errors);
  const listError = e("template") ?? errors.template?.root?.message;
  return (
    <form aria-label="Hold-point template" className="space-y-4" onSubmit={(ev) => void submit(ev)} noValidate>
      <fieldset disabled={!canEdit} className="space-y-4">
        <TextField
          className="max-w-xs"
          label="An insulation reading counts for (days)"
          {...register("insulationMaxAgeDays")}
          inputMode="numeric"
          required
          error={e("insulationMaxAgeDays")}
        />
        <ol className="space-y-3" aria-label="Hold points of a new stage">
          {rows.fields.map((r, i) => (
            <li key={r.id} className="space-y-2 rounded-md bg-hull-800 p-3 ring-1 ring-hull-600">
              <div className="grid gap-2 sm:grid-cols-[14rem_1fr]">
                <SelectField
                  label={`Kind (${i + 1})`}
                  {...register(`template.${i}.kind`)}
                  error={e(`template.${i}.kind`)}
                >
                  {STEP_KINDS.map((k) => (
                    <option key={k} value={k}>
                      {STEP_KIND_LABELS[k]}
                    </option>
                  ))}
                </SelectField>
                <TextField
                  label={`Hold point (${i + 1})`}
                  {...register(`template.${i}.title`)}
                  required
                  error={e(`template.${i}.title`)}
                />
              </div>
              <TextArea
                label={`What it asks for (${i + 1})`}
                {...register(`template.${i}.detail`)}
                error={e(`template.${i}.detail`)}
              />
              {canEdit && (
                <div className="flex flex-wrap gap-2 text-sm">
                  <Button tone="quiet" disabled={i === 0} onClick={() => rows.move(i, i - 1)}>
                    <span aria-hidden>↑</span> Move up
                  </Button>
                  <Button tone="quiet" disabled={i === rows.fields.length - 1} onClick={() => rows.move(i, i + 1)}>
                    <span aria-hidden>↓</span> Move down
                  </Button>
                  <Button tone="quiet" disabled={rows.fields.length === 1} onClick={() => rows.remove(i)}>
                    Remove
                  </Button>
                </div>
              )}
            </li>
          ))}
        </ol>
      </fieldset>
      {listError && (
        <p role="alert" className="text-sm text-rust-300">
          {listError}
        </p>
      )}
      {message && (
        <p role="alert" className="text-sm text-rust-300">
          {message}
        </p>
      )}
      {saved && !formState.isDirty && (
        <p role="status" className="text-sm">
          Saved. New stages take these hold points; stages already planned keep theirs.
        </p>
      )}
      {canEdit && (
        <div className="flex flex-wrap gap-2">
          <Button tone="quiet" onClick={() => rows.append({ kind: "custom", title: "", detail: "" })}>
            Add a hold point
          </Button>
          <Button
            tone="quiet"
            onClick={() => rows.replace(DEFAULT_TEMPLATE.map(({ kind, title, detail }) => ({ kind, title, detail })))}
          >
            Start again from Tideline's default
          </Button>
          <Button type="submit" disabled={formState.isSubmitting}>
            Save the template
          </Button>
        </div>
      )}
    </form>
  );
}

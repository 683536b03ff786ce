import { useEffect, useId, useState, type ReactNode } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { fieldError, formMessage, showSaveError, useSchemaForm } from "../../../lib/form";

/**
 * One setting of the site chosen from a list (its currency, its time zone): shown as a sentence to
 * those who may not change it, as a select and a save button to those who may. `check` is the
 * shared body schema's rule for the value, so the form refuses what the server would.
 */
export function SiteSettingForm({
  current,
  canEdit,
  readOnly,
  label,
  choices,
  check,
  save,
  pending,
  submitLabel,
  savedNote,
  selectClassName = "",
  labelClassName = "",
}: {
  current: string;
  canEdit: boolean;
  readOnly: ReactNode;
  label: string;
  choices: Array<{ value: string; label: string }>;
  check: z.ZodType<string, string>;
  save: (value: string) => Promise<unknown>;
  pending: boolean;
  submitLabel: string;
  savedNote: string;
  selectClassName?: string;
  labelClassName?: string;
}) {
  const id = useId();
  const form = useSchemaForm(z.object({ value: check }), { value: current });
  const errors = form.formState.errors;
  const value = form.watch("value");
  const [saved, setSaved] = useState<string | null>(null);
  // The site's setting changed (a save, someone else's, or a fresher copy than the one first shown):
  // the select follows it unless a choice is being made.
  const { isDirty } = form.formState;
  useEffect(() => {
    if (!isDirty) form.reset({ value: current });
  }, [current, isDirty, form]);
  if (!canEdit) return <p className="text-sm text-mist">{readOnly}</p>;
  const submit = form.handleSubmit(({ value }) =>
    save(value).then(
      () => {
        setSaved(value);
        form.reset({ value });
      },
      (err) => showSaveError(form, err),
    ),
  );
  const message = formMessage(errors) && (fieldError(errors, "value") ?? formMessage(errors));
  return (
    <form className="flex flex-wrap items-end gap-2 text-sm" noValidate onSubmit={(ev) => void submit(ev)}>
      <label htmlFor={id} className={`flex flex-col gap-1 ${labelClassName}`}>
        <span>{label}</span>
        <select
          id={id}
          {...form.register("value")}
          className={`min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2 ${selectClassName}`}
        >
          {choices.map((c) => (
            <option key={c.value} value={c.value}>
              {c.label}
            </option>
          ))}
        </select>
      </label>
      <Button type="submit" tone="quiet" disabled={value === current || pending}>
        {submitLabel}
      </Button>
      <span role="status" className="min-h-5">
        {saved === current && value === current && !message && savedNote}
        {message && <span className="text-flare-300">{message}</span>}
      </span>
    </form>
  );
}

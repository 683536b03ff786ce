import { useState, type FormEvent } from "react";
import { TextField } from "../../../components/field";
import { overrideBody, type ComponentOverride } from "../../../schemas/readings";
import { useRemoveOverride, useSaveOverride } from "../api";
import { fieldErrors, numOrNull } from "../format";
import { FormShell, NumberField, saveErrors } from "./form-bits";

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
  const save = useSaveOverride(siteId, componentId);
  const remove = useRemoveOverride(siteId, componentId);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const parsed = overrideBody.safeParse({
      minimumMegohms: numOrNull(f.get("minimumMegohms")),
      maximumMicroOhms: numOrNull(f.get("maximumMicroOhms")),
      source: String(f.get("source") ?? ""),
      version: current?.version,
    });
    if (!parsed.success) {
      setErrors(fieldErrors(parsed.error.issues));
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    setMessage(null);
    save.mutate(parsed.data, {
      onError: (err) => {
        const s = saveErrors(err);
        setErrors(s.fields);
        setMessage(s.message);
      },
    });
  }

  return (
    <div className="space-y-2">
      <FormShell
        key={current?.version ?? 0}
        title="Manufacturer's values for this component"
        onSubmit={submit}
        error={message}
        busy={save.isPending}
        submitLabel="Save manufacturer's values"
      >
        <NumberField
          label="Minimum insulation (MΩ)"
          name="minimumMegohms"
          defaultValue={current?.minimumMegohms ?? ""}
          error={errors.minimumMegohms}
        />
        <NumberField
          label="Maximum contact resistance per pole (µΩ)"
          name="maximumMicroOhms"
          defaultValue={current?.maximumMicroOhms ?? ""}
          error={errors.maximumMicroOhms}
        />
        <TextField
          label="Source (document, page)"
          name="source"
          defaultValue={current?.source ?? ""}
          error={errors.source}
          className="sm:col-span-2"
        />
      </FormShell>
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

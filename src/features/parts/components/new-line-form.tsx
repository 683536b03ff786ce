import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import { COMPONENT_KIND_LABELS, COMPONENT_KINDS, type ComponentKind } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { useCreateLine } from "../api";

const numOrNull = (v: FormDataEntryValue | null) => (v === null || String(v).trim() === "" ? null : Number(v));

/** Spares, consumables and tools no position asks for: added by the scrounger or the curator. */
export function NewLineForm({ siteId }: { siteId: string }) {
  const create = useCreateLine(siteId);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    setErrors({});
    create.mutate(
      {
        kind: f.get("kind") as ComponentKind,
        need: String(f.get("need") ?? ""),
        qty: Number(f.get("qty")),
        maker: String(f.get("maker") ?? ""),
        model: String(f.get("model") ?? ""),
        ratingAmps: numOrNull(f.get("ratingAmps")),
        voltageRating: numOrNull(f.get("voltageRating")),
        estimatedUnitCost: numOrNull(f.get("estimatedUnitCost")),
        notes: String(f.get("notes") ?? ""),
      },
      {
        onSuccess: () => {
          form.reset();
          setMessage("Added to the list.");
        },
        onError: (err) => {
          setMessage(err instanceof ApiError ? err.message : "That did not work.");
          if (err instanceof ApiError) setErrors(err.fields);
        },
      },
    );
  }

  return (
    <details className="no-print rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <summary className="min-h-11 cursor-pointer py-2 font-semibold">
        Add a part by hand (spares, consumables, tools)
      </summary>
      <form onSubmit={submit} className="mt-3 grid gap-3 sm:grid-cols-3">
        <SelectField label="Kind" name="kind" defaultValue="other" error={errors.kind}>
          {COMPONENT_KINDS.map((k) => (
            <option key={k} value={k}>
              {COMPONENT_KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <TextField
          label="What exactly"
          name="need"
          hint="e.g. spare lamps, arc chute, contact fingers"
          error={errors.need}
        />
        <TextField label="Quantity" name="qty" type="number" min={1} defaultValue={1} required error={errors.qty} />
        <TextField label="Rating (A)" name="ratingAmps" type="number" step="any" min={0} error={errors.ratingAmps} />
        <TextField label="Voltage rating (V)" name="voltageRating" type="number" min={1} error={errors.voltageRating} />
        <MoneyField label="Estimated unit cost" name="estimatedUnitCost" error={errors.estimatedUnitCost} />
        <TextField label="Maker" name="maker" error={errors.maker} />
        <TextField label="Model" name="model" error={errors.model} />
        <TextField label="Internal notes" name="notes" error={errors.notes} />
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

import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { COMPONENT_KIND_LABELS, COMPONENT_KINDS } from "../../../domain/vocab";
import { blankAsNull, fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { generatePositionsBody } from "../../../schemas/inventory";
import { usePositionMutations } from "../api";
import type { Section } from "../contract";

/** The form's text → the request body; generatePositionsBody (the server's own schema) validates it. */
const generateForm = z
  .object({
    prefix: z.string(),
    from: numberText,
    to: numberText,
    gridRow: numberText,
    startCol: numberText,
    kind: z.string(),
    sectionId: blankAsNull,
  })
  .transform((v) => v as z.input<typeof generatePositionsBody>)
  .pipe(generatePositionsBody);
type GenerateFormValues = z.input<typeof generateForm>;

/** Creates a whole row at once: "1-1" … "1-12" left to right on one grid row. */
export function GeneratePositions({
  siteId,
  boardId,
  sections,
  gridRows,
}: {
  siteId: string;
  boardId: string;
  sections: Section[];
  gridRows: number;
}) {
  const m = usePositionMutations(siteId, boardId);
  const form = useSchemaForm(generateForm, {
    prefix: "1-",
    from: "1",
    to: "12",
    gridRow: "1",
    startCol: "1",
    kind: "molded_case_breaker",
    sectionId: "",
  });
  const { register, formState } = form;
  const errors = formState.errors;
  const e = (name: keyof GenerateFormValues) => fieldError(errors, name);
  const message = formMessage(errors, "above");
  const [prefix, fromText, toText] = form.watch(["prefix", "from", "to"]);
  const from = Number(fromText),
    to = Number(toText);
  const sample =
    fromText.trim() && toText.trim() && Number.isInteger(from) && Number.isInteger(to) && to >= from
      ? `${prefix}${from} … ${prefix}${to} (${to - from + 1})`
      : "";
  const submit = form.handleSubmit((body) =>
    m.generate.mutateAsync(body).catch((err: unknown) => showSaveError(form, err)),
  );
  return (
    <form
      onSubmit={(ev) => void submit(ev)}
      noValidate
      aria-label="Generate a row of positions"
      className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
    >
      <h2 className="text-lg font-bold">Generate a row</h2>
      <div className="mt-2 grid grid-cols-2 gap-3 sm:grid-cols-4 lg:grid-cols-7">
        <TextField label="Prefix" className="[&_input]:font-mono" {...register("prefix")} error={e("prefix")} />
        <TextField label="From" inputMode="numeric" {...register("from")} error={e("from")} />
        <TextField label="To" inputMode="numeric" {...register("to")} error={e("to")} />
        <TextField
          label={`Grid row (1–${gridRows})`}
          inputMode="numeric"
          {...register("gridRow")}
          error={e("gridRow")}
        />
        <TextField label="Starting column" inputMode="numeric" {...register("startCol")} error={e("startCol")} />
        <SelectField label="Kind" {...register("kind")} error={e("kind")}>
          {COMPONENT_KINDS.map((k) => (
            <option key={k} value={k}>
              {COMPONENT_KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Section" {...register("sectionId")} error={e("sectionId")}>
          <option value="">No section</option>
          {sections.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
        </SelectField>
      </div>
      <div className="mt-3 flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={m.generate.isPending}>
          Create {sample ? <span className="font-mono">{sample}</span> : "positions"}
        </Button>
        {m.generate.isSuccess && (
          <p role="status" className="text-sm text-kelp-300">
            Created {m.generate.data.positions.length} positions.
          </p>
        )}
        {message && (
          <p role="alert" className="text-sm text-flare-300">
            {message}
          </p>
        )}
      </div>
    </form>
  );
}

import { Fragment, useMemo, useState, type FormEvent, type ReactNode } from "react";
import type { FieldValues, UseFormReturn } from "react-hook-form";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import { HERITAGE_RULE_LABELS, HERITAGE_RULES } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { heritageRuleBody, updateLineBody, type PartLine, type UpdateLineBody } from "../../../schemas/parts";
import { useSetHeritageRule, useUpdateLine } from "../api";

const STALE = "Someone changed this line meanwhile; the page now shows their version. Try again.";

interface Note {
  note: string | null;
  setNote: (m: string | null) => void;
}

/**
 * A form over one stored version of the line: a new version (a save, or someone else's) starts it
 * again from the stored values, while the note above it (saved, or stale) outlives it.
 */
function PerVersion({ line, children }: { line: PartLine; children: (n: Note) => ReactNode }) {
  const [note, setNote] = useState<string | null>(null);
  return <Fragment key={line.version}>{children({ note, setNote })}</Fragment>;
}

/**
 * Saves through `save`; `done` is said on success. A stale version is said above the form (the page
 * refetches the line); any other refusal as the server said, beside the fields.
 */
function useLineSave<In extends FieldValues, Out>(
  form: UseFormReturn<In, unknown, Out>,
  save: (body: Out) => Promise<unknown>,
  done: string,
  { note, setNote }: Note,
) {
  const submit = form.handleSubmit((body) =>
    save(body).then(
      () => setNote(done),
      (err: unknown) => {
        if (err instanceof ApiError && err.status === 409) setNote(STALE);
        else showSaveError(form, err, { fallback: "That did not work." });
      },
    ),
  );
  return {
    message: formMessage(form.formState.errors) ?? note,
    onSubmit: (ev: FormEvent<HTMLFormElement>) => {
      setNote(null);
      void submit(ev);
    },
  };
}

/** The curator's call: how strictly the replacement must follow the original. */
export function HeritageRuleForm({ siteId, line }: { siteId: string; line: PartLine }) {
  return <PerVersion line={line}>{(n) => <HeritageRuleFields siteId={siteId} line={line} {...n} />}</PerVersion>;
}

function HeritageRuleFields({ siteId, line, ...n }: { siteId: string; line: PartLine } & Note) {
  const set = useSetHeritageRule(siteId, line.id);
  const schema = useMemo(
    () =>
      z
        .object({ heritageRule: z.string() })
        .transform((v) => ({ ...v, version: line.version }) as z.input<typeof heritageRuleBody>)
        .pipe(heritageRuleBody),
    [line.version],
  );
  const form = useSchemaForm(schema, { heritageRule: line.heritageRule });
  const { message, onSubmit } = useLineSave(form, (b) => set.mutateAsync(b), "Heritage rule saved.", n);
  return (
    <form className="flex flex-wrap items-end gap-3" onSubmit={onSubmit} noValidate>
      <SelectField
        label="Heritage rule (curator)"
        {...form.register("heritageRule")}
        error={fieldError(form.formState.errors, "heritageRule")}
        className="min-w-64"
      >
        {HERITAGE_RULES.map((r) => (
          <option key={r} value={r}>
            {HERITAGE_RULE_LABELS[r]}
          </option>
        ))}
      </SelectField>
      <Button type="submit" tone="quiet" disabled={set.isPending}>
        Set rule
      </Button>
      {message && (
        <p role="status" className="text-mist">
          {message}
        </p>
      )}
    </form>
  );
}

/** The form's text → the PATCH body; updateLineBody (the server's own schema) validates it. */
const lineEditForm = (version: number) =>
  z
    .object({ estimatedUnitCost: numberText, manualQty: numberText, notes: z.string() })
    .transform((v) => ({ ...v, version, manualQty: v.manualQty ?? 0 }) as UpdateLineBody)
    .pipe(updateLineBody);

export function LineEditForm({ siteId, line }: { siteId: string; line: PartLine }) {
  return <PerVersion line={line}>{(n) => <LineEditFields siteId={siteId} line={line} {...n} />}</PerVersion>;
}

function LineEditFields({ siteId, line, ...n }: { siteId: string; line: PartLine } & Note) {
  const update = useUpdateLine(siteId, line.id);
  const schema = useMemo(() => lineEditForm(line.version), [line.version]);
  const form = useSchemaForm(schema, {
    estimatedUnitCost: line.estimatedUnitCost === null ? "" : String(line.estimatedUnitCost),
    manualQty: String(line.manualQty),
    notes: line.notes,
  });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const { message, onSubmit } = useLineSave(form, (b) => update.mutateAsync(b), "Saved.", n);
  return (
    <form
      onSubmit={onSubmit}
      noValidate
      className="grid gap-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 sm:grid-cols-2"
      aria-labelledby="edit-title"
    >
      <h2 id="edit-title" className="text-lg font-bold sm:col-span-2">
        Working notes
      </h2>
      <MoneyField label="Estimated unit cost" {...register("estimatedUnitCost")} error={e("estimatedUnitCost")} />
      <TextField
        label="Extra quantity (spares)"
        {...register("manualQty")}
        type="number"
        min={0}
        error={e("manualQty")}
        hint="Added to what the positions need"
      />
      <TextArea
        label="Internal notes (never shared)"
        {...register("notes")}
        className="sm:col-span-2"
        error={e("notes")}
      />
      <div className="flex items-center gap-3 sm:col-span-2">
        <Button type="submit" disabled={update.isPending}>
          Save
        </Button>
        {message && (
          <p role="status" className="text-mist">
            {message}
          </p>
        )}
      </div>
    </form>
  );
}

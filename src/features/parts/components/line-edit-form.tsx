import { useMemo, useState } from "react";
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

/**
 * A refused save. A stale version is said above the form, which starts again from the current line
 * (the page refetches it); anything else as the server said, beside the fields.
 */
function refused<In extends FieldValues, Out>(
  form: UseFormReturn<In, unknown, Out>,
  err: unknown,
  setNote: (m: string | null) => void,
) {
  if (err instanceof ApiError && err.status === 409) setNote(STALE);
  else showSaveError(form, err, { fallback: "That did not work." });
}

/** The curator's call: how strictly the replacement must follow the original. */
export function HeritageRuleForm({ siteId, line }: { siteId: string; line: PartLine }) {
  const [note, setNote] = useState<string | null>(null);
  // A new version (a save, or someone else's) starts the form again from the stored rule.
  return <HeritageRuleFields key={line.version} siteId={siteId} line={line} note={note} setNote={setNote} />;
}

function HeritageRuleFields({
  siteId,
  line,
  note,
  setNote,
}: {
  siteId: string;
  line: PartLine;
  note: string | null;
  setNote: (m: string | null) => void;
}) {
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
  const submit = form.handleSubmit((body) =>
    set.mutateAsync(body).then(
      () => setNote("Heritage rule saved."),
      (err: unknown) => refused(form, err, setNote),
    ),
  );
  const message = formMessage(form.formState.errors) ?? note;
  return (
    <form
      className="flex flex-wrap items-end gap-3"
      onSubmit={(ev) => {
        setNote(null);
        void submit(ev);
      }}
    >
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
  const [note, setNote] = useState<string | null>(null);
  // A new version (a save, or someone else's) starts the form again from the stored values.
  return <LineEditFields key={line.version} siteId={siteId} line={line} note={note} setNote={setNote} />;
}

function LineEditFields({
  siteId,
  line,
  note,
  setNote,
}: {
  siteId: string;
  line: PartLine;
  note: string | null;
  setNote: (m: string | null) => void;
}) {
  const update = useUpdateLine(siteId, line.id);
  const schema = useMemo(() => lineEditForm(line.version), [line.version]);
  const form = useSchemaForm(schema, {
    estimatedUnitCost: line.estimatedUnitCost === null ? "" : String(line.estimatedUnitCost),
    manualQty: String(line.manualQty),
    notes: line.notes,
  });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const submit = form.handleSubmit((body) =>
    update.mutateAsync(body).then(
      () => setNote("Saved."),
      (err: unknown) => refused(form, err, setNote),
    ),
  );
  const message = formMessage(formState.errors) ?? note;
  return (
    <form
      onSubmit={(ev) => {
        setNote(null);
        void submit(ev);
      }}
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

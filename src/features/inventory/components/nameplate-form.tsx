import { useMemo, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { HERITAGE, HERITAGE_LABELS, type ComponentKind } from "../../../domain/vocab";
import { fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { patchComponentBody } from "../../../schemas/inventory";
import { useUpdateComponent } from "../api";
import type { Component } from "../contract";
import { ConflictNotice, conflictRecord } from "./conflict-notice";
import { NAMEPLATE_LABELS, NUMERIC_NAMEPLATE, nameplateFieldsFor, type NameplateKey } from "./nameplate-fields";

const ALL_LABELS: Record<string, string> = {
  ...NAMEPLATE_LABELS,
  heritage: "Heritage",
  tagNumber: "Tag number",
  notes: "Notes",
};
const KEYS = Object.keys(NAMEPLATE_LABELS) as NameplateKey[];

/**
 * The form's text → the PATCH body (without the version: the record's, added on sending);
 * patchComponentBody (the server's own schema) validates it. Only the nameplate fields of the
 * component's kind go, with heritage, tag and notes.
 */
const nameplateForm = (kind: ComponentKind) =>
  z
    .object({
      ...(Object.fromEntries(KEYS.map((k) => [k, NUMERIC_NAMEPLATE.has(k) ? numberText : z.string()])) as Record<
        NameplateKey,
        typeof numberText | z.ZodString
      >),
      heritage: z.string(),
      tagNumber: z.string(),
      notes: z.string(),
    })
    .transform((v) => {
      const body: Record<string, unknown> = { heritage: v.heritage, tagNumber: v.tagNumber, notes: v.notes };
      for (const k of nameplateFieldsFor(kind)) body[k] = v[k];
      return body as Omit<z.input<typeof patchComponentBody>, "version">;
    })
    .pipe(patchComponentBody.omit({ version: true }));
type Draft = Record<NameplateKey | "heritage" | "tagNumber" | "notes", string>;
const toDraft = (c: Component): Draft => {
  const d = { heritage: c.heritage, tagNumber: c.tagNumber ?? "", notes: c.notes } as Draft;
  for (const k of KEYS) d[k] = c[k] == null ? "" : String(c[k]);
  return d;
};

export function NameplateForm({ siteId, component }: { siteId: string; component: Component }) {
  // The record the form started from (its version goes with the save): not an input.
  const [base, setBase] = useState(component);
  const schema = useMemo(() => nameplateForm(base.kind), [base.kind]);
  const form = useSchemaForm(schema, toDraft(component));
  const { register, formState } = form;
  const errors = formState.errors;
  const e = (name: keyof Draft) => fieldError(errors, name);
  const m = useUpdateComponent(siteId);
  const conflict = conflictRecord<Component>(m.error);
  // A stale version shows as the conflict notice below, not as a message.
  const message = conflict ? null : formMessage(errors, "above");
  const save = (version: number) =>
    form.handleSubmit((body) =>
      m.mutateAsync({ id: base.id, ...body, version }).then(
        (c) => {
          setBase(c);
          form.reset(toDraft(c));
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
        void save(base.version);
      }}
      noValidate
      aria-label="Nameplate"
      className="grid grid-cols-2 gap-3"
    >
      {nameplateFieldsFor(base.kind).map((k) => (
        <TextField
          key={k}
          label={NAMEPLATE_LABELS[k]}
          inputMode={NUMERIC_NAMEPLATE.has(k) ? "decimal" : undefined}
          className={k === "maker" || k === "model" ? "col-span-2" : ""}
          {...register(k)}
          error={e(k)}
        />
      ))}
      <SelectField label="Heritage" className="col-span-2" {...register("heritage")} error={e("heritage")}>
        {HERITAGE.map((h) => (
          <option key={h} value={h}>
            {HERITAGE_LABELS[h]}
          </option>
        ))}
      </SelectField>
      <TextField
        label="Tag number"
        className="[&_input]:font-mono"
        {...register("tagNumber")}
        error={e("tagNumber")}
        hint="Empty clears the tag."
      />
      <TextArea label="Notes" className="col-span-2" {...register("notes")} error={e("notes")} />
      {conflict && (
        <div className="col-span-2">
          <ConflictNotice
            base={base}
            current={conflict}
            labels={ALL_LABELS}
            busy={m.isPending}
            onUseTheirs={() => {
              setBase(conflict);
              form.reset(toDraft(conflict));
              m.reset();
            }}
            onApplyMine={() => {
              setBase(conflict);
              void save(conflict.version);
            }}
          />
        </div>
      )}
      {message && (
        <p role="alert" className="col-span-2 text-sm text-flare-300">
          {message}
        </p>
      )}
      {m.isSuccess && (
        <p role="status" className="col-span-2 text-sm text-kelp-300">
          Nameplate saved.
        </p>
      )}
      <div className="col-span-2">
        <Button type="submit" disabled={m.isPending}>
          Save nameplate
        </Button>
      </div>
    </form>
  );
}

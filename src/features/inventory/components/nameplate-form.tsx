import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { HERITAGE, HERITAGE_LABELS, type Heritage } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { PatchComponentBody } from "../../../schemas/inventory";
import { useUpdateComponent } from "../api";
import type { Component } from "../contract";
import { ConflictNotice, conflictRecord } from "./conflict-notice";
import { NAMEPLATE_LABELS, NUMERIC_NAMEPLATE, nameplateFieldsFor, type NameplateKey } from "./nameplate-fields";

type Draft = Record<NameplateKey | "tagNumber" | "notes", string> & { heritage: Heritage };
const ALL_LABELS: Record<string, string> = {
  ...NAMEPLATE_LABELS,
  heritage: "Heritage",
  tagNumber: "Tag number",
  notes: "Notes",
};
const toDraft = (c: Component): Draft => {
  const d = { heritage: c.heritage, tagNumber: c.tagNumber ?? "", notes: c.notes } as Draft;
  for (const k of Object.keys(NAMEPLATE_LABELS) as NameplateKey[]) d[k] = c[k] == null ? "" : String(c[k]);
  return d;
};

/** Nameplate fields for this kind only, plus heritage and the tag. */
function toBody(d: Draft, c: Component, version: number): PatchComponentBody {
  const body: Record<string, unknown> = {
    version,
    heritage: d.heritage,
    tagNumber: d.tagNumber.trim(),
    notes: d.notes,
  };
  for (const k of nameplateFieldsFor(c.kind))
    body[k] = NUMERIC_NAMEPLATE.has(k) ? (d[k].trim() === "" ? null : Number(d[k])) : d[k];
  return body as PatchComponentBody;
}

export function NameplateForm({ siteId, component }: { siteId: string; component: Component }) {
  const [base, setBase] = useState(component);
  const [d, setD] = useState<Draft>(toDraft(component));
  const m = useUpdateComponent(siteId);
  const conflict = conflictRecord<Component>(m.error);
  const fields = m.error instanceof ApiError ? m.error.fields : {};
  const bind = (k: keyof Draft) => ({
    value: d[k],
    onChange: (e: { target: { value: string } }) => setD({ ...d, [k]: e.target.value }),
    error: fields[k],
  });
  const save = (version: number) =>
    m.mutate(
      { id: base.id, ...toBody(d, base, version) },
      {
        onSuccess: (c) => {
          setBase(c);
          setD(toDraft(c));
        },
      },
    );
  const submit = (e: FormEvent) => {
    e.preventDefault();
    save(base.version);
  };
  return (
    <form onSubmit={submit} aria-label="Nameplate" className="grid grid-cols-2 gap-3">
      {nameplateFieldsFor(base.kind).map((k) => (
        <TextField
          key={k}
          label={NAMEPLATE_LABELS[k]}
          inputMode={NUMERIC_NAMEPLATE.has(k) ? "decimal" : undefined}
          className={k === "maker" || k === "model" ? "col-span-2" : ""}
          {...bind(k)}
        />
      ))}
      <SelectField label="Heritage" className="col-span-2" {...bind("heritage")}>
        {HERITAGE.map((h) => (
          <option key={h} value={h}>
            {HERITAGE_LABELS[h]}
          </option>
        ))}
      </SelectField>
      <TextField
        label="Tag number"
        className="[&_input]:font-mono"
        {...bind("tagNumber")}
        hint="Empty clears the tag."
      />
      <TextArea label="Notes" className="col-span-2" {...bind("notes")} />
      {conflict && (
        <div className="col-span-2">
          <ConflictNotice
            base={base}
            current={conflict}
            labels={ALL_LABELS}
            busy={m.isPending}
            onUseTheirs={() => {
              setBase(conflict);
              setD(toDraft(conflict));
              m.reset();
            }}
            onApplyMine={() => {
              setBase(conflict);
              save(conflict.version);
            }}
          />
        </div>
      )}
      {m.isError && !conflict && (
        <p role="alert" className="col-span-2 text-sm text-flare-300">
          {m.error.message}
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

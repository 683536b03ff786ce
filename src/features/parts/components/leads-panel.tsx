import { useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import {
  LEAD_SOURCE_KIND_LABELS,
  LEAD_SOURCE_KINDS,
  LEAD_STATUS_LABELS,
  LEAD_STATUSES,
  type LeadStatus,
} from "../../../domain/part-workflow";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { leadBody, type LeadBody, type PartLead } from "../../../schemas/parts";
import { useAddLead, useUpdateLead } from "../api";
import { Money } from "../../../lib/money";

/** The form's text → the request body; leadBody (the server's own schema) validates it. */
const leadForm = z
  .object({
    sourceKind: z.string(),
    source: z.string(),
    contact: z.string(),
    askingPrice: numberText,
    notes: z.string(),
  })
  .transform((v) => v as LeadBody)
  .pipe(leadBody);
const blank = { sourceKind: "other", source: "", contact: "", askingPrice: "", notes: "" };

export function LeadsPanel({
  siteId,
  lineId,
  leads,
  canEdit,
}: {
  siteId: string;
  lineId: string;
  leads: PartLead[];
  canEdit: boolean;
}) {
  const add = useAddLead(siteId, lineId);
  const update = useUpdateLead(siteId);
  const form = useSchemaForm(leadForm, blank);
  const { register, formState } = form;
  const e = (name: keyof typeof blank) => fieldError(formState.errors, name);
  const [note, setNote] = useState<string | null>(null);
  // A refused change of a lead's state (a select, not this form) shows its mutation's error where the form's would.
  const stateError = update.error && (update.error instanceof ApiError ? update.error.message : "That did not work.");
  const submit = form.handleSubmit((body) =>
    add.mutateAsync(body).then(
      () => {
        form.reset();
        setNote("Lead recorded.");
      },
      (err: unknown) => showSaveError(form, err, { fallback: "That did not work." }),
    ),
  );
  const message = formMessage(formState.errors) ?? stateError ?? note;

  return (
    <section aria-labelledby="leads-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="leads-title" className="text-lg font-bold">
        Leads
      </h2>
      {!leads.length && <p className="mt-1 text-mist">No leads yet.</p>}
      <ul className="mt-2 divide-y divide-hull-700">
        {leads.map((l) => (
          <li key={l.id} className="grid gap-1 py-3 sm:grid-cols-[1fr_auto]" data-testid="lead">
            <div>
              <p className="font-semibold">{l.source}</p>
              <p className="text-sm text-mist">
                {LEAD_SOURCE_KIND_LABELS[l.sourceKind]} · asking <Money value={l.askingPrice} />
                {l.contact ? ` · ${l.contact}` : ""}
              </p>
              {l.notes && <p className="text-sm">{l.notes}</p>}
            </div>
            <label className="text-sm text-mist">
              <span className="sr-only">State of the lead from {l.source}</span>
              <select
                className="min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
                value={l.status}
                disabled={!canEdit}
                onChange={(e) => {
                  setNote(null);
                  update.mutate({ leadId: l.id, version: l.version, status: e.target.value as LeadStatus });
                }}
              >
                {LEAD_STATUSES.map((s) => (
                  <option key={s} value={s}>
                    {LEAD_STATUS_LABELS[s]}
                  </option>
                ))}
              </select>
            </label>
          </li>
        ))}
      </ul>
      {canEdit && (
        <form
          onSubmit={(ev) => {
            setNote(null);
            update.reset();
            void submit(ev);
          }}
          noValidate
          className="mt-3 grid gap-3 border-t border-hull-700 pt-3 sm:grid-cols-2"
          aria-label="Record a lead"
        >
          <SelectField label="Kind of source" {...register("sourceKind")} error={e("sourceKind")}>
            {LEAD_SOURCE_KINDS.map((k) => (
              <option key={k} value={k}>
                {LEAD_SOURCE_KIND_LABELS[k]}
              </option>
            ))}
          </SelectField>
          <TextField
            label="Where it might come from"
            {...register("source")}
            required
            error={e("source")}
            hint="A donor vessel or site, a dealer, a collector, a salvage yard"
          />
          <TextField label="Contact" {...register("contact")} error={e("contact")} />
          <MoneyField label="Asking price" {...register("askingPrice")} error={e("askingPrice")} />
          <TextArea label="Notes" {...register("notes")} className="sm:col-span-2" error={e("notes")} />
          <div className="flex items-center gap-3 sm:col-span-2">
            <Button type="submit" disabled={add.isPending}>
              Record lead
            </Button>
            {message && (
              <p role="status" className="text-mist">
                {message}
              </p>
            )}
          </div>
        </form>
      )}
    </section>
  );
}

import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import {
  LEAD_SOURCE_KIND_LABELS,
  LEAD_SOURCE_KINDS,
  LEAD_STATUS_LABELS,
  LEAD_STATUSES,
  type LeadSourceKind,
  type LeadStatus,
} from "../../../domain/part-workflow";
import { ApiError } from "../../../lib/api-client";
import type { PartLead } from "../../../schemas/parts";
import { useAddLead, useUpdateLead } from "../api";
import { Money } from "../../../lib/money";

const numOrNull = (v: FormDataEntryValue | null) => (v === null || String(v).trim() === "" ? null : Number(v));

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
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const fail = (e: unknown) => {
    setMessage(e instanceof ApiError ? e.message : "That did not work.");
    if (e instanceof ApiError) setErrors(e.fields);
  };

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    setErrors({});
    add.mutate(
      {
        sourceKind: f.get("sourceKind") as LeadSourceKind,
        source: String(f.get("source")),
        contact: String(f.get("contact")),
        askingPrice: numOrNull(f.get("askingPrice")),
        notes: String(f.get("notes")),
      },
      {
        onSuccess: () => {
          form.reset();
          setMessage("Lead recorded.");
        },
        onError: fail,
      },
    );
  }

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
                onChange={(e) =>
                  update.mutate(
                    { leadId: l.id, version: l.version, status: e.target.value as LeadStatus },
                    { onError: fail },
                  )
                }
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
          onSubmit={submit}
          className="mt-3 grid gap-3 border-t border-hull-700 pt-3 sm:grid-cols-2"
          aria-label="Record a lead"
        >
          <SelectField label="Kind of source" name="sourceKind" defaultValue="other" error={errors.sourceKind}>
            {LEAD_SOURCE_KINDS.map((k) => (
              <option key={k} value={k}>
                {LEAD_SOURCE_KIND_LABELS[k]}
              </option>
            ))}
          </SelectField>
          <TextField
            label="Where it might come from"
            name="source"
            required
            error={errors.source}
            hint="A donor vessel or site, a dealer, a collector, a salvage yard"
          />
          <TextField label="Contact" name="contact" error={errors.contact} />
          <MoneyField label="Asking price" name="askingPrice" error={errors.askingPrice} />
          <TextArea label="Notes" name="notes" className="sm:col-span-2" error={errors.notes} />
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

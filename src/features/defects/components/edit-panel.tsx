import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import { DEFECT_SEVERITIES, DEFECT_SEVERITY_DEFINITIONS, DEFECT_SEVERITY_LABELS } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { PARTS_STATES, PARTS_STATE_LABELS, type DefectDetail } from "../../../schemas/defects";
import { DEFECT_FIELD_LABELS as L } from "../../../schemas/field-labels";
import { usePatchDefect } from "../api";

const num = (v: FormDataEntryValue | null) => (v === null || String(v).trim() === "" ? null : Number(v));

/** Edits the defect's description and estimates; a stale version shows the server's values to start again from. */
export function EditPanel({ siteId, detail, canManage }: { siteId: string; detail: DefectDetail; canManage: boolean }) {
  const d = detail.defect;
  const patch = usePatchDefect(siteId, d.id, d.ref);
  const [kept, setKept] = useState(false);
  const [open, setOpen] = useState(false);
  const err = patch.error instanceof ApiError ? patch.error : null;
  const fields = err?.fields ?? {};

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    patch.mutate(
      {
        version: d.version,
        title: f.get("title"),
        description: f.get("description"),
        severity: f.get("severity"),
        safetyCritical: f.get("safetyCritical") === "on",
        blocksEnergisation: f.get("blocksEnergisation") === "on",
        effortHours: num(f.get("effortHours")),
        costEstimate: num(f.get("costEstimate")),
        partsNeeded: f.get("partsNeeded"),
        partsState: f.get("partsState"),
        ...(canManage ? { dueOn: (f.get("dueOn") as string) || null } : {}),
      },
      {
        onSuccess: (r) => {
          setOpen(false);
          setKept(r.queued);
        },
      },
    );
  }
  if (!detail.canEdit) return null;
  if (!open)
    return (
      <div className="space-y-2">
        {kept && (
          <p role="status" className="text-tide-300" data-testid="edit-pending">
            Edit kept on this phone: it is sent when the signal returns (the list of changes waiting is in the bar at
            the top).
          </p>
        )}
        <Button tone="quiet" onClick={() => setOpen(true)}>
          Edit the details
        </Button>
      </div>
    );
  return (
    <form
      key={d.version}
      onSubmit={submit}
      noValidate
      className="grid gap-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 md:grid-cols-2"
      aria-label="Edit the defect"
    >
      {err && (
        <p role="alert" className="text-flare-300 md:col-span-2">
          {err.status === 409 ? "Someone changed this defect meanwhile; the form now shows their values." : err.message}
        </p>
      )}
      <TextField className="md:col-span-2" label={L.title} name="title" defaultValue={d.title} error={fields.title} />
      <TextArea
        className="md:col-span-2"
        label={L.description}
        name="description"
        defaultValue={d.description}
        error={fields.description}
      />
      <SelectField
        label={L.severity}
        name="severity"
        defaultValue={d.severity}
        hint={DEFECT_SEVERITY_DEFINITIONS[d.severity]}
      >
        {DEFECT_SEVERITIES.map((s) => (
          <option key={s} value={s}>
            {DEFECT_SEVERITY_LABELS[s]}
          </option>
        ))}
      </SelectField>
      <SelectField label={L.partsState} name="partsState" defaultValue={d.partsState}>
        {PARTS_STATES.map((p) => (
          <option key={p} value={p}>
            {PARTS_STATE_LABELS[p]}
          </option>
        ))}
      </SelectField>
      <label className="flex min-h-11 items-center gap-2">
        <input
          type="checkbox"
          name="safetyCritical"
          defaultChecked={d.safetyCritical}
          className="h-5 w-5 accent-brass-400"
        />
        ⚡ {L.safetyCritical}
      </label>
      <label className="flex min-h-11 items-center gap-2">
        <input
          type="checkbox"
          name="blocksEnergisation"
          defaultChecked={d.blocksEnergisation}
          className="h-5 w-5 accent-brass-400"
        />
        ■ {L.blocksEnergisation}
      </label>
      <TextField
        label={L.effortHours}
        name="effortHours"
        type="number"
        min={0}
        step={0.5}
        defaultValue={d.effortHours ?? ""}
        error={fields.effortHours}
      />
      <MoneyField
        label={L.costEstimate}
        name="costEstimate"
        defaultValue={d.costEstimate ?? ""}
        error={fields.costEstimate}
      />
      <TextField label={L.partsNeeded} name="partsNeeded" defaultValue={d.partsNeeded} />
      {canManage && (
        <TextField label={L.dueOn} name="dueOn" type="date" defaultValue={d.dueOn ?? ""} error={fields.dueOn} />
      )}
      <div className="flex gap-2 md:col-span-2">
        <Button type="submit" disabled={patch.isPending}>
          Save
        </Button>
        <Button tone="quiet" onClick={() => setOpen(false)}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

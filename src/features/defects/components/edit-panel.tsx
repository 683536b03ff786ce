import { useMemo, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import { DEFECT_SEVERITIES, DEFECT_SEVERITY_DEFINITIONS, DEFECT_SEVERITY_LABELS } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { blankAsNull, fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import {
  PARTS_STATES,
  PARTS_STATE_LABELS,
  patchDefectBody,
  type DefectDetail,
  type PatchDefectBody,
} from "../../../schemas/defects";
import { DEFECT_FIELD_LABELS as L } from "../../../schemas/field-labels";
import { usePatchDefect } from "../api";

/** The form's text → the PATCH body; patchDefectBody (the server's own schema) validates it. */
const editForm = (version: number, canManage: boolean) =>
  z
    .object({
      title: z.string(),
      description: z.string(),
      severity: z.string(),
      safetyCritical: z.boolean(),
      blocksEnergisation: z.boolean(),
      effortHours: numberText,
      costEstimate: numberText,
      partsNeeded: z.string(),
      partsState: z.string(),
      dueOn: blankAsNull,
    })
    // Only the curator's order may carry a due date: the others' PATCH does not name it.
    .transform(
      ({ dueOn, ...v }) => ({ ...v, version, ...(canManage ? { dueOn } : {}) }) as z.input<typeof patchDefectBody>,
    )
    .pipe(patchDefectBody);

/** Edits the defect's description and estimates; a stale version shows the server's values to start again from. */
export function EditPanel({ siteId, detail, canManage }: { siteId: string; detail: DefectDetail; canManage: boolean }) {
  const d = detail.defect;
  const patch = usePatchDefect(siteId, d.id, d.ref);
  const [kept, setKept] = useState(false);
  const [open, setOpen] = useState(false);
  const stale = patch.error instanceof ApiError && patch.error.status === 409;

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
    // A new version (someone else's edit arriving) starts the form again from the current values.
    <EditForm
      key={d.version}
      detail={detail}
      canManage={canManage}
      stale={stale}
      busy={patch.isPending}
      save={(body) =>
        patch.mutateAsync(body).then((r) => {
          setOpen(false);
          setKept(r.queued);
        })
      }
      onCancel={() => setOpen(false)}
    />
  );
}

function EditForm({
  detail,
  canManage,
  stale,
  busy,
  save,
  onCancel,
}: {
  detail: DefectDetail;
  canManage: boolean;
  stale: boolean;
  busy: boolean;
  save: (body: PatchDefectBody) => Promise<void>;
  onCancel: () => void;
}) {
  const d = detail.defect;
  const schema = useMemo(() => editForm(d.version, canManage), [d.version, canManage]);
  const form = useSchemaForm(schema, {
    title: d.title,
    description: d.description,
    severity: d.severity,
    safetyCritical: d.safetyCritical,
    blocksEnergisation: d.blocksEnergisation,
    effortHours: d.effortHours === null ? "" : String(d.effortHours),
    costEstimate: d.costEstimate === null ? "" : String(d.costEstimate),
    partsNeeded: d.partsNeeded,
    partsState: d.partsState,
    dueOn: d.dueOn ?? "",
  });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  // A stale save is shown by the panel (the refused edit remounts this form with the current values).
  const submit = form.handleSubmit((body) =>
    save(body).catch((err: unknown) => {
      if (!(err instanceof ApiError && err.status === 409)) showSaveError(form, err);
    }),
  );
  const message = stale
    ? "Someone changed this defect meanwhile; the form now shows their values."
    : formMessage(formState.errors);

  return (
    <form
      onSubmit={(ev) => void submit(ev)}
      noValidate
      className="grid gap-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 md:grid-cols-2"
      aria-label="Edit the defect"
    >
      {message && (
        <p role="alert" className="text-flare-300 md:col-span-2">
          {message}
        </p>
      )}
      <TextField className="md:col-span-2" label={L.title} {...register("title")} error={e("title")} />
      <TextArea className="md:col-span-2" label={L.description} {...register("description")} error={e("description")} />
      <SelectField
        label={L.severity}
        {...register("severity")}
        hint={DEFECT_SEVERITY_DEFINITIONS[d.severity]}
        error={e("severity")}
      >
        {DEFECT_SEVERITIES.map((s) => (
          <option key={s} value={s}>
            {DEFECT_SEVERITY_LABELS[s]}
          </option>
        ))}
      </SelectField>
      <SelectField label={L.partsState} {...register("partsState")} error={e("partsState")}>
        {PARTS_STATES.map((p) => (
          <option key={p} value={p}>
            {PARTS_STATE_LABELS[p]}
          </option>
        ))}
      </SelectField>
      <label className="flex min-h-11 items-center gap-2">
        <input type="checkbox" {...register("safetyCritical")} className="h-5 w-5 accent-brass-400" />⚡{" "}
        {L.safetyCritical}
      </label>
      <label className="flex min-h-11 items-center gap-2">
        <input type="checkbox" {...register("blocksEnergisation")} className="h-5 w-5 accent-brass-400" />■{" "}
        {L.blocksEnergisation}
      </label>
      <TextField
        label={L.effortHours}
        {...register("effortHours")}
        type="number"
        min={0}
        step={0.5}
        error={e("effortHours")}
      />
      <MoneyField label={L.costEstimate} {...register("costEstimate")} error={e("costEstimate")} />
      <TextField label={L.partsNeeded} {...register("partsNeeded")} error={e("partsNeeded")} />
      {canManage && <TextField label={L.dueOn} {...register("dueOn")} type="date" error={e("dueOn")} />}
      <div className="flex gap-2 md:col-span-2">
        <Button type="submit" disabled={busy}>
          Save
        </Button>
        <Button tone="quiet" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

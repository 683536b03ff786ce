import { useMemo, useState } from "react";
import { z } from "zod";
import { SelectField, TextField } from "../../../components/field";
import { NETA_MINIMUM_INSULATION, THERMAL_CLASSES } from "../../../domain/insulation";
import { CORRECTION_METHODS, CORRECTION_METHOD_LABELS } from "../../../domain/reading-judgement";
import { fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { criteriaBody, type Criteria, type CriteriaBody } from "../../../schemas/readings";
import { useSaveCriteria } from "../api";
import { FormShell, NumberField } from "./form-bits";

/** The form's text → the request body; criteriaBody (the server's own schema) validates it. */
const criteriaForm = (version: number) =>
  z
    .object({
      correctionMethod: z.string(),
      insulationMedium: z.string(),
      thermalClass: z.string(),
      minimumMegohms: numberText,
      minimumSource: z.string(),
      contactOutlierPercent: numberText,
      dewPointMarginK: numberText,
    })
    .transform((v) => ({ ...v, version }) as CriteriaBody)
    .pipe(criteriaBody);

/** The curator's criteria; everyone else sees the same values read-only. */
export function CriteriaForm({ siteId, criteria, canEdit }: { siteId: string; criteria: Criteria; canEdit: boolean }) {
  const [saved, setSaved] = useState(false);
  return (
    <div className="space-y-3">
      <fieldset disabled={!canEdit}>
        {/* A saved version starts the form again from the stored values. */}
        <CriteriaFields
          key={criteria.version}
          siteId={siteId}
          criteria={criteria}
          canEdit={canEdit}
          onSaving={() => setSaved(false)}
          onSaved={() => setSaved(true)}
        />
      </fieldset>
      {saved && (
        <p role="status" className="rounded-md bg-hull-800 p-3">
          Criteria saved. Every reading is judged again against them.
        </p>
      )}
      <details className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700">
        <summary className="min-h-11 cursor-pointer py-2 font-semibold">
          Default minimums: ANSI/NETA MTS-2019 Table 100.1
        </summary>
        <table className="mt-2 w-full text-sm">
          <caption className="sr-only">NETA insulation-resistance test values, at 20 °C</caption>
          <thead>
            <tr className="text-left text-fog">
              <th scope="col">Equipment rated up to</th>
              <th scope="col">Test voltage</th>
              <th scope="col">Minimum</th>
            </tr>
          </thead>
          <tbody>
            {NETA_MINIMUM_INSULATION.map((r) => (
              <tr key={r.maxRatedVolts}>
                <td>{Number.isFinite(r.maxRatedVolts) ? `${r.maxRatedVolts} V` : "above 34 000 V"}</td>
                <td>{r.testVoltsDc} V DC</td>
                <td>{r.minMegohms} MΩ</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-2 text-xs text-mist">
          Values at 20 °C. Older editions differ above 2 500 V; Tideline follows MTS-2019. A rating between rows takes
          the next row up (a 450 V board uses the 600 V row).
        </p>
      </details>
    </div>
  );
}

function CriteriaFields({
  siteId,
  criteria,
  canEdit,
  onSaving,
  onSaved,
}: {
  siteId: string;
  criteria: Criteria;
  canEdit: boolean;
  onSaving: () => void;
  onSaved: () => void;
}) {
  const save = useSaveCriteria(siteId);
  const schema = useMemo(() => criteriaForm(criteria.version), [criteria.version]);
  const form = useSchemaForm(schema, {
    correctionMethod: criteria.correctionMethod,
    insulationMedium: criteria.insulationMedium,
    thermalClass: criteria.thermalClass,
    minimumMegohms: criteria.minimumMegohms === null ? "" : String(criteria.minimumMegohms),
    minimumSource: criteria.minimumSource,
    contactOutlierPercent: String(criteria.contactOutlierPercent),
    dewPointMarginK: String(criteria.dewPointMarginK),
  });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const submit = form.handleSubmit((body) =>
    save.mutateAsync(body).then(onSaved, (err: unknown) => showSaveError(form, err)),
  );
  return (
    <FormShell
      title={canEdit ? "Criteria for this site" : "Criteria for this site (set by the curator)"}
      onSubmit={(ev) => {
        onSaving();
        void submit(ev);
      }}
      error={formMessage(formState.errors)}
      busy={save.isPending}
      disabled={!canEdit}
      submitLabel="Save criteria"
    >
      <SelectField label="Temperature correction" {...register("correctionMethod")} error={e("correctionMethod")}>
        {CORRECTION_METHODS.map((m) => (
          <option key={m} value={m}>
            {CORRECTION_METHOD_LABELS[m]}
          </option>
        ))}
      </SelectField>
      <SelectField
        label="Insulation type (NETA multipliers)"
        {...register("insulationMedium")}
        error={e("insulationMedium")}
      >
        <option value="solid">Solid (switchboards, breakers, cables)</option>
        <option value="oil">Oil-immersed</option>
      </SelectField>
      <SelectField
        label="Thermal class (minimum PI)"
        {...register("thermalClass")}
        error={e("thermalClass")}
        hint="IEEE 43: class A 1.5; B, F, H 2.0"
      >
        {THERMAL_CLASSES.map((c) => (
          <option key={c} value={c}>
            Class {c}
          </option>
        ))}
      </SelectField>
      <NumberField
        label="Contact outlier threshold (% above the lowest pole)"
        {...register("contactOutlierPercent")}
        error={e("contactOutlierPercent")}
        hint="NETA: 50 %"
      />
      <NumberField
        label="Dew-point margin (K)"
        {...register("dewPointMarginK")}
        error={e("dewPointMarginK")}
        hint="An insulation reading taken with the equipment less than this above the dew point (Magnus formula, Alduchov–Eskridge coefficients), or below freezing, is not valid for judging. 3 K is common practice."
      />
      <NumberField
        label="Site minimum insulation (MΩ, empty = NETA table)"
        {...register("minimumMegohms")}
        error={e("minimumMegohms")}
      />
      <TextField label="Source of the site minimum" {...register("minimumSource")} error={e("minimumSource")} />
    </FormShell>
  );
}

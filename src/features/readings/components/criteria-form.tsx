import { useState, type FormEvent } from "react";
import { SelectField, TextField } from "../../../components/field";
import { NETA_MINIMUM_INSULATION, THERMAL_CLASSES } from "../../../domain/insulation";
import { CORRECTION_METHODS, CORRECTION_METHOD_LABELS } from "../../../domain/reading-judgement";
import { criteriaBody, type Criteria } from "../../../schemas/readings";
import { useSaveCriteria } from "../api";
import { fieldErrors, numOrNull } from "../format";
import { FormShell, NumberField, saveErrors } from "./form-bits";

/** The curator's criteria; everyone else sees the same values read-only. */
export function CriteriaForm({ siteId, criteria, canEdit }: { siteId: string; criteria: Criteria; canEdit: boolean }) {
  const save = useSaveCriteria(siteId);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const parsed = criteriaBody.safeParse({
      correctionMethod: f.get("correctionMethod"),
      insulationMedium: f.get("insulationMedium"),
      thermalClass: f.get("thermalClass"),
      minimumMegohms: numOrNull(f.get("minimumMegohms")),
      minimumSource: String(f.get("minimumSource") ?? ""),
      contactOutlierPercent: numOrNull(f.get("contactOutlierPercent")),
      dewPointMarginK: numOrNull(f.get("dewPointMarginK")),
      version: criteria.version,
    });
    setSaved(false);
    if (!parsed.success) {
      setErrors(fieldErrors(parsed.error.issues));
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    setMessage(null);
    save.mutate(parsed.data, {
      onSuccess: () => setSaved(true),
      onError: (err) => {
        const s = saveErrors(err);
        setErrors(s.fields);
        setMessage(s.message);
      },
    });
  }

  return (
    <div className="space-y-3">
      <fieldset disabled={!canEdit}>
        <FormShell
          key={criteria.version}
          title={canEdit ? "Criteria for this site" : "Criteria for this site (set by the curator)"}
          onSubmit={submit}
          error={message}
          busy={save.isPending}
          disabled={!canEdit}
          submitLabel="Save criteria"
        >
          <SelectField label="Temperature correction" name="correctionMethod" defaultValue={criteria.correctionMethod}>
            {CORRECTION_METHODS.map((m) => (
              <option key={m} value={m}>
                {CORRECTION_METHOD_LABELS[m]}
              </option>
            ))}
          </SelectField>
          <SelectField
            label="Insulation type (NETA multipliers)"
            name="insulationMedium"
            defaultValue={criteria.insulationMedium}
          >
            <option value="solid">Solid (switchboards, breakers, cables)</option>
            <option value="oil">Oil-immersed</option>
          </SelectField>
          <SelectField
            label="Thermal class (minimum PI)"
            name="thermalClass"
            defaultValue={criteria.thermalClass}
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
            name="contactOutlierPercent"
            defaultValue={criteria.contactOutlierPercent}
            error={errors.contactOutlierPercent}
            hint="NETA: 50 %"
          />
          <NumberField
            label="Dew-point margin (K)"
            name="dewPointMarginK"
            defaultValue={criteria.dewPointMarginK}
            error={errors.dewPointMarginK}
            hint="An insulation reading taken with the equipment less than this above the dew point (Magnus formula, Alduchov–Eskridge coefficients), or below freezing, is not valid for judging. 3 K is common practice."
          />
          <NumberField
            label="Site minimum insulation (MΩ, empty = NETA table)"
            name="minimumMegohms"
            defaultValue={criteria.minimumMegohms ?? ""}
            error={errors.minimumMegohms}
          />
          <TextField
            label="Source of the site minimum"
            name="minimumSource"
            defaultValue={criteria.minimumSource}
            error={errors.minimumSource}
          />
        </FormShell>
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

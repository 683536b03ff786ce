import { useState, type FormEvent } from "react";
import { SelectField, TextField } from "../../../components/field";
import { CONDUCTORS, CONDUCTOR_LABELS, insulationReadingBody, type InsulationReading } from "../../../schemas/readings";
import { useRecordInsulation } from "../api";
import { fieldErrors, megohms, numOrNull, qualifierOf, toIso } from "../format";
import {
  ComponentSelect,
  FormShell,
  NumberField,
  QualifierField,
  WhenField,
  KeptOnPhone,
  saveErrors,
  type TargetOption,
} from "./form-bits";
import { VerdictBadge } from "./verdict-badge";

/** Phone-first: the volunteer at the board with the tester in the other hand. */
export function InsulationForm({
  siteId,
  boardId,
  options,
  defaultComponentId,
}: {
  siteId: string;
  boardId: string;
  options: TargetOption[];
  defaultComponentId?: string;
}) {
  const save = useRecordInsulation(siteId, boardId);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [last, setLast] = useState<InsulationReading | null>(null);
  const [queued, setQueued] = useState(false);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    const componentId = String(f.get("componentId") || "") || null;
    const typed = String(f.get("circuit") ?? "").trim();
    const body = {
      componentId,
      circuit: typed || (options.find((o) => o.componentId === componentId)?.circuit ?? ""),
      conductors: String(f.get("conductors")),
      testVoltsDc: numOrNull(f.get("testVoltsDc")),
      megohms: numOrNull(f.get("megohms")),
      equipmentTempC: numOrNull(f.get("equipmentTempC")),
      ambientTempC: numOrNull(f.get("ambientTempC")),
      humidityPercent: numOrNull(f.get("humidityPercent")),
      durationS: numOrNull(f.get("durationS")),
      r30s: numOrNull(f.get("r30s")),
      r1min: numOrNull(f.get("r1min")),
      r10min: numOrNull(f.get("r10min")),
      megohmsQualifier: qualifierOf(f.get("megohmsQualifier")),
      r30sQualifier: qualifierOf(f.get("r30sQualifier")),
      r1minQualifier: qualifierOf(f.get("r1minQualifier")),
      r10minQualifier: qualifierOf(f.get("r10minQualifier")),
      instrument: String(f.get("instrument") ?? ""),
      notes: String(f.get("notes") ?? ""),
      measuredAt: toIso(String(f.get("measuredAt") ?? "")),
    };
    const parsed = insulationReadingBody.safeParse(body);
    setMessage(null);
    if (!parsed.success) {
      setErrors(fieldErrors(parsed.error.issues));
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    const label = options.find((o) => o.componentId === parsed.data.componentId)?.designation ?? parsed.data.circuit;
    save.mutate(
      { ...parsed.data, label: `${label} ${parsed.data.conductors}` },
      {
        onSuccess: (r) => {
          setQueued(r.queued);
          setLast(r.queued ? null : r.data);
          (form.elements.namedItem("megohms") as HTMLInputElement).value = "";
        },
        onError: (err) => {
          const s = saveErrors(err);
          setErrors(s.fields);
          setMessage(s.message);
        },
      },
    );
  }

  return (
    <div className="space-y-3">
      <FormShell
        title="Record an insulation-resistance reading"
        onSubmit={submit}
        error={message}
        busy={save.isPending}
        submitLabel="Save reading"
      >
        <ComponentSelect
          options={options}
          allowNone="No component: name the circuit"
          defaultValue={defaultComponentId ?? ""}
          error={errors.componentId}
        />
        <TextField
          label="Circuit"
          name="circuit"
          hint="Filled from the component when left empty"
          error={errors.circuit}
        />
        <SelectField label="Conductors tested" name="conductors" defaultValue="A-G" error={errors.conductors}>
          {CONDUCTORS.map((c) => (
            <option key={c} value={c}>
              {CONDUCTOR_LABELS[c]}
            </option>
          ))}
        </SelectField>
        <NumberField label="Reading (MΩ)" name="megohms" required hint="0 for a dead short" error={errors.megohms} />
        <QualifierField label="The meter showed it" name="megohmsQualifier" error={errors.megohmsQualifier} />
        <NumberField label="Equipment temperature (°C)" name="equipmentTempC" required error={errors.equipmentTempC} />
        <NumberField
          label="Test voltage (V DC)"
          name="testVoltsDc"
          defaultValue={1000}
          step="1"
          error={errors.testVoltsDc}
        />
        <WhenField error={errors.measuredAt} />
        <details className="sm:col-span-2" open={!!(errors.ambientTempC || errors.humidityPercent || errors.durationS)}>
          <summary className="min-h-11 cursor-pointer py-2 font-semibold text-mist">
            Conditions and instrument (ambient, humidity, duration)
          </summary>
          <div className="grid gap-3 sm:grid-cols-2">
            <NumberField
              label="Ambient temperature (°C)"
              name="ambientTempC"
              hint="With humidity: checks the dew point"
              error={errors.ambientTempC}
            />
            <NumberField label="Relative humidity (%)" name="humidityPercent" error={errors.humidityPercent} />
            <NumberField
              label="Test duration (s)"
              name="durationS"
              defaultValue={60}
              step="1"
              error={errors.durationS}
            />
            <TextField label="Instrument" name="instrument" error={errors.instrument} />
          </div>
        </details>
        <details className="sm:col-span-2" open={!!(errors.r30s || errors.r1min || errors.r10min)}>
          <summary className="min-h-11 cursor-pointer py-2 font-semibold text-mist">
            Timed readings (optional: 30 s, 1 min, 10 min)
          </summary>
          <div className="grid gap-3 sm:grid-cols-3">
            <NumberField label="At 30 s (MΩ)" name="r30s" error={errors.r30s} />
            <NumberField label="At 1 min (MΩ)" name="r1min" error={errors.r1min} />
            <NumberField label="At 10 min (MΩ)" name="r10min" error={errors.r10min} />
            <QualifierField label="30 s shown as" name="r30sQualifier" />
            <QualifierField label="1 min shown as" name="r1minQualifier" />
            <QualifierField label="10 min shown as" name="r10minQualifier" />
          </div>
        </details>
        <TextField label="Notes" name="notes" className="sm:col-span-2" error={errors.notes} />
      </FormShell>
      {queued && <KeptOnPhone what="Reading" />}
      {last && (
        <p role="status" className="rounded-md bg-hull-800 p-3">
          Saved: {megohms(last.megohms, last.megohmsQualifier)} at {last.equipmentTempC} °C is{" "}
          <strong>{megohms(last.judgement.correctedMegohms, last.megohmsQualifier)}</strong> corrected to{" "}
          {last.judgement.baseTemperatureC} °C. <VerdictBadge verdict={last.judgement.verdict} />
          {last.judgement.notes
            .filter((n) => /Tested at/.test(n))
            .map((n) => (
              <span key={n} className="mt-1 block text-sm">
                {n}
              </span>
            ))}
        </p>
      )}
    </div>
  );
}

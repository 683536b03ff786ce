import { useMemo, useState } from "react";
import { FormProvider } from "react-hook-form";
import { z } from "zod";
import { SelectField, TextField } from "../../../components/field";
import {
  blankAsNull,
  fieldError,
  formMessage,
  localDateTime,
  numberText,
  showSaveError,
  useSchemaForm,
} from "../../../lib/form";
import {
  CONDUCTORS,
  CONDUCTOR_LABELS,
  insulationReadingBody,
  type InsulationReading,
  type InsulationReadingBody,
} from "../../../schemas/readings";
import { useRecordInsulation } from "../api";
import { localNow, megohms } from "../format";
import { CircuitTargetFields, circuitOf, targetLabel } from "./circuit-target-fields";
import {
  FormShell,
  NumberField,
  QualifierField,
  WhenField,
  KeptOnPhone,
  type TargetOption,
  useFreshWhen,
} from "./form-bits";
import { VerdictBadge } from "./verdict-badge";

/** The form's text → the request body; insulationReadingBody (shared with the server) validates it. */
const insulationForm = (options: TargetOption[]) =>
  z
    .object({
      componentId: z.string(),
      circuit: z.string(),
      conductors: z.string(),
      testVoltsDc: numberText,
      megohms: numberText,
      equipmentTempC: numberText,
      ambientTempC: numberText,
      humidityPercent: numberText,
      durationS: numberText,
      r30s: numberText,
      r1min: numberText,
      r10min: numberText,
      megohmsQualifier: blankAsNull,
      r30sQualifier: blankAsNull,
      r1minQualifier: blankAsNull,
      r10minQualifier: blankAsNull,
      instrument: z.string(),
      notes: z.string(),
      measuredAt: localDateTime,
    })
    // Text as the body's input type; the shared schema piped after it checks every value.
    .transform(
      (v) => ({ ...v, componentId: v.componentId || null, circuit: circuitOf(v, options) }) as InsulationReadingBody,
    )
    .pipe(insulationReadingBody);
type InsulationFormValues = z.input<ReturnType<typeof insulationForm>>;

const blank = (defaultComponentId?: string): InsulationFormValues => ({
  componentId: defaultComponentId ?? "",
  circuit: "",
  conductors: "A-G",
  testVoltsDc: "1000",
  megohms: "",
  equipmentTempC: "",
  ambientTempC: "",
  humidityPercent: "",
  durationS: "60",
  r30s: "",
  r1min: "",
  r10min: "",
  megohmsQualifier: "",
  r30sQualifier: "",
  r1minQualifier: "",
  r10minQualifier: "",
  instrument: "",
  notes: "",
  measuredAt: localNow(),
});

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
  const schema = useMemo(() => insulationForm(options), [options]);
  const form = useSchemaForm(schema, blank(defaultComponentId));
  useFreshWhen(form);
  const errors = form.formState.errors;
  const [last, setLast] = useState<InsulationReading | null>(null);
  const [queued, setQueued] = useState(false);

  const submit = form.handleSubmit((body) =>
    save
      .mutateAsync({ ...body, label: `${targetLabel(body.componentId, body.circuit, options)} ${body.conductors}` })
      .then(
        (r) => {
          setQueued(r.queued);
          setLast(r.queued ? null : r.data);
          form.setValue("megohms", ""); // the next reading on the same circuit starts from the meter
        },
        (err) => showSaveError(form, err),
      ),
  );
  const e = (name: keyof InsulationFormValues) => fieldError(errors, name);

  return (
    <div className="space-y-3">
      <FormProvider {...form}>
        <FormShell
          title="Record an insulation-resistance reading"
          onSubmit={(ev) => void submit(ev)}
          error={formMessage(errors)}
          busy={save.isPending}
          submitLabel="Save reading"
        >
          <CircuitTargetFields options={options} noneLabel="No component: name the circuit" />
          <SelectField label="Conductors tested" {...form.register("conductors")} error={e("conductors")}>
            {CONDUCTORS.map((c) => (
              <option key={c} value={c}>
                {CONDUCTOR_LABELS[c]}
              </option>
            ))}
          </SelectField>
          <NumberField
            label="Reading (MΩ)"
            {...form.register("megohms")}
            required
            hint="0 for a dead short"
            error={e("megohms")}
          />
          <QualifierField
            label="The meter showed it"
            {...form.register("megohmsQualifier")}
            error={e("megohmsQualifier")}
          />
          <NumberField
            label="Equipment temperature (°C)"
            {...form.register("equipmentTempC")}
            required
            error={e("equipmentTempC")}
          />
          <NumberField
            label="Test voltage (V DC)"
            {...form.register("testVoltsDc")}

            step="1"
            error={e("testVoltsDc")}
          />
          <WhenField {...form.register("measuredAt")} error={e("measuredAt")} />
          <details
            className="sm:col-span-2"
            open={!!(errors.ambientTempC || errors.humidityPercent || errors.durationS || errors.instrument)}
          >
            <summary className="min-h-11 cursor-pointer py-2 font-semibold text-mist">
              Conditions and instrument (ambient, humidity, duration)
            </summary>
            <div className="grid gap-3 sm:grid-cols-2">
              <NumberField
                label="Ambient temperature (°C)"
                {...form.register("ambientTempC")}
                hint="With humidity: checks the dew point"
                error={e("ambientTempC")}
              />
              <NumberField
                label="Relative humidity (%)"
                {...form.register("humidityPercent")}
                error={e("humidityPercent")}
              />
              <NumberField
                label="Test duration (s)"
                {...form.register("durationS")}

                step="1"
                error={e("durationS")}
              />
              <TextField label="Instrument" {...form.register("instrument")} error={e("instrument")} />
            </div>
          </details>
          <details className="sm:col-span-2" open={!!(errors.r30s || errors.r1min || errors.r10min)}>
            <summary className="min-h-11 cursor-pointer py-2 font-semibold text-mist">
              Timed readings (optional: 30 s, 1 min, 10 min)
            </summary>
            <div className="grid gap-3 sm:grid-cols-3">
              <NumberField label="At 30 s (MΩ)" {...form.register("r30s")} error={e("r30s")} />
              <NumberField label="At 1 min (MΩ)" {...form.register("r1min")} error={e("r1min")} />
              <NumberField label="At 10 min (MΩ)" {...form.register("r10min")} error={e("r10min")} />
              <QualifierField label="30 s shown as" {...form.register("r30sQualifier")} />
              <QualifierField label="1 min shown as" {...form.register("r1minQualifier")} />
              <QualifierField label="10 min shown as" {...form.register("r10minQualifier")} />
            </div>
          </details>
          <TextField label="Notes" {...form.register("notes")} className="sm:col-span-2" error={e("notes")} />
        </FormShell>
      </FormProvider>
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

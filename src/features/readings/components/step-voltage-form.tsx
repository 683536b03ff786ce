import { useMemo, useState } from "react";
import { useFieldArray } from "react-hook-form";
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
import { CONDUCTORS, CONDUCTOR_LABELS, stepVoltageBody, type StepVoltageTest } from "../../../schemas/readings";
import { useRecordStepTest } from "../api";
import { localNow, sig } from "../format";
import { circuitOf } from "./circuit-target-fields";
import {
  ComponentSelect,
  FormShell,
  KeptOnPhone,
  NumberField,
  WhenField,
  type TargetOption,
  useFreshWhen,
} from "./form-bits";
import { JudgedResult } from "./judged-result";
import { LiveWorkCaution } from "./live-work-caution";

const START_VOLTS = [250, 500, 1000];

/** The form's text → the request body; stepVoltageBody (shared with the server) validates it. */
const stepVoltageForm = (options: TargetOption[]) =>
  z
    .object({
      componentId: blankAsNull,
      circuit: z.string(),
      conductors: z.string(),
      equipmentTempC: numberText,
      steps: z.array(z.object({ testVoltsDc: numberText, megohms: numberText })),
      instrument: z.string(),
      notes: z.string(),
      measuredAt: localDateTime,
    })
    .transform(
      (v) =>
        ({
          ...v,
          circuit: circuitOf({ componentId: v.componentId ?? "", circuit: v.circuit }, options),
        }) as z.input<typeof stepVoltageBody>,
    )
    .pipe(stepVoltageBody);
type StepVoltageFormValues = z.input<ReturnType<typeof stepVoltageForm>>;

/**
 * A step-voltage test: the same insulation read at rising DC test voltages. The server judges
 * the fall (src/domain/insulation-comparison.ts, judgeStepVoltage) and answers with its source.
 */
export function StepVoltageForm({
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
  const save = useRecordStepTest(siteId, boardId);
  const schema = useMemo(() => stepVoltageForm(options), [options]);
  const defaults = useMemo<StepVoltageFormValues>(
    () => ({
      componentId: defaultComponentId ?? "",
      circuit: "",
      conductors: "A-G",
      equipmentTempC: "",
      steps: START_VOLTS.map((v) => ({ testVoltsDc: String(v), megohms: "" })),
      instrument: "",
      notes: "",
      measuredAt: localNow(),
    }),
    [defaultComponentId],
  );
  const form = useSchemaForm(schema, defaults);
  useFreshWhen(form);
  const errors = form.formState.errors;
  const steps = useFieldArray({ control: form.control, name: "steps" });
  const [saved, setSaved] = useState<StepVoltageTest | null>(null);
  const [queued, setQueued] = useState(false);
  const e = (name: Parameters<typeof fieldError<StepVoltageFormValues>>[1]) => fieldError(errors, name);
  // A rule on the steps as a whole (two steps at one voltage) sits on the list, not on one step.
  const stepsError = e("steps") ?? fieldError(errors.steps ?? {}, "root");

  const submit = form.handleSubmit((body) => {
    const named = options.find((o) => o.componentId === body.componentId)?.designation ?? body.circuit;
    return save.mutateAsync({ ...body, label: `${named || "a circuit"} ${body.conductors}` }).then(
      (r) => {
        setQueued(r.queued);
        setSaved(r.queued ? null : r.data);
      },
      (err) => showSaveError(form, err),
    );
  });

  return (
    <div className="space-y-3">
      <FormShell
        title="Record a step-voltage test"
        onSubmit={(ev) => void submit(ev)}
        error={formMessage(errors)}
        busy={save.isPending}
        submitLabel="Save step test"
      >
        <LiveWorkCaution kind="step" />
        <ComponentSelect
          options={options}
          allowNone="No component: name the circuit"
          {...form.register("componentId")}
          error={e("componentId")}
        />
        <TextField
          label="Circuit"
          {...form.register("circuit")}
          hint="Filled from the component when left empty"
          error={e("circuit")}
        />
        <SelectField label="Conductors tested" {...form.register("conductors")} error={e("conductors")}>
          {CONDUCTORS.map((c) => (
            <option key={c} value={c}>
              {CONDUCTOR_LABELS[c]}
            </option>
          ))}
        </SelectField>
        <NumberField
          label="Equipment temperature (°C, optional)"
          {...form.register("equipmentTempC")}
          error={e("equipmentTempC")}
        />
        <fieldset className="space-y-2 sm:col-span-2">
          <legend className="text-sm font-semibold text-mist">Steps, lowest voltage first</legend>
          {stepsError && (
            <p role="alert" className="text-sm text-flare-300">
              {stepsError}
            </p>
          )}
          {steps.fields.map((r, i) => (
            <div key={r.id} className="grid grid-cols-[1fr_1fr_auto] items-end gap-2">
              <NumberField
                label={`Step ${i + 1} (V DC)`}
                {...form.register(`steps.${i}.testVoltsDc`)}
                step="1"
                error={e(`steps.${i}`) ?? e(`steps.${i}.testVoltsDc`)}
              />
              <NumberField
                label={`Step ${i + 1} reading (MΩ)`}
                {...form.register(`steps.${i}.megohms`)}
                required
                error={e(`steps.${i}.megohms`)}
              />
              <button
                type="button"
                aria-label={`Remove step ${i + 1}`}
                disabled={steps.fields.length <= 2}
                onClick={() => steps.remove(i)}
                className="min-h-12 min-w-12 rounded-md text-xl ring-1 ring-hull-500 disabled:opacity-40"
              >
                ×
              </button>
            </div>
          ))}
          <button
            type="button"
            disabled={steps.fields.length >= 8}
            onClick={() => steps.append({ testVoltsDc: "", megohms: "" })}
            className="min-h-12 w-full rounded-md px-4 font-semibold ring-1 ring-hull-500 disabled:opacity-40 sm:w-auto"
          >
            Add a step
          </button>
        </fieldset>
        <TextField label="Test set" {...form.register("instrument")} error={e("instrument")} />
        <WhenField {...form.register("measuredAt")} error={e("measuredAt")} />
        <TextField label="Notes" {...form.register("notes")} className="sm:col-span-2" error={e("notes")} />
      </FormShell>
      {queued && <KeptOnPhone what="Step-voltage test" />}
      {saved && (
        <JudgedResult
          live
          testId="step-result"
          title={`Saved: ${saved.designation ?? saved.circuit}, ${CONDUCTOR_LABELS[saved.conductors]} — ${saved.steps
            .map((s) => `${sig(s.megohms)} MΩ at ${s.testVoltsDc} V`)
            .join(", ")}`}
          verdict={saved.judgement.verdict}
          lines={saved.judgement.reasons}
          sources={[{ title: "Step-voltage rule", source: saved.judgement.source }]}
        />
      )}
    </div>
  );
}

import { useState, type FormEvent } from "react";
import { SelectField, TextField } from "../../../components/field";
import { CONDUCTORS, CONDUCTOR_LABELS, stepVoltageBody, type StepVoltageTest } from "../../../schemas/readings";
import { useRecordStepTest } from "../api";
import { fieldErrors, numOrNull, sig, toIso } from "../format";
import {
  ComponentSelect,
  FormShell,
  KeptOnPhone,
  NumberField,
  WhenField,
  saveErrors,
  type TargetOption,
} from "./form-bits";
import { JudgedResult } from "./judged-result";
import { LiveWorkCaution } from "./live-work-caution";

const START_VOLTS = [250, 500, 1000];

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
  const [rows, setRows] = useState<Array<{ key: number; volts?: number }>>(() =>
    START_VOLTS.map((v, i) => ({ key: i, volts: v })),
  );
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<StepVoltageTest | null>(null);
  const [queued, setQueued] = useState(false);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const componentId = String(f.get("componentId") || "") || null;
    const typed = String(f.get("circuit") ?? "").trim();
    const body = {
      componentId,
      circuit: typed || (options.find((o) => o.componentId === componentId)?.circuit ?? ""),
      conductors: String(f.get("conductors")),
      equipmentTempC: numOrNull(f.get("equipmentTempC")),
      steps: rows.map((r) => ({
        testVoltsDc: numOrNull(f.get(`volts${r.key}`)),
        megohms: numOrNull(f.get(`megohms${r.key}`)),
      })),
      instrument: String(f.get("instrument") ?? ""),
      notes: String(f.get("notes") ?? ""),
      measuredAt: toIso(String(f.get("measuredAt") ?? "")),
    };
    const parsed = stepVoltageBody.safeParse(body);
    setMessage(null);
    if (!parsed.success) {
      setErrors(fieldErrors(parsed.error.issues));
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    const named = options.find((o) => o.componentId === parsed.data.componentId)?.designation ?? parsed.data.circuit;
    save.mutate(
      { ...parsed.data, label: `${named || "a circuit"} ${parsed.data.conductors}` },
      {
        onSuccess: (r) => {
          setQueued(r.queued);
          setSaved(r.queued ? null : r.data);
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
        title="Record a step-voltage test"
        onSubmit={submit}
        error={message}
        busy={save.isPending}
        submitLabel="Save step test"
      >
        <LiveWorkCaution kind="step" />
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
        <NumberField label="Equipment temperature (°C, optional)" name="equipmentTempC" error={errors.equipmentTempC} />
        <fieldset className="space-y-2 sm:col-span-2">
          <legend className="text-sm font-semibold text-mist">Steps, lowest voltage first</legend>
          {errors.steps && (
            <p role="alert" className="text-sm text-flare-300">
              {errors.steps}
            </p>
          )}
          {rows.map((r, i) => (
            <div key={r.key} className="grid grid-cols-[1fr_1fr_auto] items-end gap-2">
              <NumberField
                label={`Step ${i + 1} (V DC)`}
                name={`volts${r.key}`}
                defaultValue={r.volts}
                step="1"
                error={errors[`steps.${i}`] ?? errors[`steps.${i}.testVoltsDc`]}
              />
              <NumberField
                label={`Step ${i + 1} reading (MΩ)`}
                name={`megohms${r.key}`}
                required
                error={errors[`steps.${i}.megohms`]}
              />
              <button
                type="button"
                aria-label={`Remove step ${i + 1}`}
                disabled={rows.length <= 2}
                onClick={() => setRows(rows.filter((x) => x.key !== r.key))}
                className="min-h-12 min-w-12 rounded-md text-xl ring-1 ring-hull-500 disabled:opacity-40"
              >
                ×
              </button>
            </div>
          ))}
          <button
            type="button"
            disabled={rows.length >= 8}
            onClick={() => {
              const key = Math.max(...rows.map((x) => x.key)) + 1;
              setRows([...rows, { key }]);
            }}
            className="min-h-12 w-full rounded-md px-4 font-semibold ring-1 ring-hull-500 disabled:opacity-40 sm:w-auto"
          >
            Add a step
          </button>
        </fieldset>
        <TextField label="Test set" name="instrument" />
        <WhenField error={errors.measuredAt} />
        <TextField label="Notes" name="notes" className="sm:col-span-2" />
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

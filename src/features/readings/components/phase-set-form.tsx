import { useMemo, useState } from "react";
import { FormProvider } from "react-hook-form";
import { z } from "zod";
import { TextField } from "../../../components/field";
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
  PHASE_KEYS,
  phaseComparisonKey,
  phaseReading,
  phaseSetBody,
  type InsulationReading,
  type PhaseComparison,
} from "../../../schemas/readings";
import { useRecordInsulation } from "../api";
import { localNow, megohms } from "../format";
import { CircuitTargetFields, circuitOf, targetLabel } from "./circuit-target-fields";
import { FormShell, NumberField, QualifierField, WhenField, type TargetOption, useFreshWhen } from "./form-bits";
import { LiveWorkCaution } from "./live-work-caution";
import { PhaseComparisonCard } from "./phase-comparison-list";
import { VerdictBadge } from "./verdict-badge";

type Phase = (typeof PHASE_KEYS)[number];

/** The form's text → the three readings' common part and each phase's value; phaseSetBody validates. */
const phaseSetForm = (options: TargetOption[]) =>
  z
    .object({
      componentId: z.string(),
      circuit: z.string(),
      testVoltsDc: numberText,
      equipmentTempC: numberText,
      ambientTempC: numberText,
      humidityPercent: numberText,
      instrument: z.string(),
      notes: z.string(),
      measuredAt: localDateTime,
      megohmsA: numberText,
      megohmsB: numberText,
      megohmsC: numberText,
      qualifierA: blankAsNull,
      qualifierB: blankAsNull,
      qualifierC: blankAsNull,
    })
    // Text as the body's input type; the shared schema piped after it checks every value.
    .transform(
      (v) =>
        ({ ...v, componentId: v.componentId || null, circuit: circuitOf(v, options) }) as z.input<typeof phaseSetBody>,
    )
    .pipe(phaseSetBody);
type PhaseSetValues = z.input<ReturnType<typeof phaseSetForm>>;

/**
 * Phase comparison: A, B and C to ground on one circuit, taken together under the same
 * conditions. Each is saved as its own insulation reading (and judged on its own); the
 * comparison between them and against the previous test comes from the server's board
 * readings (server/readings/comparisons.ts), never worked out on the phone. A phase that
 * saved stays saved: after a failure, saving again sends only the phases still missing.
 */
export function PhaseSetForm(props: {
  siteId: string;
  boardId: string;
  options: TargetOption[];
  comparisons: PhaseComparison[];
  defaultComponentId?: string;
}) {
  const [round, setRound] = useState(0);
  return <PhaseSet key={round} {...props} onAgain={() => setRound((r) => r + 1)} />;
}

function PhaseSet({
  siteId,
  boardId,
  options,
  comparisons,
  defaultComponentId,
  onAgain,
}: {
  siteId: string;
  boardId: string;
  options: TargetOption[];
  comparisons: PhaseComparison[];
  defaultComponentId?: string;
  onAgain: () => void;
}) {
  const save = useRecordInsulation(siteId, boardId);
  const schema = useMemo(() => phaseSetForm(options), [options]);
  const form = useSchemaForm<PhaseSetValues, z.output<typeof schema>>(schema, {
    componentId: defaultComponentId ?? "",
    circuit: "",
    testVoltsDc: "1000",
    equipmentTempC: "",
    ambientTempC: "",
    humidityPercent: "",
    instrument: "",
    notes: "",
    measuredAt: localNow(),
    megohmsA: "",
    megohmsB: "",
    megohmsC: "",
    qualifierA: "",
    qualifierB: "",
    qualifierC: "",
  });
  useFreshWhen(form);
  const errors = form.formState.errors;
  const e = (name: keyof PhaseSetValues) => fieldError(errors, name);
  const [notice, setNotice] = useState<string | null>(null);
  const [saved, setSaved] = useState<Partial<Record<Phase, InsulationReading>>>({});
  const [key, setKey] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [waiting, setWaiting] = useState<Phase[]>([]);

  const submit = form.handleSubmit(async (b) => {
    setNotice(null);
    setBusy(true);
    const done = { ...saved };
    const queued: Phase[] = [...waiting];
    try {
      const name = targetLabel(b.componentId, b.circuit, options);
      for (const p of PHASE_KEYS) {
        if (done[p] || queued.includes(p)) continue;
        const r = await save.mutateAsync({ ...phaseReading(b, p), label: `${name} ${p}-G` });
        // With no signal the reading waits in the phone's outbox: it is not sent twice, and the
        // comparison shows on the board once all three have reached the server.
        if (r.queued) queued.push(p);
        else done[p] = r.data;
        setSaved({ ...done });
        setWaiting([...queued]);
      }
      if (queued.length)
        setNotice(
          `No signal: ${queued.join(", ")} to ground wait in this phone's outbox and will be sent when the signal is back; the comparison shows on the board once they arrive.`,
        );
      setKey(phaseComparisonKey({ componentId: b.componentId, circuit: b.circuit }));
    } catch (err) {
      const missing = PHASE_KEYS.filter((p) => !done[p]).join(", ");
      const kept = PHASE_KEYS.filter((p) => done[p]).join(", ") || "none";
      showSaveError(form, err, { explain: (m) => `${m} Saved so far: ${kept}; not saved: ${missing}.` });
    } finally {
      setBusy(false);
    }
  });

  const all = PHASE_KEYS.every((p) => saved[p] || waiting.includes(p));
  const comparison = key ? comparisons.find((c) => c.key === key) : undefined;
  return (
    <div className="space-y-3">
      <FormProvider {...form}>
        <FormShell
          title="Record a phase comparison"
          onSubmit={(ev) => void submit(ev)}
          error={formMessage(errors) ?? notice}
          busy={busy}
          submitLabel={Object.keys(saved).length && !all ? "Save the phases not saved yet" : "Save three readings"}
          disabled={all}
        >
          <LiveWorkCaution kind="phases" />
          <CircuitTargetFields options={options} noneLabel="No component: name the circuit" />
          {PHASE_KEYS.map((p) => (
            <div key={p} className="grid gap-2 rounded-md p-2 ring-1 ring-hull-700 sm:col-span-2 sm:grid-cols-2">
              <NumberField
                label={`${p} to ground (MΩ)`}
                {...form.register(`megohms${p}`)}
                required
                error={e(`megohms${p}`)}
                hint={saved[p] ? "Saved" : undefined}
              />
              <QualifierField
                label={`${p}: the meter showed it`}
                {...form.register(`qualifier${p}`)}
                error={e(`qualifier${p}`)}
              />
            </div>
          ))}
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
          <TextField label="Instrument" {...form.register("instrument")} error={e("instrument")} />
          <WhenField {...form.register("measuredAt")} error={e("measuredAt")} />
          <TextField label="Notes" {...form.register("notes")} className="sm:col-span-2" error={e("notes")} />
        </FormShell>
      </FormProvider>
      {(Object.keys(saved).length > 0 || waiting.length > 0) && (
        <div role="status" className="space-y-2 rounded-lg bg-hull-850 p-3 ring-1 ring-hull-600">
          <ul className="space-y-1">
            {PHASE_KEYS.filter((p) => saved[p]).map((p) => {
              const r = saved[p]!;
              return (
                <li key={p}>
                  Saved {p} to ground: {megohms(r.megohms, r.megohmsQualifier)} →{" "}
                  <strong>
                    {r.judgement.correctedMegohms == null
                      ? "not corrected"
                      : `${megohms(r.judgement.correctedMegohms, r.judgement.qualifier)} at ${r.judgement.baseTemperatureC} °C`}
                  </strong>{" "}
                  <VerdictBadge verdict={r.judgement.verdict} />
                </li>
              );
            })}
          </ul>
          {all &&
            waiting.length === 0 &&
            (comparison ? (
              <PhaseComparisonCard comparison={comparison} />
            ) : (
              <p className="text-mist">
                No comparison: fewer than two of these readings are valid for judging (see each reading's reasons
                below).
              </p>
            ))}
          {all && (
            <button
              type="button"
              onClick={onAgain}
              className="min-h-12 w-full rounded-md px-4 font-semibold ring-1 ring-hull-500 sm:w-auto"
            >
              Record another phase comparison
            </button>
          )}
        </div>
      )}
    </div>
  );
}

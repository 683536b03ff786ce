import { useState, type FormEvent } from "react";
import { TextField } from "../../../components/field";
import {
  PHASE_KEYS,
  insulationReadingBody,
  phaseComparisonKey,
  type InsulationReading,
  type PhaseComparison,
} from "../../../schemas/readings";
import { useRecordInsulation } from "../api";
import { fieldErrors, megohms, numOrNull, qualifierOf, toIso } from "../format";
import {
  ComponentSelect,
  FormShell,
  NumberField,
  QualifierField,
  WhenField,
  saveErrors,
  type TargetOption,
} from "./form-bits";
import { LiveWorkCaution } from "./live-work-caution";
import { PhaseComparisonCard } from "./phase-comparison-list";
import { VerdictBadge } from "./verdict-badge";

type Phase = (typeof PHASE_KEYS)[number];

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
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<Partial<Record<Phase, InsulationReading>>>({});
  const [key, setKey] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [waiting, setWaiting] = useState<Phase[]>([]);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const componentId = String(f.get("componentId") || "") || null;
    const typed = String(f.get("circuit") ?? "").trim();
    const common = {
      componentId,
      circuit: typed || (options.find((o) => o.componentId === componentId)?.circuit ?? ""),
      testVoltsDc: numOrNull(f.get("testVoltsDc")),
      equipmentTempC: numOrNull(f.get("equipmentTempC")),
      ambientTempC: numOrNull(f.get("ambientTempC")),
      humidityPercent: numOrNull(f.get("humidityPercent")),
      instrument: String(f.get("instrument") ?? ""),
      notes: String(f.get("notes") ?? ""),
      measuredAt: toIso(String(f.get("measuredAt") ?? "")),
    };
    const bodies = PHASE_KEYS.map((p) => ({
      phase: p,
      parsed: insulationReadingBody.safeParse({
        ...common,
        conductors: `${p}-G`,
        megohms: numOrNull(f.get(`megohms${p}`)),
        megohmsQualifier: qualifierOf(f.get(`qualifier${p}`)),
      }),
    }));
    const fe: Record<string, string> = {};
    for (const b of bodies)
      if (!b.parsed.success)
        for (const [k, v] of Object.entries(fieldErrors(b.parsed.error.issues)))
          fe[k === "megohms" || k === "megohmsQualifier" ? `${k}${b.phase}` : k] ??= v;
    setMessage(null);
    if (Object.keys(fe).length) {
      setErrors(fe);
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    setBusy(true);
    const done = { ...saved };
    const queued: Phase[] = [...waiting];
    try {
      const name = options.find((o) => o.componentId === componentId)?.designation ?? common.circuit;
      for (const b of bodies) {
        if (done[b.phase] || queued.includes(b.phase) || !b.parsed.success) continue;
        const r = await save.mutateAsync({ ...b.parsed.data, label: `${name} ${b.phase}-G` });
        // With no signal the reading waits in the phone's outbox: it is not sent twice, and the
        // comparison shows on the board once all three have reached the server.
        if (r.queued) queued.push(b.phase);
        else done[b.phase] = r.data;
        setSaved({ ...done });
        setWaiting([...queued]);
      }
      if (queued.length)
        setMessage(
          `No signal: ${queued.join(", ")} to ground wait in this phone's outbox and will be sent when the signal is back; the comparison shows on the board once they arrive.`,
        );
      setKey(phaseComparisonKey({ componentId, circuit: common.circuit }));
    } catch (err) {
      const s = saveErrors(err);
      setErrors(s.fields);
      const missing = PHASE_KEYS.filter((p) => !done[p]).join(", ");
      setMessage(
        `${s.message} Saved so far: ${PHASE_KEYS.filter((p) => done[p]).join(", ") || "none"}; not saved: ${missing}.`,
      );
    } finally {
      setBusy(false);
    }
  }

  const all = PHASE_KEYS.every((p) => saved[p] || waiting.includes(p));
  const comparison = key ? comparisons.find((c) => c.key === key) : undefined;
  return (
    <div className="space-y-3">
      <FormShell
        title="Record a phase comparison"
        onSubmit={(e) => void submit(e)}
        error={message}
        busy={busy}
        submitLabel={Object.keys(saved).length && !all ? "Save the phases not saved yet" : "Save three readings"}
        disabled={all}
      >
        <LiveWorkCaution kind="phases" />
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
        {PHASE_KEYS.map((p) => (
          <div key={p} className="grid gap-2 rounded-md p-2 ring-1 ring-hull-700 sm:col-span-2 sm:grid-cols-2">
            <NumberField
              label={`${p} to ground (MΩ)`}
              name={`megohms${p}`}
              required
              error={errors[`megohms${p}`]}
              hint={saved[p] ? "Saved" : undefined}
            />
            <QualifierField label={`${p}: the meter showed it`} name={`qualifier${p}`} />
          </div>
        ))}
        <NumberField label="Equipment temperature (°C)" name="equipmentTempC" required error={errors.equipmentTempC} />
        <NumberField
          label="Test voltage (V DC)"
          name="testVoltsDc"
          defaultValue={1000}
          step="1"
          error={errors.testVoltsDc}
        />
        <NumberField
          label="Ambient temperature (°C)"
          name="ambientTempC"
          hint="With humidity: checks the dew point"
          error={errors.ambientTempC}
        />
        <NumberField label="Relative humidity (%)" name="humidityPercent" error={errors.humidityPercent} />
        <TextField label="Instrument" name="instrument" />
        <WhenField error={errors.measuredAt} />
        <TextField label="Notes" name="notes" className="sm:col-span-2" />
      </FormShell>
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

import { useState, type FormEvent } from "react";
import { TextField } from "../../../components/field";
import { LAMP_LOOKS, PHASE_KEYS, groundCheckBody } from "../../../schemas/readings";
import { useRecordGroundCheck } from "../api";
import { fieldErrors, numOrNull, toIso } from "../format";
import { FormShell, KeptOnPhone, NumberField, WhenField, saveErrors } from "./form-bits";

const LOOK_LABEL = { bright: "Bright", dim: "Dim", dark: "Dark" } as const;

/** At an energisation: how each lamp looks (or its volts to ground, with a meter). */
export function GroundCheckForm({
  siteId,
  boardId,
  lineVolts,
}: {
  siteId: string;
  boardId: string;
  lineVolts: number;
}) {
  const save = useRecordGroundCheck(siteId, boardId);
  const [mode, setMode] = useState<"looks" | "volts">("looks");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const [queued, setQueued] = useState(false);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const phases = <T,>(get: (p: string) => T) => ({ A: get("A"), B: get("B"), C: get("C") });
    const body = {
      energisation: String(f.get("energisation") ?? ""),
      lineVolts: numOrNull(f.get("lineVolts")),
      lamps: mode === "looks" ? phases((p) => String(f.get(`lamp${p}`) ?? "")) : null,
      volts: mode === "volts" ? phases((p) => numOrNull(f.get(`volts${p}`))) : null,
      branchOhms: mode === "volts" ? numOrNull(f.get("branchOhms")) : null,
      capacitanceMicroF: mode === "volts" ? numOrNull(f.get("capacitanceMicroF")) : null,
      notes: String(f.get("notes") ?? ""),
      measuredAt: toIso(String(f.get("measuredAt") ?? "")),
    };
    const parsed = groundCheckBody.safeParse(body);
    setMessage(null);
    if (!parsed.success) {
      setErrors(fieldErrors(parsed.error.issues));
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    save.mutate(
      { ...parsed.data, label: parsed.data.energisation || "this board" },
      {
        onSuccess: (r) => {
          setQueued(r.queued);
          setSaved(r.queued ? null : r.data.judgement.words);
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
        title="Record a ground-lamp check"
        onSubmit={submit}
        error={message}
        busy={save.isPending}
        submitLabel="Save lamp check"
      >
        <TextField
          label="Energisation"
          name="energisation"
          hint="Which step, e.g. bus section A from the temporary feed"
          className="sm:col-span-2"
        />
        <NumberField label="Line voltage (V)" name="lineVolts" defaultValue={lineVolts} error={errors.lineVolts} />
        <fieldset className="sm:col-span-2">
          <legend className="text-sm font-semibold text-mist">What was recorded</legend>
          <div className="mt-1 flex gap-2">
            {(["looks", "volts"] as const).map((m) => (
              <label
                key={m}
                className="flex min-h-11 items-center gap-2 rounded-md bg-hull-900 px-3 ring-1 ring-hull-600"
              >
                <input type="radio" name="mode" value={m} checked={mode === m} onChange={() => setMode(m)} />
                {m === "looks" ? "How each lamp looks" : "Volts to ground (meter)"}
              </label>
            ))}
          </div>
        </fieldset>
        {mode === "looks" ? (
          PHASE_KEYS.map((p) => (
            <fieldset key={p} className="rounded-md p-2 ring-1 ring-hull-700">
              <legend className="px-1 text-sm font-semibold text-mist">Phase {p} lamp</legend>
              <div className="flex flex-wrap gap-2">
                {LAMP_LOOKS.map((l) => (
                  <label
                    key={l}
                    className="flex min-h-11 items-center gap-2 rounded-md bg-hull-900 px-3 ring-1 ring-hull-600"
                  >
                    <input type="radio" name={`lamp${p}`} value={l} defaultChecked={l === "bright"} />
                    {LOOK_LABEL[l]}
                  </label>
                ))}
              </div>
            </fieldset>
          ))
        ) : (
          <>
            {PHASE_KEYS.map((p) => (
              <NumberField key={p} label={`Phase ${p} to ground (V)`} name={`volts${p}`} error={errors[`volts.${p}`]} />
            ))}
            <NumberField
              label="Lamp branch resistance (Ω, optional)"
              name="branchOhms"
              hint="Gives an estimate of the fault resistance"
              error={errors.branchOhms}
            />
            <NumberField
              label="Capacitance to ground per phase (µF, optional)"
              name="capacitanceMicroF"
              hint="From the system's cable and equipment data, or measured. Without it the estimate is shown as a range, since the charging current of the phases' capacitance is left out."
              error={errors.capacitanceMicroF}
            />
          </>
        )}
        {errors.lamps && (
          <p role="alert" className="text-sm text-flare-300 sm:col-span-2">
            {errors.lamps}
          </p>
        )}
        <WhenField error={errors.measuredAt} />
        <TextField label="Notes" name="notes" />
      </FormShell>
      {queued && <KeptOnPhone what="Lamp check" />}
      {saved && (
        <p role="status" className="rounded-md bg-hull-800 p-3 font-semibold">
          {saved}
        </p>
      )}
    </div>
  );
}

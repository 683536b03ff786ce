import { useMemo, useState } from "react";
import { z } from "zod";
import { TextField } from "../../../components/field";
import { fieldError, formMessage, localDateTime, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { LAMP_LOOKS, PHASE_KEYS, groundCheckBody } from "../../../schemas/readings";
import { useRecordGroundCheck } from "../api";
import { localNow } from "../format";
import { FormShell, KeptOnPhone, NumberField, WhenField, useFreshWhen } from "./form-bits";

const LOOK_LABEL = { bright: "Bright", dim: "Dim", dark: "Dark" } as const;

/** The form's text → the request body; groundCheckBody (shared with the server) validates it. */
const groundCheckForm = z
  .object({
    mode: z.enum(["looks", "volts"]),
    energisation: z.string(),
    lineVolts: numberText,
    lamps: z.object({ A: z.string(), B: z.string(), C: z.string() }),
    volts: z.object({ A: numberText, B: numberText, C: numberText }),
    branchOhms: numberText,
    capacitanceMicroF: numberText,
    notes: z.string(),
    measuredAt: localDateTime,
  })
  // Only what the chosen way of recording shows is sent: the lamps' looks, or the meter's volts.
  .transform(
    ({ mode, ...v }) =>
      ({
        ...v,
        lamps: mode === "looks" ? v.lamps : null,
        volts: mode === "volts" ? v.volts : null,
        branchOhms: mode === "volts" ? v.branchOhms : null,
        capacitanceMicroF: mode === "volts" ? v.capacitanceMicroF : null,
      }) as z.input<typeof groundCheckBody>,
  )
  .pipe(groundCheckBody);
type GroundCheckFormValues = z.input<typeof groundCheckForm>;

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
  const defaults = useMemo<GroundCheckFormValues>(
    () => ({
      mode: "looks",
      energisation: "",
      lineVolts: String(lineVolts),
      lamps: { A: "bright", B: "bright", C: "bright" },
      volts: { A: "", B: "", C: "" },
      branchOhms: "",
      capacitanceMicroF: "",
      notes: "",
      measuredAt: localNow(),
    }),
    [lineVolts],
  );
  const form = useSchemaForm(groundCheckForm, defaults);
  useFreshWhen(form);
  const errors = form.formState.errors;
  const mode = form.watch("mode");
  const [saved, setSaved] = useState<string | null>(null);
  const [queued, setQueued] = useState(false);
  const e = (name: Parameters<typeof fieldError<GroundCheckFormValues>>[1]) => fieldError(errors, name);

  const submit = form.handleSubmit((body) =>
    save.mutateAsync({ ...body, label: body.energisation || "this board" }).then(
      (r) => {
        setQueued(r.queued);
        setSaved(r.queued ? null : r.data.judgement.words);
      },
      (err) => showSaveError(form, err),
    ),
  );

  return (
    <div className="space-y-3">
      <FormShell
        title="Record a ground-lamp check"
        onSubmit={(ev) => void submit(ev)}
        error={formMessage(errors)}
        busy={save.isPending}
        submitLabel="Save lamp check"
      >
        <TextField
          label="Energisation"
          {...form.register("energisation")}
          hint="Which step, e.g. bus section A from the temporary feed"
          className="sm:col-span-2"
          error={e("energisation")}
        />
        <NumberField label="Line voltage (V)" {...form.register("lineVolts")} error={e("lineVolts")} />
        <fieldset className="sm:col-span-2">
          <legend className="text-sm font-semibold text-mist">What was recorded</legend>
          <div className="mt-1 flex gap-2">
            {(["looks", "volts"] as const).map((m) => (
              <label
                key={m}
                className="flex min-h-11 items-center gap-2 rounded-md bg-hull-900 px-3 ring-1 ring-hull-600"
              >
                <input type="radio" value={m} {...form.register("mode")} />
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
                    <input type="radio" value={l} {...form.register(`lamps.${p}`)} />
                    {LOOK_LABEL[l]}
                  </label>
                ))}
              </div>
            </fieldset>
          ))
        ) : (
          <>
            {PHASE_KEYS.map((p) => (
              <NumberField
                key={p}
                label={`Phase ${p} to ground (V)`}
                {...form.register(`volts.${p}`)}
                error={e(`volts.${p}`)}
              />
            ))}
            <NumberField
              label="Lamp branch resistance (Ω, optional)"
              {...form.register("branchOhms")}
              hint="Gives an estimate of the fault resistance"
              error={e("branchOhms")}
            />
            <NumberField
              label="Capacitance to ground per phase (µF, optional)"
              {...form.register("capacitanceMicroF")}
              hint="From the system's cable and equipment data, or measured. Without it the estimate is shown as a range, since the charging current of the phases' capacitance is left out."
              error={e("capacitanceMicroF")}
            />
          </>
        )}
        {e("lamps") && (
          <p role="alert" className="text-sm text-flare-300 sm:col-span-2">
            {e("lamps")}
          </p>
        )}
        <WhenField {...form.register("measuredAt")} error={e("measuredAt")} />
        <TextField label="Notes" {...form.register("notes")} error={e("notes")} />
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

import type { ReactNode } from "react";
import { useController } from "react-hook-form";
import { z } from "zod";
import { Button } from "../../../components/button";
import { TextArea } from "../../../components/field";
import { astmD610Grade, iso4628RiGrade } from "../../../domain/corrosion";
import {
  CONTAMINANT_LABELS,
  CONTAMINANTS,
  INSULATION_STATE_LABELS,
  INSULATION_STATES,
  MECHANISM,
  MECHANISM_LABELS,
} from "../../../domain/vocab";
import { fieldError, hasFieldErrors, numberText, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { createInspectionBody } from "../../../schemas/inventory";
import { useLogInspection } from "../api";
import type { Inspection } from "../contract";
import type { Submitted } from "../../../lib/outbox";
import { RustGuide } from "./rust-guide";

/** The form's values → the request body; createInspectionBody (the server's own schema) validates it. */
const inspectionForm = z
  .object({
    percentRusted: numberText,
    belowWaterLine: z.boolean().nullable(),
    contaminants: z.array(z.enum(CONTAMINANTS)),
    mechanism: z.enum(MECHANISM).nullable(),
    insulation: z.enum(INSULATION_STATES).nullable(),
    notes: z.string(),
  })
  .transform((v): z.input<typeof createInspectionBody> => v)
  .pipe(createInspectionBody);

const toggle = (on: boolean) =>
  `min-h-12 rounded-md px-3 text-left font-semibold ring-1 ${on ? "bg-brass-400 text-hull-950 ring-brass-300" : "bg-hull-800 text-chalk ring-hull-600"}`;

/** A message from the server beside a group of toggles. */
function GroupError({ error }: { error?: string }) {
  return error ? (
    <p role="alert" className="mt-1 text-sm text-flare-300">
      {error}
    </p>
  ) : null;
}

function Choice<T extends string>({
  legend,
  options,
  labels,
  value,
  onChange,
  note,
  error,
}: {
  legend: string;
  options: readonly T[];
  labels: Record<T, string>;
  value: T | null;
  onChange: (v: T | null) => void;
  note?: ReactNode;
  error?: string;
}) {
  return (
    <fieldset>
      <legend className="text-sm font-semibold text-mist">{legend}</legend>
      {note}
      <div className="mt-1 grid grid-cols-2 gap-2">
        {options.map((o) => (
          <button
            key={o}
            type="button"
            aria-pressed={value === o}
            className={toggle(value === o)}
            onClick={() => onChange(value === o ? null : o)}
          >
            {labels[o]}
          </button>
        ))}
      </div>
      <GroupError error={error} />
    </fieldset>
  );
}

function preview(percent: string): { grade: number; ri: string } | null {
  const p = Number(percent.trim().replace(",", "."));
  if (percent.trim() === "" || !Number.isFinite(p) || p < 0 || p > 100) return null;
  return { grade: astmD610Grade(p), ri: iso4628RiGrade(p) };
}

/** One screen, one tap to save: what a volunteer sees on a part as it comes off the board. */
export function InspectionForm({
  siteId,
  componentId,
  label,
  belowDefault,
  onSaved,
}: {
  siteId: string;
  componentId: string;
  /** The position's designation, for the outbox's list when saved with no signal. */
  label: string;
  belowDefault: boolean | null;
  onSaved: (i: Submitted<Inspection>) => void;
}) {
  const form = useSchemaForm(inspectionForm, {
    percentRusted: "",
    belowWaterLine: belowDefault,
    contaminants: [],
    mechanism: null,
    insulation: null,
    notes: "",
  });
  const { register, control, setValue, formState } = form;
  const errors = formState.errors;
  const e = (name: keyof z.input<typeof inspectionForm>) => fieldError(errors, name);
  // The toggles are buttons, not inputs: each is a controlled field.
  const below = useController({ control, name: "belowWaterLine" }).field;
  const found = useController({ control, name: "contaminants" }).field;
  const mechanism = useController({ control, name: "mechanism" }).field;
  const insulation = useController({ control, name: "insulation" }).field;
  const g = preview(form.watch("percentRusted"));
  // Field messages speak for themselves; the server's own message shows when none came with it.
  const message = hasFieldErrors(errors) ? null : serverMessage(errors);
  const log = useLogInspection(siteId);

  const submit = form.handleSubmit((body) =>
    log.mutateAsync({ componentId, label, ...body }).then(onSaved, (err: unknown) => showSaveError(form, err)),
  );
  return (
    <form onSubmit={(ev) => void submit(ev)} noValidate className="space-y-4" aria-label="Log an inspection">
      <div>
        <label htmlFor="percent-rusted" className="block text-sm font-semibold text-mist">
          Surface rusted (%)
        </label>
        <div className="mt-1 flex items-center gap-3">
          <input
            id="percent-rusted"
            inputMode="decimal"
            {...register("percentRusted")}
            aria-invalid={!!e("percentRusted")}
            aria-describedby="percent-grade"
            className="min-h-12 w-28 rounded-md border border-hull-500 bg-hull-900 px-3 font-mono text-lg text-chalk"
            placeholder="e.g. 2"
          />
          <p id="percent-grade" aria-live="polite" className="font-mono text-sm">
            {g ? (
              <>
                ASTM D610 grade <strong className="text-lg">{g.grade}</strong> · ISO 4628-3 {g.ri}
              </>
            ) : (
              <span className="text-fog">grade shows here</span>
            )}
          </p>
        </div>
        <GroupError error={e("percentRusted")} />
        <div className="mt-2">
          <RustGuide
            grade={g?.grade ?? null}
            onPick={(p) => setValue("percentRusted", String(p), { shouldValidate: formState.isSubmitted })}
          />
        </div>
      </div>
      <fieldset>
        <legend className="text-sm font-semibold text-mist">Was it below the flood water line?</legend>
        {belowDefault !== null && (
          <p className="text-xs text-fog">
            Filled in from the board's water line and the position's height; change it if you saw otherwise.
          </p>
        )}
        <div className="mt-1 grid grid-cols-2 gap-2">
          <button
            type="button"
            aria-pressed={below.value === true}
            className={toggle(below.value === true)}
            onClick={() => below.onChange(below.value === true ? null : true)}
          >
            Yes, below
          </button>
          <button
            type="button"
            aria-pressed={below.value === false}
            className={toggle(below.value === false)}
            onClick={() => below.onChange(below.value === false ? null : false)}
          >
            No, above
          </button>
        </div>
        <GroupError error={e("belowWaterLine")} />
      </fieldset>
      <fieldset>
        <legend className="text-sm font-semibold text-mist">What is on it? (tap all that apply)</legend>
        <div className="mt-1 grid grid-cols-2 gap-2">
          {CONTAMINANTS.map((c) => (
            <button
              key={c}
              type="button"
              aria-pressed={found.value.includes(c)}
              className={toggle(found.value.includes(c))}
              onClick={() =>
                found.onChange(found.value.includes(c) ? found.value.filter((x) => x !== c) : [...found.value, c])
              }
            >
              {CONTAMINANT_LABELS[c]}
            </button>
          ))}
        </div>
        <GroupError error={e("contaminants")} />
      </fieldset>
      <Choice
        legend="Mechanism"
        options={MECHANISM}
        labels={MECHANISM_LABELS}
        value={mechanism.value}
        onChange={mechanism.onChange}
        error={e("mechanism")}
        note={
          <p className="text-xs text-brass-300">
            Old breakers should be operated as few times as possible: if you have not worked it, choose “Not tried”
            rather than trying it now.
          </p>
        }
      />
      <Choice
        legend="Insulation"
        options={INSULATION_STATES}
        labels={INSULATION_STATE_LABELS}
        value={insulation.value}
        onChange={insulation.onChange}
        error={e("insulation")}
      />
      <TextArea label="Notes" {...register("notes")} error={e("notes")} />
      {message && (
        <p role="alert" className="text-sm text-flare-300">
          {message}
        </p>
      )}
      <Button type="submit" className="w-full min-h-14 text-lg" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? "Saving…" : "Save inspection"}
      </Button>
    </form>
  );
}

import { useState, type FormEvent, type ReactNode } from "react";
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
  type Contaminant,
  type InsulationState,
  type Mechanism,
} from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { useLogInspection } from "../api";
import type { Inspection } from "../contract";
import type { Submitted } from "../../../lib/outbox";
import { RustGuide } from "./rust-guide";

const toggle = (on: boolean) =>
  `min-h-12 rounded-md px-3 text-left font-semibold ring-1 ${on ? "bg-brass-400 text-hull-950 ring-brass-300" : "bg-hull-800 text-chalk ring-hull-600"}`;

function Choice<T extends string>({
  legend,
  options,
  labels,
  value,
  onChange,
  note,
}: {
  legend: string;
  options: readonly T[];
  labels: Record<T, string>;
  value: T | null;
  onChange: (v: T | null) => void;
  note?: ReactNode;
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
    </fieldset>
  );
}

function preview(percent: string): { grade: number; ri: string } | null {
  const p = Number(percent);
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
  const [percent, setPercent] = useState("");
  const [below, setBelow] = useState<boolean | null>(belowDefault);
  const [found, setFound] = useState<Contaminant[]>([]);
  const [mechanism, setMechanism] = useState<Mechanism | null>(null);
  const [insulation, setInsulation] = useState<InsulationState | null>(null);
  const [notes, setNotes] = useState("");
  const log = useLogInspection(siteId);
  const fields = log.error instanceof ApiError ? log.error.fields : {};
  const g = preview(percent);

  function submit(e: FormEvent) {
    e.preventDefault();
    log.mutate(
      {
        componentId,
        percentRusted: percent.trim() === "" ? null : Number(percent),
        belowWaterLine: below,
        contaminants: found,
        mechanism,
        insulation,
        notes,
        label,
      },
      { onSuccess: onSaved },
    );
  }
  return (
    <form onSubmit={submit} className="space-y-4" aria-label="Log an inspection">
      <div>
        <label htmlFor="percent-rusted" className="block text-sm font-semibold text-mist">
          Surface rusted (%)
        </label>
        <div className="mt-1 flex items-center gap-3">
          <input
            id="percent-rusted"
            inputMode="decimal"
            value={percent}
            onChange={(e) => setPercent(e.target.value)}
            aria-invalid={!!fields.percentRusted}
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
        {fields.percentRusted && (
          <p role="alert" className="mt-1 text-sm text-flare-300">
            {fields.percentRusted}
          </p>
        )}
        <div className="mt-2">
          <RustGuide grade={g?.grade ?? null} onPick={(p) => setPercent(String(p))} />
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
            aria-pressed={below === true}
            className={toggle(below === true)}
            onClick={() => setBelow(below === true ? null : true)}
          >
            Yes, below
          </button>
          <button
            type="button"
            aria-pressed={below === false}
            className={toggle(below === false)}
            onClick={() => setBelow(below === false ? null : false)}
          >
            No, above
          </button>
        </div>
      </fieldset>
      <fieldset>
        <legend className="text-sm font-semibold text-mist">What is on it? (tap all that apply)</legend>
        <div className="mt-1 grid grid-cols-2 gap-2">
          {CONTAMINANTS.map((c) => (
            <button
              key={c}
              type="button"
              aria-pressed={found.includes(c)}
              className={toggle(found.includes(c))}
              onClick={() => setFound(found.includes(c) ? found.filter((x) => x !== c) : [...found, c])}
            >
              {CONTAMINANT_LABELS[c]}
            </button>
          ))}
        </div>
      </fieldset>
      <Choice
        legend="Mechanism"
        options={MECHANISM}
        labels={MECHANISM_LABELS}
        value={mechanism}
        onChange={setMechanism}
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
        value={insulation}
        onChange={setInsulation}
      />
      <TextArea label="Notes" value={notes} onChange={(e) => setNotes(e.target.value)} error={fields.notes} />
      {log.isError && !Object.keys(fields).length && (
        <p role="alert" className="text-sm text-flare-300">
          {log.error.message}
        </p>
      )}
      <Button type="submit" className="w-full min-h-14 text-lg" disabled={log.isPending}>
        {log.isPending ? "Saving…" : "Save inspection"}
      </Button>
    </form>
  );
}

import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import {
  DEFECT_CATEGORIES,
  DEFECT_CATEGORY_LABELS,
  DEFECT_SEVERITIES,
  DEFECT_SEVERITY_DEFINITIONS,
  DEFECT_SEVERITY_LABELS,
  type DefectCategory,
  type DefectSeverity,
} from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { PARTS_STATES, PARTS_STATE_LABELS, type DefectOptions } from "../../../schemas/defects";
import { useBoardPositions } from "../api";
import { memberLabel, repairCrew } from "../assignees";

export interface FormPrefill {
  boardId?: string;
  sectionId?: string | null;
  positionId?: string;
  componentId?: string | null;
  inspectionId?: string | null;
  category?: DefectCategory;
  severity?: DefectSeverity;
}

const num = (v: FormDataEntryValue | null) => (v === null || String(v).trim() === "" ? null : Number(v));

/** The "raise a defect" form; the survey's quick log links here with the finding prefilled. */
export function DefectForm({
  siteId,
  options,
  prefill,
  canManage,
  onSubmit,
  pending,
  error,
}: {
  siteId: string;
  options: DefectOptions;
  prefill: FormPrefill;
  canManage: boolean;
  onSubmit: (body: Record<string, unknown>) => void;
  pending: boolean;
  error: unknown;
}) {
  const [boardId, setBoardId] = useState(prefill.boardId ?? options.boards[0]?.id ?? "");
  const [positionId, setPositionId] = useState(prefill.positionId ?? "");
  const [sectionId, setSectionId] = useState(prefill.sectionId ?? "");
  const positions = useBoardPositions(siteId, boardId);
  // Choosing a position (or its list arriving) sets the section to the position's own; adjusted while
  // rendering (React's "storing information from previous renders"), not in an effect.
  const chosen = positions.data?.find((x) => x.id === positionId);
  const [sectionFrom, setSectionFrom] = useState<string | null>(null);
  if ((chosen?.id ?? null) !== sectionFrom) {
    setSectionFrom(chosen?.id ?? null);
    if (chosen) setSectionId(chosen.sectionId ?? "");
  }
  const fields = error instanceof ApiError ? error.fields : {};

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const linkedSamePosition = positionId && positionId === prefill.positionId;
    onSubmit({
      boardId,
      sectionId: sectionId || null,
      positionId: positionId || null,
      componentId: linkedSamePosition ? (prefill.componentId ?? null) : null,
      inspectionId: linkedSamePosition ? (prefill.inspectionId ?? null) : null,
      title: f.get("title"),
      description: f.get("description"),
      category: f.get("category"),
      severity: f.get("severity"),
      safetyCritical: f.get("safetyCritical") === "on",
      blocksEnergisation: f.get("blocksEnergisation") === "on",
      effortHours: num(f.get("effortHours")),
      costEstimate: num(f.get("costEstimate")),
      partsNeeded: f.get("partsNeeded"),
      partsState: f.get("partsState"),
      ...(canManage
        ? { assigneeId: (f.get("assigneeId") as string) || null, dueOn: (f.get("dueOn") as string) || null }
        : {}),
    });
  }

  return (
    <form
      onSubmit={submit}
      noValidate
      className="grid gap-4 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 md:grid-cols-2"
    >
      {error instanceof ApiError && (
        <p role="alert" className="text-flare-300 md:col-span-2">
          {error.message}
        </p>
      )}
      <SelectField
        label="Board"
        value={boardId}
        onChange={(e) => {
          setBoardId(e.target.value);
          setPositionId("");
          setSectionId("");
        }}
        error={fields.boardId}
      >
        {options.boards.map((b) => (
          <option key={b.id} value={b.id}>
            {b.name}
          </option>
        ))}
      </SelectField>
      <SelectField
        label="Position (optional)"
        value={positionId}
        onChange={(e) => setPositionId(e.target.value)}
        error={fields.positionId}
      >
        <option value="">Whole board or section</option>
        {positions.data?.map((p) => (
          <option key={p.id} value={p.id}>
            {p.designation}
          </option>
        ))}
      </SelectField>
      <SelectField
        label="Section (optional)"
        value={sectionId}
        onChange={(e) => setSectionId(e.target.value)}
        error={fields.sectionId}
      >
        <option value="">No section</option>
        {options.sections
          .filter((s) => s.boardId === boardId)
          .map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
      </SelectField>
      <SelectField
        label="Category"
        name="category"
        defaultValue={prefill.category ?? ""}
        error={fields.category}
        required
      >
        <option value="" disabled>
          Choose…
        </option>
        {DEFECT_CATEGORIES.map((c) => (
          <option key={c} value={c}>
            {DEFECT_CATEGORY_LABELS[c]}
          </option>
        ))}
      </SelectField>
      <TextField
        className="md:col-span-2"
        label="What is wrong"
        name="title"
        required
        maxLength={200}
        error={fields.title}
        placeholder="e.g. Arc track on the base between poles B and C"
      />
      <TextArea
        className="md:col-span-2"
        label="Details (optional)"
        name="description"
        maxLength={8000}
        error={fields.description}
      />
      <fieldset className="md:col-span-2">
        <legend className="text-sm font-semibold text-mist">
          Severity{" "}
          {fields.severity && (
            <span role="alert" className="text-flare-300">
              — {fields.severity}
            </span>
          )}
        </legend>
        <div className="mt-1 grid gap-2 sm:grid-cols-2">
          {DEFECT_SEVERITIES.map((s) => (
            <label
              key={s}
              className="flex min-h-11 cursor-pointer gap-3 rounded-md bg-hull-900 p-3 ring-1 ring-hull-600 has-[:checked]:ring-2 has-[:checked]:ring-brass-400"
            >
              <input
                type="radio"
                name="severity"
                value={s}
                defaultChecked={prefill.severity === s}
                className="mt-1 h-5 w-5 accent-brass-400"
              />
              <span>
                <span className="block font-semibold">{DEFECT_SEVERITY_LABELS[s]}</span>
                <span className="block text-sm text-mist">{DEFECT_SEVERITY_DEFINITIONS[s]}</span>
              </span>
            </label>
          ))}
        </div>
      </fieldset>
      <label className="flex min-h-11 items-start gap-3 rounded-md bg-hull-900 p-3 ring-1 ring-flare-400/60">
        <input type="checkbox" name="safetyCritical" className="mt-1 h-5 w-5 accent-brass-400" />
        <span>
          <span className="block font-semibold">⚡ Safety-critical</span>
          <span className="block text-sm text-mist">
            Could cause shock or arc flash, or a fault to the hull or to earth.
          </span>
        </span>
      </label>
      <label className="flex min-h-11 items-start gap-3 rounded-md bg-hull-900 p-3 ring-1 ring-brass-400/60">
        <input type="checkbox" name="blocksEnergisation" className="mt-1 h-5 w-5 accent-brass-400" />
        <span>
          <span className="block font-semibold">■ Blocks energising its section</span>
          <span className="block text-sm text-mist">
            The section must not be brought back until this is dealt with.
          </span>
        </span>
      </label>
      <TextField
        label="Estimated effort (hours)"
        name="effortHours"
        type="number"
        min={0}
        step={0.5}
        inputMode="decimal"
        error={fields.effortHours}
        hint="Leave blank if unknown: it counts as a working day."
      />
      <MoneyField label="Estimated cost" name="costEstimate" error={fields.costEstimate} />
      <TextField label="Parts needed (optional)" name="partsNeeded" maxLength={2000} error={fields.partsNeeded} />
      <SelectField label="Parts" name="partsState" defaultValue="none_needed" error={fields.partsState}>
        {PARTS_STATES.map((p) => (
          <option key={p} value={p}>
            {PARTS_STATE_LABELS[p]}
          </option>
        ))}
      </SelectField>
      {canManage && (
        <>
          <SelectField label="Assign to (optional)" name="assigneeId" defaultValue="" error={fields.assigneeId}>
            <option value="">Nobody yet</option>
            {repairCrew(options).map((c) => (
              <option key={c.id} value={c.id}>
                {memberLabel(c)}
              </option>
            ))}
          </SelectField>
          <TextField label="Due on (optional)" name="dueOn" type="date" error={fields.dueOn} />
        </>
      )}
      <div className="md:col-span-2">
        <Button type="submit" disabled={pending || !boardId}>
          {pending ? "Raising…" : "Raise the defect"}
        </Button>
      </div>
    </form>
  );
}

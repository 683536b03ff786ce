import { useMemo } from "react";
import { useController } from "react-hook-form";
import { z } from "zod";
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
import { blankAsNull, fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import {
  PARTS_STATES,
  PARTS_STATE_LABELS,
  createDefectBody,
  type CreateDefectBody,
  type DefectOptions,
} from "../../../schemas/defects";
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

/** The form's text → the request body; createDefectBody (the server's own schema) validates it. */
const defectForm = (prefill: FormPrefill, canManage: boolean) =>
  z
    .object({
      boardId: z.string(),
      sectionId: blankAsNull,
      positionId: blankAsNull,
      title: z.string(),
      description: z.string(),
      category: z.string(),
      severity: z.string().nullable(),
      safetyCritical: z.boolean(),
      blocksEnergisation: z.boolean(),
      effortHours: numberText,
      costEstimate: numberText,
      partsNeeded: z.string(),
      partsState: z.string(),
      assigneeId: blankAsNull,
      dueOn: blankAsNull,
    })
    // The finding's component and inspection go with it only while the prefilled position is kept.
    .transform((v) => {
      const samePosition = !!v.positionId && v.positionId === prefill.positionId;
      return {
        ...v,
        componentId: samePosition ? (prefill.componentId ?? null) : null,
        inspectionId: samePosition ? (prefill.inspectionId ?? null) : null,
        assigneeId: canManage ? v.assigneeId : null,
        dueOn: canManage ? v.dueOn : null,
      } as z.input<typeof createDefectBody>;
    })
    .pipe(createDefectBody);
type DefectFormValues = z.input<ReturnType<typeof defectForm>>;

/** The schema's own limit for a text field, so the input stops where the server would refuse. */
const maxOf = (s: z.ZodString | z.ZodDefault<z.ZodString>) =>
  (s instanceof z.ZodDefault ? s.unwrap() : s).maxLength ?? undefined;
const MAX = {
  title: maxOf(createDefectBody.shape.title),
  description: maxOf(createDefectBody.shape.description),
  partsNeeded: maxOf(createDefectBody.shape.partsNeeded),
};

/** The "raise a defect" form; the survey's quick log links here with the finding prefilled. */
export function DefectForm({
  siteId,
  options,
  prefill,
  canManage,
  onSubmit,
}: {
  siteId: string;
  options: DefectOptions;
  prefill: FormPrefill;
  canManage: boolean;
  /** Saves the body; a refusal's messages go beside the fields. */
  onSubmit: (body: CreateDefectBody) => Promise<unknown>;
}) {
  const schema = useMemo(() => defectForm(prefill, canManage), [prefill, canManage]);
  const form = useSchemaForm(schema, {
    boardId: prefill.boardId ?? options.boards[0]?.id ?? "",
    sectionId: prefill.sectionId ?? "",
    positionId: prefill.positionId ?? "",
    title: "",
    description: "",
    category: prefill.category ?? "",
    severity: prefill.severity ?? null,
    safetyCritical: false,
    blocksEnergisation: false,
    effortHours: "",
    costEstimate: "",
    partsNeeded: "",
    partsState: "none_needed",
    assigneeId: "",
    dueOn: "",
  });
  const { register, control, setValue, formState } = form;
  const errors = formState.errors;
  const e = (name: keyof DefectFormValues) => fieldError(errors, name);
  // Board, position and section depend on each other (the position list follows the board, the section
  // follows the position), so they are controlled: a list that arrives later still shows the chosen one.
  const board = useController({ control, name: "boardId" });
  const position = useController({ control, name: "positionId" });
  const section = useController({ control, name: "sectionId" });
  const boardId = board.field.value;
  const positions = useBoardPositions(siteId, boardId);
  const message = formMessage(errors);

  const submit = form.handleSubmit((body) => onSubmit(body).catch((err: unknown) => showSaveError(form, err)));

  return (
    <form
      onSubmit={(ev) => void submit(ev)}
      noValidate
      className="grid gap-4 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 md:grid-cols-2"
    >
      {message && (
        <p role="alert" className="text-flare-300 md:col-span-2">
          {message}
        </p>
      )}
      <SelectField
        label="Board"
        {...board.field}
        onChange={(ev) => {
          board.field.onChange(ev);
          setValue("positionId", "");
          setValue("sectionId", "");
        }}
        error={e("boardId")}
      >
        {options.boards.map((b) => (
          <option key={b.id} value={b.id}>
            {b.name}
          </option>
        ))}
      </SelectField>
      <SelectField
        label="Position (optional)"
        {...position.field}
        onChange={(ev) => {
          position.field.onChange(ev);
          const chosen = positions.data?.find((x) => x.id === ev.target.value);
          if (chosen) setValue("sectionId", chosen.sectionId ?? "");
        }}
        error={e("positionId")}
        hint={
          positions.fetchStatus === "paused" && !positions.data
            ? "No signal, and this board's positions are not kept on this phone yet: raise it against the board and name the position in what is wrong, or raise it from the position's quick log."
            : undefined
        }
      >
        <option value="">Whole board or section</option>
        {positions.data?.map((p) => (
          <option key={p.id} value={p.id}>
            {p.designation}
          </option>
        ))}
      </SelectField>
      <SelectField label="Section (optional)" {...section.field} error={e("sectionId")}>
        <option value="">No section</option>
        {options.sections
          .filter((s) => s.boardId === boardId)
          .map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
      </SelectField>
      <SelectField label="Category" {...register("category")} error={e("category")} required>
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
        {...register("title")}
        required
        maxLength={MAX.title}
        error={e("title")}
        placeholder="e.g. Arc track on the base between poles B and C"
      />
      <TextArea
        className="md:col-span-2"
        label="Details (optional)"
        {...register("description")}
        maxLength={MAX.description}
        error={e("description")}
      />
      <fieldset className="md:col-span-2">
        <legend className="text-sm font-semibold text-mist">
          Severity{" "}
          {e("severity") && (
            <span role="alert" className="text-flare-300">
              — {e("severity")}
            </span>
          )}
        </legend>
        <div className="mt-1 grid gap-2 sm:grid-cols-2">
          {DEFECT_SEVERITIES.map((s) => (
            <label
              key={s}
              className="flex min-h-11 cursor-pointer gap-3 rounded-md bg-hull-900 p-3 ring-1 ring-hull-600 has-[:checked]:ring-2 has-[:checked]:ring-brass-400"
            >
              <input type="radio" {...register("severity")} value={s} className="mt-1 h-5 w-5 accent-brass-400" />
              <span>
                <span className="block font-semibold">{DEFECT_SEVERITY_LABELS[s]}</span>
                <span className="block text-sm text-mist">{DEFECT_SEVERITY_DEFINITIONS[s]}</span>
              </span>
            </label>
          ))}
        </div>
      </fieldset>
      <label className="flex min-h-11 items-start gap-3 rounded-md bg-hull-900 p-3 ring-1 ring-flare-400/60">
        <input type="checkbox" {...register("safetyCritical")} className="mt-1 h-5 w-5 accent-brass-400" />
        <span>
          <span className="block font-semibold">⚡ Safety-critical</span>
          <span className="block text-sm text-mist">
            Could cause shock or arc flash, or a fault to the hull or to earth.
          </span>
        </span>
      </label>
      <label className="flex min-h-11 items-start gap-3 rounded-md bg-hull-900 p-3 ring-1 ring-brass-400/60">
        <input type="checkbox" {...register("blocksEnergisation")} className="mt-1 h-5 w-5 accent-brass-400" />
        <span>
          <span className="block font-semibold">■ Blocks energising its section</span>
          <span className="block text-sm text-mist">
            The section must not be brought back until this is dealt with.
          </span>
        </span>
      </label>
      <TextField
        label="Estimated effort (hours)"
        {...register("effortHours")}
        type="number"
        min={0}
        step={0.5}
        inputMode="decimal"
        error={e("effortHours")}
        hint="Leave blank if unknown: it counts as a working day."
      />
      <MoneyField label="Estimated cost" {...register("costEstimate")} error={e("costEstimate")} />
      <TextField
        label="Parts needed (optional)"
        {...register("partsNeeded")}
        maxLength={MAX.partsNeeded}
        error={e("partsNeeded")}
      />
      <SelectField label="Parts" {...register("partsState")} error={e("partsState")}>
        {PARTS_STATES.map((p) => (
          <option key={p} value={p}>
            {PARTS_STATE_LABELS[p]}
          </option>
        ))}
      </SelectField>
      {canManage && (
        <>
          <SelectField label="Assign to (optional)" {...register("assigneeId")} error={e("assigneeId")}>
            <option value="">Nobody yet</option>
            {repairCrew(options).map((c) => (
              <option key={c.id} value={c.id}>
                {memberLabel(c)}
              </option>
            ))}
          </SelectField>
          <TextField label="Due on (optional)" {...register("dueOn")} type="date" error={e("dueOn")} />
        </>
      )}
      <div className="md:col-span-2">
        <Button type="submit" disabled={formState.isSubmitting || !boardId}>
          {formState.isSubmitting ? "Raising…" : "Raise the defect"}
        </Button>
      </div>
    </form>
  );
}

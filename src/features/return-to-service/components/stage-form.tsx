import { useMemo, useState } from "react";
import { useController, type FieldErrors } from "react-hook-form";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { SUPPLIES, SUPPLY_LABELS, VOLTAGE_STEPS, VOLTAGE_STEP_LABELS } from "../../../domain/return-to-service";
import { ApiError } from "../../../lib/api-client";
import { blankAsNull, fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import {
  createStageBody,
  patchStageBody,
  type CreateStageBody,
  type PatchStageBody,
  type RtsBoardView,
  type RtsStage,
} from "../../../schemas/return-to-service";
import { useRtsAction } from "../api";

/** The designations typed (space, comma or semicolon between them). */
const designationsOf = (text: string) => text.split(/[\s,;]+/).filter(Boolean);
const sameDesignation = (a: string, b: string) => a.toLowerCase() === b.toLowerCase();

/**
 * The form's text → the request body; createStageBody or, for an edit, patchStageBody (the
 * server's own schemas) validates it. While a stage is live its scope, supply, protection and
 * voltage are not sent: they stay as energised.
 */
const stageForm = (view: RtsBoardView, stage: RtsStage | undefined) => {
  const live = stage?.status === "energised";
  const target: z.ZodType<CreateStageBody | PatchStageBody, unknown> = stage ? patchStageBody : createStageBody;
  return z
    .object({
      name: z.string(),
      sectionIds: z.array(z.string()),
      positions: z.string(),
      supply: z.string(),
      protectionDevice: z.string(),
      protectionRatingA: numberText,
      protectionLimitA: numberText,
      voltageStep: z.string(),
      stepVolts: numberText,
      qualifiedPersonId: blankAsNull,
      dependsOnId: blankAsNull,
      watchHours: numberText,
      checkEveryHours: numberText,
      notes: z.string(),
    })
    .transform(({ positions, ...v }): unknown => {
      const positionIds = designationsOf(positions).flatMap((d) =>
        view.positions.filter((p) => sameDesignation(p.designation, d)).map((p) => p.id),
      );
      const plan = {
        name: v.name,
        qualifiedPersonId: v.qualifiedPersonId,
        dependsOnId: v.dependsOnId,
        watchHours: v.watchHours,
        checkEveryHours: v.checkEveryHours,
        notes: v.notes,
      };
      const scope = {
        sectionIds: v.sectionIds,
        positionIds,
        supply: v.supply,
        protectionDevice: v.protectionDevice,
        protectionRatingA: v.protectionRatingA,
        protectionLimitA: v.protectionLimitA,
        voltageStep: v.voltageStep,
        stepVolts: v.stepVolts,
      };
      return stage ? { ...plan, ...(live ? {} : scope), version: stage.version } : { ...plan, ...scope };
    })
    .pipe(target);
};

/**
 * The curator's form for a stage: what it brings back, the supply, the protection in front of
 * it and its limit, the voltage step, the qualified person, what it depends on and the watch.
 * New stages take their hold points from the site's template. While a stage is live its scope,
 * supply, protection and voltage stay as energised (the server refuses a change with 409).
 */
export function StageForm({
  siteId,
  view,
  stage,
  onDone,
}: {
  siteId: string;
  view: RtsBoardView;
  /** Absent: a new stage. */
  stage?: RtsStage;
  onDone: () => void;
}) {
  const act = useRtsAction(siteId);
  const schema = useMemo(() => stageForm(view, stage), [view, stage]);
  const form = useSchemaForm(schema, {
    name: stage?.name ?? "",
    sectionIds: stage?.sections.map((s) => s.id) ?? [],
    positions: stage?.positions.map((p) => p.designation).join(" ") ?? "",
    supply: stage?.supply ?? "temporary_fused",
    protectionDevice: stage?.protectionDevice ?? "Fused disconnect",
    protectionRatingA: stage ? String(stage.protectionRatingA ?? "") : "20",
    protectionLimitA: stage ? String(stage.protectionLimitA ?? "") : "30",
    voltageStep: stage?.voltageStep ?? "full",
    stepVolts: stage ? String(stage.stepVolts ?? "") : String(view.board.nominalVolts),
    qualifiedPersonId: stage ? (stage.qualifiedPerson?.userId ?? "") : "",
    dependsOnId: stage?.dependsOnId ?? "",
    watchHours: String(stage?.watchHours ?? 24),
    checkEveryHours: String(stage?.checkEveryHours ?? 4),
    notes: stage?.notes ?? "",
  });
  const { register, control, formState } = form;
  const errors = formState.errors;
  const e = (name: Parameters<typeof register>[0]) => fieldError(errors, name);
  const sections = useController({ control, name: "sectionIds" });
  const live = stage?.status === "energised";
  const unknown = designationsOf(form.watch("positions")).filter(
    (d) => !view.positions.some((p) => sameDesignation(p.designation, d)),
  );
  // A stage may depend only on one that comes before it in the plan.
  const before = stage ? view.stages.filter((s) => s.sortOrder < stage.sortOrder) : view.stages;
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync(
        stage
          ? { method: "PATCH", path: `/return-to-service/stages/${stage.id}`, body }
          : { method: "POST", path: `/boards/${view.board.id}/return-to-service/stages`, body },
      )
      .then(onDone, (err: unknown) =>
        showSaveError(form, err, {
          explain: (m) =>
            err instanceof ApiError && err.status === 409 ? `${m} Reload the stage to see it as it is now.` : m,
        }),
      ),
  );
  const message = formMessage(errors);
  // What the stage brings back: the server names the sections when neither is given.
  const scopeError = e("sectionIds") ?? fieldError(errors as FieldErrors, "positionIds");
  const label = stage ? `Edit stage ${stage.name}` : "New stage";
  return (
    <form
      className="space-y-3 rounded-lg bg-hull-800 p-4 ring-1 ring-hull-600"
      onSubmit={(ev) => void submit(ev)}
      noValidate
      aria-label={label}
    >
      <h3 className="text-lg font-bold">{stage ? `Edit “${stage.name}”` : "New stage"}</h3>
      {!stage && (
        <p className="text-sm text-mist">Its hold points are copied from the site's template; edit them afterwards.</p>
      )}
      {live && (
        <p className="text-sm text-brass-300">
          The stage is live: what it brings back, its supply, protection and voltage stay as energised. De-energise and
          start a new attempt to change them.
        </p>
      )}
      <TextField label="Stage name" {...register("name")} required error={e("name")} />
      <fieldset disabled={live}>
        <legend>Sections it brings back</legend>
        <div className="flex flex-wrap gap-x-4">
          {view.sections.map((s) => (
            <label key={s.id} className="inline-flex min-h-11 items-center gap-2">
              <input
                type="checkbox"
                name={sections.field.name}
                checked={sections.field.value.includes(s.id)}
                onBlur={sections.field.onBlur}
                onChange={(ev) =>
                  sections.field.onChange(
                    ev.target.checked
                      ? [...sections.field.value, s.id]
                      : sections.field.value.filter((x) => x !== s.id),
                  )
                }
              />
              {s.name}
            </label>
          ))}
        </div>
      </fieldset>
      <TextField
        label="And named circuits (designations, e.g. a bus tie or a feeder)"
        {...register("positions")}
        disabled={live}
        list="rts-designations"
        error={unknown.length > 0 ? `Not on this board: ${unknown.join(", ")}` : undefined}
      />
      <datalist id="rts-designations">
        {view.positions.map((p) => (
          <option key={p.id} value={p.designation}>
            {p.circuit}
          </option>
        ))}
      </datalist>
      {scopeError && (
        <p role="alert" className="text-sm text-rust-300">
          {scopeError}
        </p>
      )}
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-2">
        <SelectField label="Supply" {...register("supply")} disabled={live} error={e("supply")}>
          {SUPPLIES.map((s) => (
            <option key={s} value={s}>
              {SUPPLY_LABELS[s]}
            </option>
          ))}
        </SelectField>
        <TextField
          label="Protection in front (device)"
          {...register("protectionDevice")}
          disabled={live}
          error={e("protectionDevice")}
        />
        <TextField
          label="Protection rating (A)"
          {...register("protectionRatingA")}
          inputMode="decimal"
          disabled={live}
          error={e("protectionRatingA")}
        />
        <TextField
          label="Protection limit for this stage (A)"
          {...register("protectionLimitA")}
          inputMode="decimal"
          disabled={live}
          error={e("protectionLimitA")}
        />
        <SelectField label="Voltage step" {...register("voltageStep")} disabled={live} error={e("voltageStep")}>
          {VOLTAGE_STEPS.map((s) => (
            <option key={s} value={s}>
              {VOLTAGE_STEP_LABELS[s]}
            </option>
          ))}
        </SelectField>
        <TextField
          label="Volts at this step"
          {...register("stepVolts")}
          inputMode="decimal"
          disabled={live}
          error={e("stepVolts")}
        />
        <SelectField label="Qualified person" {...register("qualifiedPersonId")} error={e("qualifiedPersonId")}>
          <option value="">— none yet —</option>
          {view.qualifiedPersons.map((q) => (
            <option key={q.userId} value={q.userId}>
              {q.name}
              {q.suspended ? " (account suspended)" : q.current ? "" : " (qualification expired)"}
            </option>
          ))}
        </SelectField>
        <SelectField label="Depends on" {...register("dependsOnId")} error={e("dependsOnId")}>
          <option value="">— nothing —</option>
          {before.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
        </SelectField>
        <TextField label="Watch period (h)" {...register("watchHours")} inputMode="decimal" error={e("watchHours")} />
        <TextField
          label="A watch check every (h)"
          {...register("checkEveryHours")}
          inputMode="decimal"
          error={e("checkEveryHours")}
        />
      </div>
      <TextArea label="Notes" {...register("notes")} error={e("notes")} />
      {stage?.status === "planned" && signedCount(stage) > 0 && (
        <p className="rounded-md bg-brass-700/20 p-2 text-sm ring-1 ring-brass-400">
          {signedCount(stage) === 1 ? "1 hold point is" : `${signedCount(stage)} hold points are`} signed or released
          for this stage. Changing its sections, positions, supply, protection or voltage strikes them out, with the
          reason: they are checked and signed again. Its name, person, watch and notes do not.
        </p>
      )}
      {message && (
        <p role="alert" className="text-sm text-rust-300">
          {message}
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={formState.isSubmitting || unknown.length > 0}>
          {stage ? "Save the stage" : "Add the stage"}
        </Button>
        <Button tone="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/** Entries in force on the stage's hold points (signed or released, not struck out or superseded). */
const signedCount = (stage: RtsStage) =>
  stage.steps.filter((st) => st.entries.some((x) => !x.supersededBy && x.kind !== "struck")).length;

/** "Add a stage" for the curator; the form opens in place. */
export function NewStageForm({ siteId, view }: { siteId: string; view: RtsBoardView }) {
  const [open, setOpen] = useState(false);
  if (!open) return <Button onClick={() => setOpen(true)}>Add a stage</Button>;
  return <StageForm siteId={siteId} view={view} onDone={() => setOpen(false)} />;
}

import { useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { EARTHING, EARTHING_LABELS } from "../../../domain/vocab";
import { fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { createBoardBody } from "../../../schemas/inventory";
import { useCreateBoard, useUpdateBoard } from "../api";
import type { Board } from "../contract";
import { ConflictNotice, conflictRecord } from "./conflict-notice";

const LABELS: Record<string, string> = {
  name: "Name",
  location: "Location",
  nominalVolts: "Nominal voltage (V)",
  phases: "Phases",
  frequencyHz: "Frequency (Hz)",
  earthing: "System earthing",
  yearBuilt: "Year built",
  drawingRef: "Drawing reference",
  faceHeightMm: "Face height (mm)",
  waterLineMm: "Water line on the face (mm from the bottom)",
  gridRows: "Grid rows",
  gridCols: "Grid columns",
  notes: "Notes",
};

/**
 * The form's text → the request body; createBoardBody (the server's own schema) validates it.
 * An edit sends every field, so the same schema holds for it; the version is the record's, added on sending.
 */
const boardForm = z
  .object({
    name: z.string(),
    location: z.string(),
    drawingRef: z.string(),
    notes: z.string(),
    nominalVolts: numberText,
    frequencyHz: numberText,
    yearBuilt: numberText,
    faceHeightMm: numberText,
    waterLineMm: numberText,
    gridRows: numberText,
    gridCols: numberText,
    phases: numberText,
    earthing: z.string(),
  })
  .transform((v) => v as z.input<typeof createBoardBody>)
  .pipe(createBoardBody);
type Draft = z.input<typeof boardForm>;
const s = (v: number | null | undefined) => (v == null ? "" : String(v));
const toDraft = (b?: Board | null): Draft => ({
  name: b?.name ?? "",
  location: b?.location ?? "",
  drawingRef: b?.drawingRef ?? "",
  notes: b?.notes ?? "",
  nominalVolts: s(b?.nominalVolts ?? 450),
  frequencyHz: s(b?.frequencyHz ?? 60),
  yearBuilt: s(b?.yearBuilt),
  faceHeightMm: s(b?.faceHeightMm),
  waterLineMm: s(b?.waterLineMm),
  gridRows: s(b?.gridRows ?? 6),
  gridCols: s(b?.gridCols ?? 12),
  phases: String(b?.phases ?? 3),
  earthing: b?.earthing ?? "ungrounded",
});

/** The board's own facts and its elevation grid; a new board when `board` is absent. */
export function BoardForm({ siteId, board, onSaved }: { siteId: string; board?: Board; onSaved?: (b: Board) => void }) {
  // The record the form started from (its version goes with the save): not an input.
  const [base, setBase] = useState<Board | undefined>(board);
  const form = useSchemaForm(boardForm, toDraft(board));
  const { register, formState } = form;
  const errors = formState.errors;
  const e = (name: keyof Draft) => fieldError(errors, name);
  const create = useCreateBoard(siteId);
  const update = useUpdateBoard(siteId, board?.id ?? "");
  const m = base ? update : create;
  const conflict = conflictRecord<Board>(update.error);
  // A stale version shows as the conflict notice below, not as a message.
  const message = conflict ? null : formMessage(errors, "above");
  const done = (b: Board) => {
    setBase(b);
    form.reset(toDraft(b));
    onSaved?.(b);
  };

  const save = (version?: number) =>
    form.handleSubmit((body) =>
      (base ? update.mutateAsync({ ...body, version: version ?? base.version }) : create.mutateAsync(body)).then(
        done,
        (err: unknown) => {
          if (!conflictRecord(err)) showSaveError(form, err);
        },
      ),
    )();
  return (
    <form
      onSubmit={(ev) => {
        ev.preventDefault();
        void save();
      }}
      noValidate
      aria-label="Board"
      className="grid gap-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 sm:grid-cols-2 lg:grid-cols-4"
    >
      <TextField className="sm:col-span-2" label={LABELS.name} required {...register("name")} error={e("name")} />
      <TextField className="sm:col-span-2" label={LABELS.location} {...register("location")} error={e("location")} />
      <TextField
        label={LABELS.nominalVolts}
        inputMode="numeric"
        {...register("nominalVolts")}
        error={e("nominalVolts")}
      />
      <SelectField label={LABELS.phases} {...register("phases")} error={e("phases")}>
        <option value="3">3-phase</option>
        <option value="1">1-phase</option>
      </SelectField>
      <TextField label={LABELS.frequencyHz} inputMode="numeric" {...register("frequencyHz")} error={e("frequencyHz")} />
      <SelectField label={LABELS.earthing} {...register("earthing")} error={e("earthing")}>
        {EARTHING.map((x) => (
          <option key={x} value={x}>
            {EARTHING_LABELS[x]}
          </option>
        ))}
      </SelectField>
      <TextField label={LABELS.yearBuilt} inputMode="numeric" {...register("yearBuilt")} error={e("yearBuilt")} />
      <TextField label={LABELS.drawingRef} {...register("drawingRef")} error={e("drawingRef")} />
      <TextField
        label={LABELS.faceHeightMm}
        inputMode="numeric"
        {...register("faceHeightMm")}
        error={e("faceHeightMm")}
      />
      <TextField
        label={LABELS.waterLineMm}
        inputMode="numeric"
        {...register("waterLineMm")}
        error={e("waterLineMm")}
        hint="The flood mark, measured up from the bottom of the face."
      />
      <TextField label={LABELS.gridRows} inputMode="numeric" {...register("gridRows")} error={e("gridRows")} />
      <TextField label={LABELS.gridCols} inputMode="numeric" {...register("gridCols")} error={e("gridCols")} />
      <TextArea className="sm:col-span-2" label={LABELS.notes} {...register("notes")} error={e("notes")} />
      {conflict && base && (
        <div className="sm:col-span-2 lg:col-span-4">
          <ConflictNotice
            base={base}
            current={conflict}
            labels={LABELS}
            busy={update.isPending}
            onUseTheirs={() => {
              setBase(conflict);
              form.reset(toDraft(conflict));
              update.reset();
            }}
            onApplyMine={() => {
              setBase(conflict);
              void save(conflict.version);
            }}
          />
        </div>
      )}
      {message && (
        <p role="alert" className="text-sm text-flare-300 sm:col-span-2 lg:col-span-4">
          {message}
        </p>
      )}
      {m.isSuccess && (
        <p role="status" className="text-sm text-kelp-300 sm:col-span-2 lg:col-span-4">
          Board saved.
        </p>
      )}
      <div className="sm:col-span-2 lg:col-span-4">
        <Button type="submit" disabled={m.isPending}>
          {base ? "Save board" : "Create board"}
        </Button>
      </div>
    </form>
  );
}

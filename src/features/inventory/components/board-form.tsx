import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { EARTHING, EARTHING_LABELS, type Earthing } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { CreateBoardBody } from "../../../schemas/inventory";
import { useCreateBoard, useUpdateBoard } from "../api";
import type { Board } from "../contract";
import { ConflictNotice, conflictRecord } from "./conflict-notice";

type TextKey = "name" | "location" | "drawingRef" | "notes";
type NumberKey =
  "nominalVolts" | "frequencyHz" | "yearBuilt" | "faceHeightMm" | "waterLineMm" | "gridRows" | "gridCols";
type Draft = Record<TextKey | NumberKey, string> & { phases: "1" | "3"; earthing: Earthing };
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
  phases: String(b?.phases ?? 3) as "1" | "3",
  earthing: b?.earthing ?? "ungrounded",
});
function toBody(d: Draft): CreateBoardBody {
  const n = (v: string) => (v.trim() === "" ? null : Number(v));
  return {
    name: d.name,
    location: d.location,
    drawingRef: d.drawingRef,
    notes: d.notes,
    nominalVolts: Number(d.nominalVolts),
    frequencyHz: Number(d.frequencyHz),
    phases: Number(d.phases) as 1 | 3,
    earthing: d.earthing,
    yearBuilt: n(d.yearBuilt),
    faceHeightMm: n(d.faceHeightMm),
    waterLineMm: n(d.waterLineMm),
    gridRows: Number(d.gridRows),
    gridCols: Number(d.gridCols),
  };
}

/** The board's own facts and its elevation grid; a new board when `board` is absent. */
export function BoardForm({ siteId, board, onSaved }: { siteId: string; board?: Board; onSaved?: (b: Board) => void }) {
  const [base, setBase] = useState<Board | undefined>(board);
  const [d, setD] = useState<Draft>(toDraft(board));
  const create = useCreateBoard(siteId);
  const update = useUpdateBoard(siteId, board?.id ?? "");
  const m = base ? update : create;
  const conflict = conflictRecord<Board>(update.error);
  const fields = m.error instanceof ApiError ? m.error.fields : {};
  const bind = (k: keyof Draft) => ({
    value: d[k],
    onChange: (e: { target: { value: string } }) => setD({ ...d, [k]: e.target.value }),
    error: fields[k],
  });
  const done = (b: Board) => {
    setBase(b);
    setD(toDraft(b));
    onSaved?.(b);
  };

  function save(version?: number) {
    if (base) update.mutate({ ...toBody(d), version: version ?? base.version }, { onSuccess: done });
    else create.mutate(toBody(d), { onSuccess: done });
  }
  const submit = (e: FormEvent) => {
    e.preventDefault();
    save();
  };
  return (
    <form
      onSubmit={submit}
      aria-label="Board"
      className="grid gap-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 sm:grid-cols-2 lg:grid-cols-4"
    >
      <TextField className="sm:col-span-2" label={LABELS.name} required {...bind("name")} />
      <TextField className="sm:col-span-2" label={LABELS.location} {...bind("location")} />
      <TextField label={LABELS.nominalVolts} inputMode="numeric" {...bind("nominalVolts")} />
      <SelectField label={LABELS.phases} {...bind("phases")}>
        <option value="3">3-phase</option>
        <option value="1">1-phase</option>
      </SelectField>
      <TextField label={LABELS.frequencyHz} inputMode="numeric" {...bind("frequencyHz")} />
      <SelectField label={LABELS.earthing} {...bind("earthing")}>
        {EARTHING.map((x) => (
          <option key={x} value={x}>
            {EARTHING_LABELS[x]}
          </option>
        ))}
      </SelectField>
      <TextField label={LABELS.yearBuilt} inputMode="numeric" {...bind("yearBuilt")} />
      <TextField label={LABELS.drawingRef} {...bind("drawingRef")} />
      <TextField label={LABELS.faceHeightMm} inputMode="numeric" {...bind("faceHeightMm")} />
      <TextField
        label={LABELS.waterLineMm}
        inputMode="numeric"
        {...bind("waterLineMm")}
        hint="The flood mark, measured up from the bottom of the face."
      />
      <TextField label={LABELS.gridRows} inputMode="numeric" {...bind("gridRows")} />
      <TextField label={LABELS.gridCols} inputMode="numeric" {...bind("gridCols")} />
      <TextArea className="sm:col-span-2" label={LABELS.notes} {...bind("notes")} />
      {conflict && base && (
        <div className="sm:col-span-2 lg:col-span-4">
          <ConflictNotice
            base={base}
            current={conflict}
            labels={LABELS}
            busy={update.isPending}
            onUseTheirs={() => {
              setBase(conflict);
              setD(toDraft(conflict));
              update.reset();
            }}
            onApplyMine={() => {
              setBase(conflict);
              save(conflict.version);
            }}
          />
        </div>
      )}
      {m.isError && !conflict && (
        <p role="alert" className="text-sm text-flare-300 sm:col-span-2 lg:col-span-4">
          {m.error.message}
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

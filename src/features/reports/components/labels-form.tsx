import { useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField } from "../../../components/field";
import { ErrorPanel } from "../../../components/status";
import { LABEL_SHEETS, labelSheet, type LabelSheetId } from "../../../domain/label-sheets";
import { fieldError, formMessage, useSchemaForm } from "../../../lib/form";
import { labelsQuery, type LabelsQuery } from "../../../schemas/reports";
import { fetchPdf, labelsUrl, useAssignTags } from "../api";
import { SaveLink } from "./save-link";

export interface LabelPosition {
  id: string;
  designation: string;
  sectionId: string | null;
  tagNumber: string | null;
  hasComponent: boolean;
}

interface Props {
  siteId: string;
  boards: Array<{ id: string; name: string }>;
  boardId: string;
  onBoardChange: (id: string) => void;
  sections: Array<{ id: string; name: string }>;
  positions: LabelPosition[];
  canAssign: boolean;
  /** After tags were given to positions of `boardId`. */
  onTagsAssigned: (boardId: string) => void;
}

type Which = "board" | "section" | "untagged" | "one";
interface Scope {
  boardId: string;
  firstSection: string;
  untagged: string[];
}

/**
 * The form's choices → the labels query; labelsQuery (the server's own schema) validates it. The
 * untagged positions are asked for by id: saving tags them first, then prints the labels they got.
 */
const labelsForm = ({ boardId, firstSection, untagged }: Scope) =>
  z
    .object({
      which: z.string(),
      sectionId: z.string(),
      positionId: z.string(),
      sheet: z.string(),
      start: z.number(),
      copies: z.string(),
    })
    .transform(({ which, sectionId, positionId, ...v }) => {
      const scope =
        which === "untagged"
          ? { positionIds: untagged }
          : which === "section"
            ? { sectionId: sectionId || firstSection }
            : which === "one"
              ? { positionIds: [positionId] }
              : { boardId };
      return { ...scope, ...v } as z.input<typeof labelsQuery>;
    })
    .pipe(labelsQuery);

/** Tag labels: what to print, on which stock, from which label of a part-used sheet. */
export function LabelsForm({
  siteId,
  boards,
  boardId,
  onBoardChange,
  sections,
  positions,
  canAssign,
  onTagsAssigned,
}: Props) {
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<{ blob: Blob; filename: string; count: number } | null>(null);
  const [error, setError] = useState<unknown>(null);
  const assign = useAssignTags(siteId);

  const tagged = positions.filter((p) => p.tagNumber);
  const untagged = positions.filter((p) => p.hasComponent && !p.tagNumber);
  // Default to the first section that has anything to print, not simply the first section.
  const firstSection = (sections.find((s) => tagged.some((p) => p.sectionId === s.id)) ?? sections[0])?.id ?? "";
  const form = useSchemaForm(labelsForm({ boardId, firstSection, untagged: untagged.map((p) => p.id) }), {
    which: "board",
    sectionId: "",
    positionId: "",
    sheet: "a4-21",
    start: 1,
    copies: "1",
  });
  const { register, formState, setValue } = form;
  const e = (name: "which" | "sectionId" | "positionId" | "sheet" | "start" | "copies") =>
    fieldError(formState.errors, name);
  const [which, sectionId, positionId, sheetId, start, copyText] = form.watch([
    "which",
    "sectionId",
    "positionId",
    "sheet",
    "start",
    "copies",
  ]) as [Which, string, string, LabelSheetId, number, string];
  const copies = Number(copyText);
  const secId = sectionId || firstSection;
  const sheet = labelSheet(sheetId);
  const perSheet = sheet.cols * sheet.rows;
  const thermal = perSheet === 1;
  const count =
    which === "board"
      ? tagged.length
      : which === "section"
        ? tagged.filter((p) => p.sectionId === secId).length
        : which === "untagged"
          ? untagged.length
          : positions.find((p) => p.id === positionId)?.tagNumber
            ? 1
            : 0;

  async function print(query: LabelsQuery) {
    setBusy(true);
    setError(null);
    setResult(null);
    try {
      if (which === "untagged") {
        const r = await assign.mutateAsync(query.positionIds ?? []);
        onTagsAssigned(boardId);
        query = { ...query, positionIds: r.assigned.map((a) => a.positionId) };
        if (!r.assigned.length) throw new Error("Every chosen position is already tagged.");
      }
      const blob = await fetchPdf(labelsUrl(siteId, { ...query, start: thermal ? 1 : query.start }), () => {});
      setResult({ blob, filename: `tag-labels-${query.sheet}.pdf`, count: count * query.copies });
    } catch (e) {
      setError(e);
    } finally {
      setBusy(false);
    }
  }
  const message = formMessage(formState.errors);

  return (
    <form
      className="space-y-4"
      onSubmit={(ev) => void form.handleSubmit((query) => !busy && print(query))(ev)}
      noValidate
      aria-labelledby="labels-form-title"
    >
      <h2 id="labels-form-title" className="text-xl font-bold">
        Tag labels
      </h2>
      <p className="text-sm text-mist">
        One label for each removed part and one for its bag: tag number, board, position, kind and a code that opens the
        position when scanned.
      </p>
      {message && (
        <p role="alert" className="text-flare-300">
          {message}
        </p>
      )}
      <div className="grid gap-3 sm:grid-cols-2">
        <SelectField
          label="Board"
          value={boardId}
          onChange={(e) => {
            onBoardChange(e.target.value);
            setResult(null);
          }}
        >
          {boards.map((b) => (
            <option key={b.id} value={b.id}>
              {b.name}
            </option>
          ))}
        </SelectField>
        <SelectField
          label="Print labels for"
          {...register("which", { onChange: () => setResult(null) })}
          error={e("which")}
        >
          <option value="board">Every tagged position of the board ({tagged.length})</option>
          <option value="section">One section</option>
          {canAssign && <option value="untagged">Positions not yet tagged: tag them now ({untagged.length})</option>}
          <option value="one">One position</option>
        </SelectField>
        {which === "section" && (
          <SelectField label="Section" {...register("sectionId")} value={secId} error={e("sectionId")}>
            {sections.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name} ({tagged.filter((p) => p.sectionId === s.id).length} tagged)
              </option>
            ))}
          </SelectField>
        )}
        {which === "one" && (
          <SelectField label="Position" {...register("positionId")} error={e("positionId")}>
            <option value="">Choose a tagged position</option>
            {tagged.map((p) => (
              <option key={p.id} value={p.id}>
                {p.designation} · {p.tagNumber}
              </option>
            ))}
          </SelectField>
        )}
        <SelectField
          label="Label stock"
          {...register("sheet", { onChange: () => setValue("start", 1) })}
          error={e("sheet")}
          hint={sheet.source}
        >
          {LABEL_SHEETS.map((s) => (
            <option key={s.id} value={s.id}>
              {s.label}
            </option>
          ))}
        </SelectField>
        <SelectField label="Copies of each" {...register("copies")} error={e("copies")}>
          <option value="1">One</option>
          <option value="2">Two: part and bag</option>
        </SelectField>
      </div>
      {!thermal && (
        <fieldset>
          <legend className="text-sm font-semibold text-mist">
            Start at label {start} (labels already used on this sheet are skipped)
          </legend>
          {e("start") && (
            <p role="alert" className="text-sm text-flare-300">
              {e("start")}
            </p>
          )}
          <div
            className="mt-2 inline-grid gap-1 rounded-md bg-chalk p-2"
            style={{ gridTemplateColumns: `repeat(${sheet.cols}, minmax(2.75rem, 1fr))` }}
          >
            {Array.from({ length: perSheet }, (_, i) => i + 1).map((n) => (
              <button
                key={n}
                type="button"
                onClick={() => setValue("start", n)}
                aria-pressed={n === start}
                aria-label={`Start at label ${n}`}
                className={`min-h-11 rounded-sm text-sm font-semibold ${n < start ? "bg-hull-500 text-chalk line-through" : n === start ? "bg-brass-400 text-hull-950 ring-2 ring-hull-950" : "bg-white text-hull-900 ring-1 ring-hull-500"}`}
              >
                {n}
              </button>
            ))}
          </div>
        </fieldset>
      )}
      <Button type="submit" disabled={busy || count === 0}>
        {busy ? "Making the labels…" : `Make ${count * copies} label${count * copies === 1 ? "" : "s"}`}
      </Button>
      {error !== null && <ErrorPanel error={error} />}
      {result && <SaveLink blob={result.blob} filename={result.filename} />}
      <p className="text-xs text-fog">Print at 100 % (actual size), not "fit to page", so the labels meet the sheet.</p>
    </form>
  );
}

import { useState } from "react";
import { Button } from "../../../components/button";
import { SelectField } from "../../../components/field";
import { ErrorPanel } from "../../../components/status";
import { LABEL_SHEETS, labelSheet, type LabelSheetId } from "../../../domain/label-sheets";
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
  onTagsAssigned: () => void;
}

type Which = "board" | "section" | "untagged" | "one";

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
  const [which, setWhich] = useState<Which>("board");
  const [sectionId, setSectionId] = useState("");
  const [positionId, setPositionId] = useState("");
  const [sheetId, setSheetId] = useState<LabelSheetId>("a4-21");
  const [start, setStart] = useState(1);
  const [copies, setCopies] = useState(1);
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<{ blob: Blob; filename: string; count: number } | null>(null);
  const [error, setError] = useState<unknown>(null);
  const assign = useAssignTags(siteId);

  const sheet = labelSheet(sheetId);
  const perSheet = sheet.cols * sheet.rows;
  const thermal = perSheet === 1;
  const tagged = positions.filter((p) => p.tagNumber);
  const untagged = positions.filter((p) => p.hasComponent && !p.tagNumber);
  // Default to the first section that has anything to print, not simply the first section.
  const secId = sectionId || (sections.find((s) => tagged.some((p) => p.sectionId === s.id)) ?? sections[0])?.id || "";
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

  async function print() {
    setBusy(true);
    setError(null);
    setResult(null);
    try {
      let scope: { boardId?: string; sectionId?: string; positionIds?: string[] };
      if (which === "untagged") {
        const r = await assign.mutateAsync(untagged.map((p) => p.id));
        onTagsAssigned();
        scope = { positionIds: r.assigned.map((a) => a.positionId) };
        if (!r.assigned.length) throw new Error("Every chosen position is already tagged.");
      } else if (which === "section") scope = { sectionId: secId };
      else if (which === "one") scope = { positionIds: [positionId] };
      else scope = { boardId };
      const blob = await fetchPdf(
        labelsUrl(siteId, { ...scope, sheet: sheetId, start: thermal ? 1 : start, copies }),
        () => {},
      );
      setResult({ blob, filename: `tag-labels-${sheetId}.pdf`, count: count * copies });
    } catch (e) {
      setError(e);
    } finally {
      setBusy(false);
    }
  }

  return (
    <form
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        if (!busy) void print();
      }}
      aria-labelledby="labels-form-title"
    >
      <h2 id="labels-form-title" className="text-xl font-bold">
        Tag labels
      </h2>
      <p className="text-sm text-mist">
        One label for each removed part and one for its bag: tag number, board, position, kind and a code that opens the
        position when scanned.
      </p>
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
          value={which}
          onChange={(e) => {
            setWhich(e.target.value as Which);
            setResult(null);
          }}
        >
          <option value="board">Every tagged position of the board ({tagged.length})</option>
          <option value="section">One section</option>
          {canAssign && <option value="untagged">Positions not yet tagged: tag them now ({untagged.length})</option>}
          <option value="one">One position</option>
        </SelectField>
        {which === "section" && (
          <SelectField label="Section" value={secId} onChange={(e) => setSectionId(e.target.value)}>
            {sections.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name} ({tagged.filter((p) => p.sectionId === s.id).length} tagged)
              </option>
            ))}
          </SelectField>
        )}
        {which === "one" && (
          <SelectField label="Position" value={positionId} onChange={(e) => setPositionId(e.target.value)}>
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
          value={sheetId}
          onChange={(e) => {
            setSheetId(e.target.value as LabelSheetId);
            setStart(1);
          }}
          hint={sheet.source}
        >
          {LABEL_SHEETS.map((s) => (
            <option key={s.id} value={s.id}>
              {s.label}
            </option>
          ))}
        </SelectField>
        <SelectField label="Copies of each" value={String(copies)} onChange={(e) => setCopies(Number(e.target.value))}>
          <option value="1">One</option>
          <option value="2">Two: part and bag</option>
        </SelectField>
      </div>
      {!thermal && (
        <fieldset>
          <legend className="text-sm font-semibold text-mist">
            Start at label {start} (labels already used on this sheet are skipped)
          </legend>
          <div
            className="mt-2 inline-grid gap-1 rounded-md bg-chalk p-2"
            style={{ gridTemplateColumns: `repeat(${sheet.cols}, minmax(2.75rem, 1fr))` }}
          >
            {Array.from({ length: perSheet }, (_, i) => i + 1).map((n) => (
              <button
                key={n}
                type="button"
                onClick={() => setStart(n)}
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

import { useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { COMPONENT_KIND_LABELS, COMPONENT_KINDS } from "../../../domain/vocab";
import { blankAsNull, fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { createPositionBody } from "../../../schemas/inventory";
import { usePositionMutations } from "../api";
import type { Section, TileRow } from "../contract";
import { ConflictNotice, conflictRecord } from "./conflict-notice";

type P = Pick<
  TileRow,
  "id" | "designation" | "kind" | "gridRow" | "gridCol" | "rowSpan" | "colSpan" | "circuit" | "sectionId" | "version"
>;
const LABELS = {
  designation: "Designation",
  kind: "Kind",
  gridRow: "Row",
  gridCol: "Column",
  rowSpan: "Rows spanned",
  colSpan: "Columns spanned",
  circuit: "Circuit fed",
  sectionId: "Section",
};

/**
 * The form's text → the request body; createPositionBody (the server's own schema) validates it.
 * An edit sends every field, so the same schema holds for it; the version is the record's, added on sending.
 */
const positionForm = z
  .object({
    designation: z.string(),
    kind: z.string(),
    gridRow: numberText,
    gridCol: numberText,
    rowSpan: numberText,
    colSpan: numberText,
    circuit: z.string(),
    sectionId: blankAsNull,
  })
  .transform((v) => v as z.input<typeof createPositionBody>)
  .pipe(createPositionBody);
type Draft = z.input<typeof positionForm>;
const toDraft = (p?: P | null): Draft => ({
  designation: p?.designation ?? "",
  kind: p?.kind ?? "molded_case_breaker",
  gridRow: String(p?.gridRow ?? 1),
  gridCol: String(p?.gridCol ?? 1),
  rowSpan: String(p?.rowSpan ?? 1),
  colSpan: String(p?.colSpan ?? 1),
  circuit: p?.circuit ?? "",
  sectionId: p?.sectionId ?? "",
});

/** Edit one position (or add one when `position` is null): where it sits on the grid and what it feeds. */
export function PositionForm({
  siteId,
  boardId,
  position,
  sections,
  onDone,
}: {
  siteId: string;
  boardId: string;
  position: P | null;
  sections: Section[];
  onDone?: (deleted?: boolean) => void;
}) {
  // The record the form started from (its version goes with the save): not an input.
  const [base, setBase] = useState<P | null>(position);
  const form = useSchemaForm(positionForm, toDraft(position));
  const { register, formState } = form;
  const errors = formState.errors;
  const e = (name: keyof Draft) => fieldError(errors, name);
  const m = usePositionMutations(siteId, boardId);
  const active = base ? m.update : m.create;
  const conflict = conflictRecord<P>(m.update.error);
  // A stale version shows as the conflict notice below, not as a message.
  const message = conflict ? null : formMessage(errors, "above");

  const save = (version?: number) =>
    form.handleSubmit((body) => {
      const sent = base
        ? m.update.mutateAsync({ id: base.id, version: version ?? base.version, ...body }).then((r) => {
            setBase(r);
            onDone?.();
          })
        : m.create.mutateAsync(body).then(() => {
            form.setValue("designation", "");
            onDone?.();
          });
      return sent.catch((err: unknown) => {
        if (!conflictRecord(err)) showSaveError(form, err);
      });
    })();
  return (
    <form
      onSubmit={(ev) => {
        ev.preventDefault();
        void save();
      }}
      noValidate
      aria-label={base ? `Position ${base.designation}` : "Add one position"}
      className="grid grid-cols-2 gap-3"
    >
      <TextField
        label={LABELS.designation}
        className="[&_input]:font-mono"
        required
        {...register("designation")}
        error={e("designation")}
      />
      <SelectField label={LABELS.kind} {...register("kind")} error={e("kind")}>
        {COMPONENT_KINDS.map((k) => (
          <option key={k} value={k}>
            {COMPONENT_KIND_LABELS[k]}
          </option>
        ))}
      </SelectField>
      <TextField label={LABELS.gridRow} inputMode="numeric" {...register("gridRow")} error={e("gridRow")} />
      <TextField label={LABELS.gridCol} inputMode="numeric" {...register("gridCol")} error={e("gridCol")} />
      <TextField label={LABELS.rowSpan} inputMode="numeric" {...register("rowSpan")} error={e("rowSpan")} />
      <TextField label={LABELS.colSpan} inputMode="numeric" {...register("colSpan")} error={e("colSpan")} />
      <TextField label={LABELS.circuit} className="col-span-2" {...register("circuit")} error={e("circuit")} />
      <SelectField label={LABELS.sectionId} className="col-span-2" {...register("sectionId")} error={e("sectionId")}>
        <option value="">No section</option>
        {sections.map((s) => (
          <option key={s.id} value={s.id}>
            {s.name}
          </option>
        ))}
      </SelectField>
      {conflict && base && (
        <div className="col-span-2">
          <ConflictNotice
            base={base}
            current={conflict}
            labels={LABELS}
            busy={m.update.isPending}
            onUseTheirs={() => {
              setBase(conflict);
              form.reset(toDraft(conflict));
              m.update.reset();
            }}
            onApplyMine={() => {
              setBase(conflict);
              void save(conflict.version);
            }}
          />
        </div>
      )}
      {message && (
        <p role="alert" className="col-span-2 text-sm text-flare-300">
          {message}
        </p>
      )}
      {active.isSuccess && (
        <p role="status" className="col-span-2 text-sm text-kelp-300">
          Saved.
        </p>
      )}
      <div className="col-span-2 flex flex-wrap gap-2">
        <Button type="submit" disabled={active.isPending}>
          {base ? "Save position" : "Add position"}
        </Button>
        {base && (
          <Button
            tone="danger"
            onClick={() =>
              confirm(`Delete position ${base.designation} and its component's records?`) &&
              m.remove.mutate({ id: base.id, version: base.version }, { onSuccess: () => onDone?.(true) })
            }
          >
            Delete position
          </Button>
        )}
      </div>
      {m.remove.isError && (
        <p role="alert" className="col-span-2 text-sm text-flare-300">
          {m.remove.error.message}
        </p>
      )}
    </form>
  );
}

import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { COMPONENT_KIND_LABELS, COMPONENT_KINDS, type ComponentKind } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { CreatePositionBody } from "../../../schemas/inventory";
import { usePositionMutations } from "../api";
import type { Section, TileRow } from "../contract";
import { ConflictNotice, conflictRecord } from "./conflict-notice";

type P = Pick<
  TileRow,
  "id" | "designation" | "kind" | "gridRow" | "gridCol" | "rowSpan" | "colSpan" | "circuit" | "sectionId" | "version"
>;
interface Draft {
  designation: string;
  kind: ComponentKind;
  gridRow: string;
  gridCol: string;
  rowSpan: string;
  colSpan: string;
  circuit: string;
  sectionId: string;
}
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
const toBody = (d: Draft): CreatePositionBody => ({
  designation: d.designation,
  kind: d.kind,
  gridRow: Number(d.gridRow),
  gridCol: Number(d.gridCol),
  rowSpan: Number(d.rowSpan),
  colSpan: Number(d.colSpan),
  circuit: d.circuit,
  sectionId: d.sectionId || null,
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
  const [base, setBase] = useState<P | null>(position);
  const [d, setD] = useState<Draft>(toDraft(position));
  const m = usePositionMutations(siteId, boardId);
  const active = base ? m.update : m.create;
  const conflict = conflictRecord<P>(m.update.error);
  const fields = active.error instanceof ApiError ? active.error.fields : {};
  const bind = (k: keyof Draft) => ({
    value: d[k],
    onChange: (e: { target: { value: string } }) => setD({ ...d, [k]: e.target.value }),
    error: fields[k],
  });

  function save(version?: number) {
    if (base)
      m.update.mutate(
        { id: base.id, version: version ?? base.version, ...toBody(d) },
        {
          onSuccess: (r) => {
            setBase(r);
            onDone?.();
          },
        },
      );
    else
      m.create.mutate(toBody(d), {
        onSuccess: () => {
          setD({ ...d, designation: "" });
          onDone?.();
        },
      });
  }
  const submit = (e: FormEvent) => {
    e.preventDefault();
    save();
  };
  return (
    <form
      onSubmit={submit}
      aria-label={base ? `Position ${base.designation}` : "Add one position"}
      className="grid grid-cols-2 gap-3"
    >
      <TextField label={LABELS.designation} className="[&_input]:font-mono" required {...bind("designation")} />
      <SelectField label={LABELS.kind} {...bind("kind")}>
        {COMPONENT_KINDS.map((k) => (
          <option key={k} value={k}>
            {COMPONENT_KIND_LABELS[k]}
          </option>
        ))}
      </SelectField>
      <TextField label={LABELS.gridRow} inputMode="numeric" {...bind("gridRow")} />
      <TextField label={LABELS.gridCol} inputMode="numeric" {...bind("gridCol")} />
      <TextField label={LABELS.rowSpan} inputMode="numeric" {...bind("rowSpan")} />
      <TextField label={LABELS.colSpan} inputMode="numeric" {...bind("colSpan")} />
      <TextField label={LABELS.circuit} className="col-span-2" {...bind("circuit")} />
      <SelectField label={LABELS.sectionId} className="col-span-2" {...bind("sectionId")}>
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
              setD(toDraft(conflict));
              m.update.reset();
            }}
            onApplyMine={() => {
              setBase(conflict);
              save(conflict.version);
            }}
          />
        </div>
      )}
      {active.isError && !conflict && (
        <p role="alert" className="col-span-2 text-sm text-flare-300">
          {active.error.message}
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

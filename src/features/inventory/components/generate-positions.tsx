import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { COMPONENT_KIND_LABELS, COMPONENT_KINDS, type ComponentKind } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { usePositionMutations } from "../api";
import type { Section } from "../contract";

/** Creates a whole row at once: "1-1" … "1-12" left to right on one grid row. */
export function GeneratePositions({
  siteId,
  boardId,
  sections,
  gridRows,
}: {
  siteId: string;
  boardId: string;
  sections: Section[];
  gridRows: number;
}) {
  const m = usePositionMutations(siteId, boardId);
  const [d, setD] = useState({
    prefix: "1-",
    from: "1",
    to: "12",
    gridRow: "1",
    startCol: "1",
    kind: "molded_case_breaker" as ComponentKind,
    sectionId: "",
  });
  const fields = m.generate.error instanceof ApiError ? m.generate.error.fields : {};
  const bind = (k: keyof typeof d) => ({
    value: d[k],
    onChange: (e: { target: { value: string } }) => setD({ ...d, [k]: e.target.value }),
    error: fields[k],
  });
  const from = Number(d.from),
    to = Number(d.to);
  const sample =
    Number.isInteger(from) && Number.isInteger(to) && to >= from
      ? `${d.prefix}${from} … ${d.prefix}${to} (${to - from + 1})`
      : "";
  function submit(e: FormEvent) {
    e.preventDefault();
    m.generate.mutate({
      prefix: d.prefix,
      from,
      to,
      gridRow: Number(d.gridRow),
      startCol: Number(d.startCol),
      kind: d.kind,
      sectionId: d.sectionId || null,
    });
  }
  return (
    <form
      onSubmit={submit}
      aria-label="Generate a row of positions"
      className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
    >
      <h2 className="text-lg font-bold">Generate a row</h2>
      <div className="mt-2 grid grid-cols-2 gap-3 sm:grid-cols-4 lg:grid-cols-7">
        <TextField label="Prefix" className="[&_input]:font-mono" {...bind("prefix")} />
        <TextField label="From" inputMode="numeric" {...bind("from")} />
        <TextField label="To" inputMode="numeric" {...bind("to")} />
        <TextField label={`Grid row (1–${gridRows})`} inputMode="numeric" {...bind("gridRow")} />
        <TextField label="Starting column" inputMode="numeric" {...bind("startCol")} />
        <SelectField label="Kind" {...bind("kind")}>
          {COMPONENT_KINDS.map((k) => (
            <option key={k} value={k}>
              {COMPONENT_KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Section" {...bind("sectionId")}>
          <option value="">No section</option>
          {sections.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
        </SelectField>
      </div>
      <div className="mt-3 flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={m.generate.isPending}>
          Create {sample ? <span className="font-mono">{sample}</span> : "positions"}
        </Button>
        {m.generate.isSuccess && (
          <p role="status" className="text-sm text-kelp-300">
            Created {m.generate.data.positions.length} positions.
          </p>
        )}
        {m.generate.isError && (
          <p role="alert" className="text-sm text-flare-300">
            {m.generate.error.message}
          </p>
        )}
      </div>
    </form>
  );
}

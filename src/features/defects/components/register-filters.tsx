import { useEffect, useState } from "react";
import {
  DEFECT_CATEGORIES,
  DEFECT_CATEGORY_LABELS,
  DEFECT_SEVERITIES,
  DEFECT_SEVERITY_LABELS,
  DEFECT_STATUSES,
  DEFECT_STATUS_LABELS,
} from "../../../domain/vocab";
import type { DefectOptions, Flag } from "../../../schemas/defects";
import type { RegisterState } from "../url-state";

const FLAG_LABELS: Record<Flag, string> = {
  safety: "Safety-critical",
  blocking: "Blocks energising",
  pinned: "Curator's order",
  unassigned: "Nobody assigned",
  overdue: "Past due",
};
type FacetKey = "board" | "category" | "severity" | "status" | "assignee" | "flag";

function Facet({
  label,
  k,
  options,
  state,
  onState,
}: {
  label: string;
  k: FacetKey;
  options: Array<[string, string]>;
  state: RegisterState;
  onState: (p: Partial<RegisterState>) => void;
}) {
  const chosen = state[k] as string[];
  const toggle = (v: string) =>
    onState({
      [k]: chosen.includes(v) ? chosen.filter((x) => x !== v) : [...chosen, v],
      page: 0,
    } as Partial<RegisterState>);
  return (
    <details className="relative">
      <summary
        className={`flex min-h-11 cursor-pointer list-none items-center gap-1 rounded-md px-3 text-sm font-semibold ring-1 ${chosen.length ? "bg-brass-700/40 text-brass-300 ring-brass-400" : "bg-hull-800 text-chalk ring-hull-600"}`}
      >
        {label}
        {chosen.length > 0 && <span className="rounded bg-hull-950 px-1.5 text-xs">{chosen.length}</span>}{" "}
        <span aria-hidden="true">▾</span>
      </summary>
      <fieldset className="absolute z-20 mt-1 max-h-80 w-64 overflow-auto max-sm:fixed max-sm:inset-x-4 max-sm:w-auto rounded-md bg-hull-800 p-2 shadow-lg ring-1 ring-hull-600">
        <legend className="sr-only">{label}</legend>
        {options.map(([v, text]) => (
          <label key={v} className="flex min-h-11 cursor-pointer items-center gap-2 rounded px-2 hover:bg-hull-700">
            <input
              type="checkbox"
              className="h-5 w-5 accent-brass-400"
              checked={chosen.includes(v)}
              onChange={() => toggle(v)}
            />
            <span>{text}</span>
          </label>
        ))}
      </fieldset>
    </details>
  );
}

export function RegisterFilters({
  state,
  onState,
  options,
}: {
  state: RegisterState;
  onState: (p: Partial<RegisterState>) => void;
  options?: DefectOptions;
}) {
  const [q, setQ] = useState(state.q);
  // The box follows the URL when the URL changes (back, a saved view): adjusted while rendering (React's "storing information from previous renders"), not in an effect.
  const [urlQ, setUrlQ] = useState(state.q);
  if (urlQ !== state.q) {
    setUrlQ(state.q);
    setQ(state.q);
  }
  useEffect(() => {
    if (q === state.q) return;
    const t = setTimeout(() => onState({ q, page: 0 }), 300);
    return () => clearTimeout(t);
  }, [q, state.q, onState]);
  const any =
    state.q ||
    state.board.length ||
    state.category.length ||
    state.severity.length ||
    state.status.length ||
    state.assignee.length ||
    state.flag.length;
  return (
    <div className="flex flex-wrap items-end gap-2" role="search" aria-label="Filter the register">
      <label className="block min-w-56 flex-1">
        <span className="block text-sm font-semibold text-mist">Search title, notes, position or D-number</span>
        <input
          type="search"
          value={q}
          onChange={(e) => setQ(e.target.value)}
          placeholder="e.g. arc track, 2-14, D-42"
          className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk placeholder:text-fog focus:border-brass-400 focus:outline-none"
        />
      </label>
      <Facet
        label="Board"
        k="board"
        options={(options?.boards ?? []).map((b) => [b.id, b.name])}
        state={state}
        onState={onState}
      />
      <Facet
        label="Category"
        k="category"
        options={DEFECT_CATEGORIES.map((c) => [c, DEFECT_CATEGORY_LABELS[c]])}
        state={state}
        onState={onState}
      />
      <Facet
        label="Severity"
        k="severity"
        options={DEFECT_SEVERITIES.map((c) => [c, DEFECT_SEVERITY_LABELS[c]])}
        state={state}
        onState={onState}
      />
      <Facet
        label="Status"
        k="status"
        options={DEFECT_STATUSES.map((c) => [c, DEFECT_STATUS_LABELS[c]])}
        state={state}
        onState={onState}
      />
      <Facet
        label="Assignee"
        k="assignee"
        options={[["none", "Nobody"], ...(options?.crew ?? []).map((c) => [c.id, c.name] as [string, string])]}
        state={state}
        onState={onState}
      />
      <Facet label="Flags" k="flag" options={Object.entries(FLAG_LABELS)} state={state} onState={onState} />
      {any ? (
        <button
          type="button"
          className="min-h-11 px-2 text-sm underline"
          onClick={() =>
            onState({ q: "", board: [], category: [], severity: [], status: [], assignee: [], flag: [], page: 0 })
          }
        >
          Clear filters
        </button>
      ) : null}
    </div>
  );
}

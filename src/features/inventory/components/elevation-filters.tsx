import { useId, useState } from "react";
import {
  COMPONENT_KIND_LABELS,
  COMPONENT_KINDS,
  CUSTODY,
  CUSTODY_LABELS,
  DISPOSITION_LABELS,
  DISPOSITIONS,
  type ComponentKind,
  type Custody,
  type Disposition,
} from "../../../domain/vocab";
import type { TileRow } from "../contract";
import { GRADE_BANDS, gradeBand, type GradeBandKey } from "./tile-style";

export interface TileFilters {
  kind: ComponentKind | "";
  band: GradeBandKey | "";
  disposition: Disposition | "undecided" | "";
  custody: Custody | "";
}
export const NO_FILTERS: TileFilters = { kind: "", band: "", disposition: "", custody: "" };
export const filtersActive = (f: TileFilters) => Object.values(f).some(Boolean);

/** Whether a tile matches every chosen filter (the rest are dimmed, never hidden). */
export function tileMatches(t: TileRow, f: TileFilters): boolean {
  if (f.kind && t.kind !== f.kind) return false;
  if (f.band && gradeBand(t.latest?.astmGrade) !== f.band) return false;
  if (f.disposition && (t.component?.disposition ?? "undecided") !== f.disposition) return false;
  if (f.custody && (t.component?.custody ?? "in_place") !== f.custody) return false;
  return true;
}

const select = "mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-2 text-sm text-chalk";

export function ElevationFilters({
  value,
  onChange,
  matching,
  total,
}: {
  value: TileFilters;
  onChange: (f: TileFilters) => void;
  matching: number;
  total: number;
}) {
  const id = useId();
  const [shown, setShown] = useState(false);
  const set = <K extends keyof TileFilters>(k: K, v: TileFilters[K]) => onChange({ ...value, [k]: v });
  return (
    <div>
      <button
        type="button"
        aria-expanded={shown}
        aria-controls={`${id}-filters`}
        onClick={() => setShown(!shown)}
        className="min-h-11 w-full rounded-md bg-hull-850 px-3 text-left font-semibold ring-1 ring-hull-700 md:hidden"
      >
        {shown ? "▾" : "▸"} Filters{filtersActive(value) ? ` · ${matching} of ${total} match` : ""}
      </button>
      <fieldset
        id={`${id}-filters`}
        className={`${shown ? "mt-2 grid" : "hidden"} md:mt-0 md:grid grid-cols-2 gap-2 rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700 sm:grid-cols-[repeat(4,minmax(0,1fr))_auto] sm:items-end`}
      >
        <legend className="sr-only">Filter the tiles (non-matching tiles are dimmed)</legend>
        <div>
          <label htmlFor={`${id}-kind`} className="text-xs font-semibold text-mist">
            Kind
          </label>
          <select
            id={`${id}-kind`}
            className={select}
            value={value.kind}
            onChange={(e) => set("kind", e.target.value as TileFilters["kind"])}
          >
            <option value="">Any kind</option>
            {COMPONENT_KINDS.map((k) => (
              <option key={k} value={k}>
                {COMPONENT_KIND_LABELS[k]}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor={`${id}-band`} className="text-xs font-semibold text-mist">
            Rust grade
          </label>
          <select
            id={`${id}-band`}
            className={select}
            value={value.band}
            onChange={(e) => set("band", e.target.value as TileFilters["band"])}
          >
            <option value="">Any grade</option>
            {GRADE_BANDS.map((b) => (
              <option key={b.key} value={b.key}>
                {b.label}
              </option>
            ))}
            <option value="ungraded">Not graded yet</option>
          </select>
        </div>
        <div>
          <label htmlFor={`${id}-disposition`} className="text-xs font-semibold text-mist">
            Disposition
          </label>
          <select
            id={`${id}-disposition`}
            className={select}
            value={value.disposition}
            onChange={(e) => set("disposition", e.target.value as TileFilters["disposition"])}
          >
            <option value="">Any disposition</option>
            {DISPOSITIONS.map((d) => (
              <option key={d} value={d}>
                {DISPOSITION_LABELS[d]}
              </option>
            ))}
            <option value="undecided">Not decided</option>
          </select>
        </div>
        <div>
          <label htmlFor={`${id}-custody`} className="text-xs font-semibold text-mist">
            Custody
          </label>
          <select
            id={`${id}-custody`}
            className={select}
            value={value.custody}
            onChange={(e) => set("custody", e.target.value as TileFilters["custody"])}
          >
            <option value="">Anywhere</option>
            {CUSTODY.map((c) => (
              <option key={c} value={c}>
                {CUSTODY_LABELS[c]}
              </option>
            ))}
          </select>
        </div>
        <div className="col-span-2 flex items-center justify-between gap-2 sm:col-span-1 sm:flex-col sm:items-end">
          <p className="text-xs text-mist" role="status">
            {filtersActive(value) ? `${matching} of ${total} match` : `${total} positions`}
          </p>
          {filtersActive(value) && (
            <button
              type="button"
              className="min-h-11 rounded-md px-3 text-sm text-brass-300 ring-1 ring-hull-600"
              onClick={() => onChange(NO_FILTERS)}
            >
              Clear filters
            </button>
          )}
        </div>
      </fieldset>
    </div>
  );
}

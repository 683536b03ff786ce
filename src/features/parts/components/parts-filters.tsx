import {
  COMPONENT_KIND_LABELS,
  COMPONENT_KINDS,
  HERITAGE_RULE_LABELS,
  HERITAGE_RULES,
  PART_STATUS_LABELS,
  PART_STATUSES,
} from "../../../domain/vocab";
import type { ListQuery } from "../../../schemas/parts";
import { selectClass } from "../../../components/sort-selects";

export function PartsFilters({
  value,
  boards,
  onChange,
}: {
  value: ListQuery;
  boards: Array<{ id: string; name: string }>;
  /** The field changed, merged by the caller into the list's current view. */
  onChange: (change: Partial<ListQuery>) => void;
}) {
  const set = (k: keyof ListQuery) => (e: React.ChangeEvent<HTMLSelectElement>) =>
    onChange({ [k]: e.target.value || undefined });
  return (
    <fieldset className="no-print grid grid-cols-2 gap-3 md:grid-cols-5">
      <legend className="sr-only">Filter the wanted list</legend>
      <label className="col-span-2 text-sm font-semibold text-mist md:col-span-1">
        Find
        <input
          type="search"
          className={selectClass}
          defaultValue={value.q ?? ""}
          placeholder="W-12, maker, model, frame…"
          onKeyDown={(e) => {
            if (e.key === "Enter") onChange({ q: e.currentTarget.value.trim() || undefined });
          }}
          onBlur={(e) => {
            if ((e.currentTarget.value.trim() || undefined) !== value.q)
              onChange({ q: e.currentTarget.value.trim() || undefined });
          }}
        />
      </label>
      <label className="text-sm font-semibold text-mist">
        Status
        <select className={selectClass} value={value.status ?? "open"} onChange={set("status")}>
          <option value="open">Not fitted yet</option>
          <option value="all">Every status</option>
          {PART_STATUSES.map((s) => (
            <option key={s} value={s}>
              {PART_STATUS_LABELS[s]}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm font-semibold text-mist">
        Board
        <select className={selectClass} value={value.boardId ?? ""} onChange={set("boardId")}>
          <option value="">Every board</option>
          {boards.map((b) => (
            <option key={b.id} value={b.id}>
              {b.name}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm font-semibold text-mist">
        Kind
        <select className={selectClass} value={value.kind ?? ""} onChange={set("kind")}>
          <option value="">Every kind</option>
          {COMPONENT_KINDS.map((k) => (
            <option key={k} value={k}>
              {COMPONENT_KIND_LABELS[k]}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm font-semibold text-mist">
        Heritage rule
        <select className={selectClass} value={value.heritageRule ?? ""} onChange={set("heritageRule")}>
          <option value="">Any rule</option>
          {HERITAGE_RULES.map((r) => (
            <option key={r} value={r}>
              {HERITAGE_RULE_LABELS[r]}
            </option>
          ))}
        </select>
      </label>
    </fieldset>
  );
}

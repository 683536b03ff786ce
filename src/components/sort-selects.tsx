/** The select look of the list pages' filter and sort controls (a 44 px touch target, the dark field). */
export const selectClass = "mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk";

type Dir = "asc" | "desc";

/**
 * A list's sort on a phone, where its cards have no column headings to press: two selects side by side, the key and
 * the direction. `label` names each key as the list's wide table heads it. Changing either calls `onChange` with that
 * one alone, for the caller to merge into the list's current state: passing both from this render's props, a quick
 * second change could send the sort the page had before the first one was drawn (CI caught the register's cards
 * sorted by due date, then by priority again once the direction was set).
 */
export function SortSelects<K extends string>({
  keys,
  sort,
  dir,
  label,
  onChange,
}: {
  keys: readonly K[];
  sort: K;
  dir: Dir;
  label: (key: K) => string;
  onChange: (change: { sort: K } | { dir: Dir }) => void;
}) {
  return (
    <div className="no-print grid grid-cols-2 gap-3">
      <label className="text-sm font-semibold text-mist">
        Sort by
        <select className={selectClass} value={sort} onChange={(e) => onChange({ sort: e.target.value as K })}>
          {keys.map((k) => (
            <option key={k} value={k}>
              {label(k)}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm font-semibold text-mist">
        Direction
        <select
          className={selectClass}
          value={dir}
          onChange={(e) => onChange({ dir: e.target.value === "desc" ? "desc" : "asc" })}
        >
          <option value="asc">Ascending ▲</option>
          <option value="desc">Descending ▼</option>
        </select>
      </label>
    </div>
  );
}

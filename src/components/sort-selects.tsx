/** The select look of the list pages' filter and sort controls (a 44 px touch target, the dark field). */
export const selectClass = "mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk";

type Dir = "asc" | "desc";

/**
 * A list's sort on a phone, where its cards have no column headings to press: two selects side by side, the key and
 * the direction. `label` names each key as the list's wide table heads it. Changing either calls `onChange` with both.
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
  onChange: (sort: K, dir: Dir) => void;
}) {
  return (
    <div className="no-print grid grid-cols-2 gap-3">
      <label className="text-sm font-semibold text-mist">
        Sort by
        <select className={selectClass} value={sort} onChange={(e) => onChange(e.target.value as K, dir)}>
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
          onChange={(e) => onChange(sort, e.target.value === "desc" ? "desc" : "asc")}
        >
          <option value="asc">Ascending ▲</option>
          <option value="desc">Descending ▼</option>
        </select>
      </label>
    </div>
  );
}

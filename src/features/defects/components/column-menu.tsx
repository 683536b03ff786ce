import { COLUMN_LABELS, DEFAULT_ORDER } from "./defect-columns";
import type { RegisterState } from "../url-state";

const FIXED = new Set(["select", "ref"]);

/** Show or hide columns and move them left or right; both live in the URL. */
export function ColumnMenu({ state, onState }: { state: RegisterState; onState: (p: Partial<RegisterState>) => void }) {
  const order = (state.cols.length ? [...new Set([...state.cols, ...DEFAULT_ORDER])] : DEFAULT_ORDER).filter(
    (id) => !FIXED.has(id),
  );
  const move = (id: string, by: number) => {
    const next = [...order];
    const i = next.indexOf(id);
    const j = i + by;
    if (j < 0 || j >= next.length) return;
    [next[i], next[j]] = [next[j], next[i]];
    onState({ cols: ["ref", ...next] });
  };
  const toggle = (id: string) =>
    onState({ hide: state.hide.includes(id) ? state.hide.filter((x) => x !== id) : [...state.hide, id] });
  return (
    <details className="relative">
      <summary className="flex min-h-11 cursor-pointer list-none items-center rounded-md bg-hull-800 px-3 text-sm font-semibold ring-1 ring-hull-600">
        Columns ▾
      </summary>
      <ul className="absolute right-0 z-20 mt-1 w-72 rounded-md bg-hull-800 p-2 shadow-lg ring-1 ring-hull-600">
        {order.map((id, i) => (
          <li key={id} className="flex items-center gap-1">
            <label className="flex min-h-11 flex-1 cursor-pointer items-center gap-2 px-1">
              <input
                type="checkbox"
                className="h-5 w-5 accent-brass-400"
                checked={!state.hide.includes(id)}
                onChange={() => toggle(id)}
              />
              {COLUMN_LABELS[id]}
            </label>
            <button
              type="button"
              className="min-h-11 min-w-11 rounded hover:bg-hull-700 disabled:opacity-40"
              disabled={i === 0}
              onClick={() => move(id, -1)}
              aria-label={`Move ${COLUMN_LABELS[id]} left`}
            >
              ←
            </button>
            <button
              type="button"
              className="min-h-11 min-w-11 rounded hover:bg-hull-700 disabled:opacity-40"
              disabled={i === order.length - 1}
              onClick={() => move(id, 1)}
              aria-label={`Move ${COLUMN_LABELS[id]} right`}
            >
              →
            </button>
          </li>
        ))}
        <li>
          <button
            type="button"
            className="min-h-11 w-full text-left text-sm underline"
            onClick={() => onState({ cols: [], hide: ["createdAt", "costEstimate", "updatedAt"] })}
          >
            Reset columns
          </button>
        </li>
      </ul>
    </details>
  );
}

import { PART_PAGE_SIZES } from "../../../schemas/parts";

const button = "min-h-11 rounded-md bg-hull-800 px-3 ring-1 ring-hull-600 disabled:opacity-40";

/** Pages of the wanted list (the server pages it, like the register). */
export function PartsPager({
  total,
  page,
  size,
  onPage,
}: {
  total: number;
  page: number;
  size: number;
  onPage: (page: number | undefined, size: number | undefined) => void;
}) {
  const pages = Math.max(1, Math.ceil(total / size));
  const from = total ? (page - 1) * size + 1 : 0;
  const to = Math.min(total, page * size);
  const keepSize = size === 50 ? undefined : size;
  return (
    <nav aria-label="Pages of the wanted list" className="no-print flex flex-wrap items-center gap-3 text-sm">
      <p role="status">
        Lines {from}–{to} of {total}
      </p>
      <button
        type="button"
        className={button}
        disabled={page <= 1}
        onClick={() => onPage(page - 1 > 1 ? page - 1 : undefined, keepSize)}
      >
        ← Previous
      </button>
      <span>
        Page {page} of {pages}
      </span>
      <button type="button" className={button} disabled={page >= pages} onClick={() => onPage(page + 1, keepSize)}>
        Next →
      </button>
      <label className="flex items-center gap-2">
        Lines per page
        <select
          className="min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2"
          value={size}
          onChange={(e) => onPage(undefined, Number(e.target.value) === 50 ? undefined : Number(e.target.value))}
        >
          {PART_PAGE_SIZES.map((n) => (
            <option key={n} value={n}>
              {n}
            </option>
          ))}
        </select>
      </label>
    </nav>
  );
}

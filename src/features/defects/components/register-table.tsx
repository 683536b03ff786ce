import { useMemo, type KeyboardEvent } from "react";
import { functionalUpdate, useTable, type RowSelectionState, type Updater } from "@tanstack/react-table";
import type { DefectRow } from "../../../schemas/defects";
import type { SortKey } from "../../../schemas/defects";
import { rowsAwaited, useFirstScreenful } from "../../../lib/use-first-screenful";
import type { RegisterState } from "../url-state";
import { DEFAULT_ORDER, makeColumns, registerFeatures } from "./defect-columns";

interface Props {
  siteId: string;
  rows: DefectRow[];
  total: number;
  state: RegisterState;
  onState: (patch: Partial<RegisterState>) => void;
  selection: RowSelectionState;
  onSelection: (s: RowSelectionState) => void;
  busy: boolean;
}

/** Arrow keys move between rows (focus on each row's reference link); Home/End jump; x selects. */
function onGridKey(e: KeyboardEvent<HTMLTableSectionElement>) {
  const links = [...e.currentTarget.querySelectorAll<HTMLAnchorElement>("a[data-row-link]")];
  const at = links.indexOf(document.activeElement as HTMLAnchorElement);
  if (at < 0) return;
  const go = (i: number) => {
    e.preventDefault();
    links[Math.max(0, Math.min(links.length - 1, i))].focus();
  };
  if (e.key === "ArrowDown" || e.key === "j") go(at + 1);
  else if (e.key === "ArrowUp" || e.key === "k") go(at - 1);
  else if (e.key === "Home") go(0);
  else if (e.key === "End") go(links.length - 1);
  else if (e.key === "x") {
    e.preventDefault();
    links[at].closest("tr")?.querySelector<HTMLInputElement>("input[type=checkbox]")?.click();
  }
}

/**
 * The height the table will take once its rows are drawn (it scrolls inside 70 % of the screen's height), kept for
 * it on the render that draws the page around it and none of its rows yet, so nothing below it moves when they come.
 * A row is 59 px tall at both 360 and 1280 px wide (measured on the 20,000-position bench site), the heading row 60.
 */
const reserved = (rows: number) => ({ minHeight: `min(70vh, ${60 + rows * 59}px)` });

export function RegisterTable({ siteId, rows, total, state, onState, selection, onSelection, busy }: Props) {
  const columns = useMemo(() => makeColumns(siteId), [siteId]);
  const shown = useFirstScreenful(rows);
  const order = state.cols.length ? [...new Set(["select", ...state.cols, ...DEFAULT_ORDER])] : DEFAULT_ORDER;
  const visibility = useMemo(() => Object.fromEntries(state.hide.map((id) => [id, false])), [state.hide]);
  const sorting = useMemo(() => [{ id: state.sort, desc: state.dir === "desc" }], [state.sort, state.dir]);
  const pagination = useMemo(() => ({ pageIndex: state.page, pageSize: state.size }), [state.page, state.size]);
  const table = useTable({
    features: registerFeatures,
    columns,
    data: shown,
    getRowId: (r) => r.id,
    rowCount: total,
    manualSorting: true,
    manualPagination: true,
    enableSortingRemoval: false,
    enableMultiSort: false,
    state: { sorting, pagination, columnVisibility: visibility, columnOrder: order, rowSelection: selection },
    onSortingChange: (u) => {
      const next = functionalUpdate(u, sorting)[0];
      if (next) onState({ sort: next.id as SortKey, dir: next.desc ? "desc" : "asc", page: 0 });
    },
    onPaginationChange: (u) => {
      const next = functionalUpdate(u, pagination);
      onState({ page: next.pageIndex, size: next.pageSize });
    },
    onRowSelectionChange: (u: Updater<RowSelectionState>) => onSelection(functionalUpdate(u, selection)),
  });

  return (
    <div
      className="max-h-[70vh] overflow-auto rounded-lg ring-1 ring-hull-700"
      aria-busy={busy}
      style={rowsAwaited(rows, shown) ? reserved(rows.length) : undefined}
    >
      <table className="w-full border-collapse text-sm" aria-rowcount={total} aria-describedby="register-keys">
        <thead>
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id}>
              {g.headers.map((h) => {
                const sorted = h.column.getIsSorted();
                const can = h.column.getCanSort();
                return (
                  <th
                    key={h.id}
                    scope="col"
                    aria-sort={sorted ? (sorted === "asc" ? "ascending" : "descending") : undefined}
                    className="sticky top-0 z-10 whitespace-nowrap border-b border-hull-600 bg-hull-800 px-2 py-2 text-left font-semibold text-mist"
                  >
                    {can ? (
                      <button
                        type="button"
                        onClick={h.column.getToggleSortingHandler()}
                        className="inline-flex min-h-11 items-center gap-1 hover:text-chalk"
                      >
                        <table.FlexRender header={h} />
                        <span aria-hidden="true" className="text-brass-300">
                          {sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}
                        </span>
                      </button>
                    ) : (
                      <table.FlexRender header={h} />
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody onKeyDown={onGridKey}>
          {table.getRowModel().rows.map((row) => (
            <tr
              key={row.id}
              className={`border-b border-hull-700 ${row.getIsSelected() ? "bg-brass-700/25" : "odd:bg-hull-900 even:bg-hull-850"} focus-within:outline focus-within:outline-2 focus-within:outline-brass-400`}
            >
              {row.getVisibleCells().map((cell) => (
                <td key={cell.id} className="px-2 py-2 align-top">
                  <table.FlexRender cell={cell} />
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

import { Fragment, useEffect, useMemo, useRef, useState, type KeyboardEvent } from "react";
import { functionalUpdate, useTable, type RowSelectionState, type Updater } from "@tanstack/react-table";
import type { DefectRow } from "../../../schemas/defects";
import type { SortKey } from "../../../schemas/defects";
import { RowGap } from "../../../components/row-gap";
import { rowsAwaited, useFirstScreenful } from "../../../lib/use-first-screenful";
import { usePrinting } from "../../../lib/use-printing";
import { useRowWindow } from "../../../lib/use-row-window";
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

/** Where a key sends the focus from row `at` of `count` (arrow keys, j/k, Home/End), or null for any other key. */
function rowFor(key: string, at: number, count: number): number | null {
  const to =
    key === "ArrowDown" || key === "j"
      ? at + 1
      : key === "ArrowUp" || key === "k"
        ? at - 1
        : key === "Home"
          ? 0
          : key === "End"
            ? count - 1
            : null;
  return to == null ? null : Math.max(0, Math.min(count - 1, to));
}

/**
 * The height the table will take once its rows are drawn (it scrolls inside 70 % of the screen's height), kept for
 * it on the render that draws the page around it and none of its rows yet, so nothing below it moves when they come.
 * A row is 59 px tall at both 360 and 1280 px wide (measured on the 20,000-position bench site), the heading row 60.
 */
const ROW = 59;
const HEAD = 60;
const reserved = (rows: number) => ({ minHeight: `min(70vh, ${HEAD + rows * ROW}px)` });

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
  const rowModel = table.getRowModel().rows;
  const boxRef = useRef<HTMLDivElement>(null);
  // Only the rows in the box's view are drawn (their layout and paint were the page's longest tasks on a phone);
  // every row when printed.
  const win = useRowWindow({
    count: rowModel.length,
    rowHeight: ROW,
    headHeight: HEAD,
    boxHeight: () => (typeof window === "undefined" ? 0 : window.innerHeight * 0.7),
    boxRef,
    whole: usePrinting(),
  });
  // The row the keyboard moves to; focused once drawn (it may need a scroll and a render first).
  const [focusTo, setFocusTo] = useState<number | null>(null);
  const drawnKey = win.slots.map((s) => s.item.index).join(",");
  useEffect(() => {
    if (focusTo == null) return;
    const link = boxRef.current?.querySelector<HTMLAnchorElement>(`tr[data-index="${focusTo}"] a[data-row-link]`);
    if (link) {
      link.focus();
      setFocusTo(null);
    }
  }, [focusTo, drawnKey]);
  const firstIndex = state.page * state.size + 2; // aria-rowindex of the first row: the heading row is 1
  const cols = table.getVisibleLeafColumns().length;

  /** Arrow keys move between rows (focus on each row's reference link); Home/End jump; x selects. */
  const onGridKey = (e: KeyboardEvent<HTMLTableSectionElement>) => {
    const active = document.activeElement as HTMLElement | null;
    const tr = active?.matches("a[data-row-link]") ? active.closest<HTMLTableRowElement>("tr[data-index]") : null;
    if (!tr) return;
    const at = Number(tr.dataset.index);
    if (e.key === "x") {
      e.preventDefault();
      tr.querySelector<HTMLInputElement>("input[type=checkbox]")?.click();
      return;
    }
    const to = rowFor(e.key, at, rowModel.length);
    if (to == null) return;
    e.preventDefault();
    win.keep(to);
    win.scrollTo(to);
    setFocusTo(to);
  };

  return (
    <div
      ref={boxRef}
      className="max-h-[70vh] overflow-auto rounded-lg ring-1 ring-hull-700"
      aria-busy={busy}
      style={rowsAwaited(rows, shown) ? reserved(rows.length) : undefined}
    >
      <table className="w-full border-collapse text-sm" aria-rowcount={total} aria-describedby="register-keys">
        <thead>
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id} aria-rowindex={1}>
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
        <tbody
          onKeyDown={onGridKey}
          onFocus={(e) => {
            const tr = (e.target as HTMLElement).closest<HTMLTableRowElement>("tr[data-index]");
            if (tr) win.keep(Number(tr.dataset.index));
          }}
        >
          {win.slots.map(({ gap, item }) => {
            const row = rowModel[item.index];
            return (
              <Fragment key={row.id}>
                {gap > 0 && <RowGap height={gap} cols={cols} />}
                <tr
                  ref={win.measure}
                  data-index={item.index}
                  aria-rowindex={firstIndex + item.index}
                  className={`border-b border-hull-700 ${row.getIsSelected() ? "bg-brass-700/25" : item.index % 2 ? "bg-hull-850" : "bg-hull-900"} focus-within:outline focus-within:outline-2 focus-within:outline-brass-400`}
                >
                  {row.getVisibleCells().map((cell) => (
                    <td key={cell.id} className="px-2 py-2 align-top">
                      <table.FlexRender cell={cell} />
                    </td>
                  ))}
                </tr>
              </Fragment>
            );
          })}
          {win.after > 0 && <RowGap height={win.after} cols={cols} />}
        </tbody>
      </table>
    </div>
  );
}

import { useEffect, useMemo, useRef, useState, type KeyboardEvent } from "react";
import { functionalUpdate, useTable, type RowSelectionState, type Updater } from "@tanstack/react-table";
import { SORT_KEYS, type DefectRow, type SortKey } from "../../../schemas/defects";
import { SortSelects } from "../../../components/sort-selects";
import { rowsAwaited, useFirstScreenful } from "../../../lib/use-first-screenful";
import type { RegisterState } from "../url-state";
import { COLUMN_LABELS, COLUMN_MIN_WIDTH, DEFAULT_ORDER, makeColumns, registerFeatures } from "./defect-columns";

export interface RegisterRowsProps {
  siteId: string;
  rows: DefectRow[];
  total: number;
  state: RegisterState;
  onState: (patch: Partial<RegisterState>) => void;
  selection: RowSelectionState;
  onSelection: (s: RowSelectionState) => void;
  /** Selection serves the bulk actions: a role without them gets no boxes that do nothing. */
  canSelect: boolean;
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

/** The register's TanStack table over the rows drawn so far (the first screenful, then the rest): shared by both layouts. */
function useRegisterRows({
  siteId,
  rows,
  total,
  state,
  onState,
  selection,
  onSelection,
  canSelect,
}: RegisterRowsProps) {
  const columns = useMemo(() => makeColumns(siteId), [siteId]);
  const shown = useFirstScreenful(rows);
  const order = state.cols.length ? [...new Set(["select", ...state.cols, ...DEFAULT_ORDER])] : DEFAULT_ORDER;
  const visibility = useMemo(
    () => ({ ...Object.fromEntries(state.hide.map((id) => [id, false])), ...(canSelect ? {} : { select: false }) }),
    [state.hide, canSelect],
  );
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
    enableRowSelection: canSelect,
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
  return { table, shown };
}

export function RegisterTable(props: RegisterRowsProps) {
  const { rows, total, state, busy } = props;
  const { table, shown } = useRegisterRows(props);
  const rowModel = table.getRowModel().rows;
  const boxRef = useRef<HTMLDivElement>(null);
  // Every row of the page is drawn (at most 200; the first screenful first, useFirstScreenful), so the browser's find,
  // a screen reader and a selection see the whole page. The table is shown from 768 px wide; a phone draws cards.
  // The row the keyboard moves to; focused once drawn (past the first screenful it may be a render away).
  const [focusTo, setFocusTo] = useState<number | null>(null);
  useEffect(() => {
    if (focusTo == null) return;
    const link = boxRef.current?.querySelector<HTMLAnchorElement>(`tr[data-index="${focusTo}"] a[data-row-link]`);
    if (link) {
      // The whole row in view (the link alone would leave the row cut at the box's edge), below the sticky heading.
      link.focus({ preventScroll: true });
      link.closest("tr")?.scrollIntoView({ block: "nearest" });
      setFocusTo(null);
    }
  }, [focusTo, rowModel.length]);
  const firstIndex = state.page * state.size + 2; // aria-rowindex of the first row: the heading row is 1

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
        <tbody onKeyDown={onGridKey}>
          {rowModel.map((row, index) => (
            <tr
              key={row.id}
              data-index={index}
              aria-rowindex={firstIndex + index}
              className={`scroll-mt-16 border-b border-hull-700 ${row.getIsSelected() ? "bg-brass-700/25" : index % 2 ? "bg-hull-850" : "bg-hull-900"} focus-within:outline focus-within:outline-2 focus-within:outline-brass-400`}
            >
              {row.getVisibleCells().map((cell) => (
                <td key={cell.id} className="px-2 py-2 align-top">
                  {COLUMN_MIN_WIDTH[cell.column.id] ? (
                    <div className={COLUMN_MIN_WIDTH[cell.column.id]}>
                      <table.FlexRender cell={cell} />
                    </div>
                  ) : (
                    <table.FlexRender cell={cell} />
                  )}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/**
 * A card's least height from 360 to 767 px wide (the demo site's defects drew 252–278 px at 360 and 212–234 at 767,
 * 2026-12-04), and the gap between cards: the height kept for the cards before the first screenful is drawn, so
 * nothing below them moves.
 */
const CARD = 212;
const CARD_GAP = 12;
const reservedCards = (rows: number) => ({ minHeight: `${rows * (CARD + CARD_GAP) - CARD_GAP}px` });

/**
 * Below Tailwind's `md` (48rem), on a phone, each defect is a card read top to bottom: its selection box, reference
 * and priority score, the title with its flags, severity and status, then board, position, due date and assignee
 * under small labels — the table's own cells. The sort is two selects above the cards (the table sorts by its
 * headings). Fifteen columns do not fit 360 px: the table scrolled sideways inside its box, the title cut off.
 */
export function RegisterCards(props: RegisterRowsProps) {
  const { rows, state, onState, busy } = props;
  const { table, shown } = useRegisterRows(props);
  const label = (id: string) => COLUMN_LABELS[id] ?? id;
  return (
    <div className="space-y-3">
      <SortSelects
        keys={SORT_KEYS}
        sort={state.sort}
        dir={state.dir}
        label={label}
        onChange={(change) => onState({ ...change, page: 0 })}
      />
      <ul
        className={`space-y-3 ${busy ? "opacity-60" : ""}`}
        aria-label="Defects"
        aria-busy={busy}
        style={rowsAwaited(rows, shown) ? reservedCards(rows.length) : undefined}
      >
        {table.getRowModel().rows.map((row) => {
          const cell = (id: string) => {
            const c = row.getAllCells().find((x) => x.column.id === id);
            return c ? <table.FlexRender cell={c} /> : null;
          };
          const item = (id: string) => (
            <div className="min-w-0">
              <dt className="text-xs text-mist">{label(id)}</dt>
              <dd className="mt-0.5 break-words">{cell(id)}</dd>
            </div>
          );
          return (
            <li
              key={row.id}
              data-testid="defect-card"
              className={`rounded-lg p-3 ring-1 ${row.getIsSelected() ? "bg-brass-700/25 ring-brass-400" : "bg-hull-850 ring-hull-700"} focus-within:outline focus-within:outline-2 focus-within:outline-brass-400`}
            >
              <div className="flex items-start gap-3">
                {props.canSelect && (
                  <span className="-m-3 flex min-h-11 min-w-11 items-center justify-center">{cell("select")}</span>
                )}
                <div className="min-w-0 flex-1 space-y-2">
                  <div className="flex flex-wrap items-baseline justify-between gap-x-3">
                    {cell("ref")}
                    <span className="text-sm text-mist">
                      Priority <span className="text-chalk">{cell("priority")}</span>
                    </span>
                  </div>
                  <div className="text-sm">{cell("title")}</div>
                  <div className="flex flex-wrap items-center gap-2">
                    {cell("severity")}
                    {cell("status")}
                  </div>
                  <dl className="grid grid-cols-2 gap-x-4 gap-y-2 text-sm">
                    {item("board")}
                    {item("position")}
                    {item("dueOn")}
                    {item("assignee")}
                  </dl>
                </div>
              </div>
            </li>
          );
        })}
      </ul>
    </div>
  );
}

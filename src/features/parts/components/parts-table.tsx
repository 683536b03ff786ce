import { functionalUpdate, useTable } from "@tanstack/react-table";
import { useMemo } from "react";
import { SortSelects } from "../../../components/sort-selects";
import { rowsAwaited, useFirstScreenful } from "../../../lib/use-first-screenful";
import { useMediaQuery } from "../../../lib/use-media-query";
import { PART_SORTS, type PartLine, type PartSort } from "../../../schemas/parts";
import { partColumns, partsFeatures } from "./part-columns";

const ARROW = { asc: " ▲", desc: " ▼" } as const;

interface Props {
  siteId: string;
  lines: PartLine[];
  busy?: boolean;
  sort?: PartSort;
  dir?: "asc" | "desc";
  /** A change of the sort, the key or the direction or both, merged by the caller into the list's current view. */
  onSort: (change: { sort?: PartSort; dir?: "asc" | "desc" }) => void;
}

/**
 * The height the table will take once its rows are drawn, kept for it on the render that draws the page around it
 * and none of its rows yet, so what stands below it (the pager, the budget) moves as little as it can when they come.
 * A line is 65–129 px tall at 360 and 1280 px wide (it wraps its words; measured on the 20,000-position bench site),
 * the heading row 60: the shortest is reserved, so the page can only grow below the list, never jump back up.
 */
const reserved = (rows: number) => ({ minHeight: `${60 + rows * 65}px` });
/**
 * The same for the cards below `WIDE`: a card is 200 px or more tall from 360 to 767 px wide (232–428 at 360, 200–268
 * at 767: the demo site's 48 lines, 2026-12-04), 12 between.
 */
const reservedCards = (rows: number) => ({ minHeight: `${rows * 212 - 12}px` });

/**
 * From Tailwind's `md` (48rem, 768 px) up the lines are a table; below it, on a phone, each line is a card: the part,
 * its rule and status, then quantity, leads, money and positions under small labels (the columns' headers), with the
 * sort as two selects. Seven columns do not fit 360 px without the page or the table scrolling sideways.
 */
const WIDE = "(min-width: 48rem)";

/** The scrounger's list: TanStack Table v9; sorting, filters and pages are in the URL and done by the server. */
export function PartsTable({ siteId, lines, busy = false, sort, dir, onSort }: Props) {
  const columns = useMemo(() => partColumns(siteId), [siteId]);
  const shown = useFirstScreenful(lines);
  const sorting = useMemo(() => (sort && sort !== "created" ? [{ id: sort, desc: dir === "desc" }] : []), [sort, dir]);
  const wide = useMediaQuery(WIDE);
  const awaited = rowsAwaited(lines, shown);
  const table = useTable({
    features: partsFeatures,
    columns,
    data: shown,
    getRowId: (r) => r.id,
    manualSorting: true,
    enableMultiSort: false,
    state: { sorting },
    onSortingChange: (u) => {
      const next = functionalUpdate(u, sorting)[0];
      onSort({ sort: (next?.id ?? "created") as PartSort, dir: next?.desc ? "desc" : "asc" });
    },
  });
  if (!wide) {
    const header = (id: string) => {
      const h = table.getColumn(id)?.columnDef.header;
      return typeof h === "string" ? h : id;
    };
    return (
      <div className="space-y-3">
        <SortSelects
          keys={PART_SORTS}
          sort={sort ?? "created"}
          dir={dir ?? "asc"}
          label={(id) => (id === "created" ? "Order added" : header(id))}
          onChange={onSort}
        />
        <ul
          className={`space-y-3 ${busy ? "opacity-60" : ""}`}
          aria-label="Wanted parts"
          aria-busy={busy}
          style={awaited ? reservedCards(lines.length) : undefined}
        >
          {table.getRowModel().rows.map((row) => {
            const cell = (id: string) => {
              const c = row.getAllCells().find((x) => x.column.id === id);
              return c ? <table.FlexRender cell={c} /> : null;
            };
            const item = (id: string, full = false) => (
              <div className={full ? "col-span-3" : undefined}>
                <dt className="text-xs text-mist">{header(id)}</dt>
                <dd className="mt-0.5">{cell(id)}</dd>
              </div>
            );
            return (
              <li key={row.id} className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700" data-testid="part-row">
                {cell("part")}
                <div className="mt-2 flex flex-wrap items-center gap-x-3 gap-y-2">
                  {cell("heritageRule")}
                  {cell("status")}
                </div>
                <dl className="mt-2 grid grid-cols-[auto_auto_1fr] gap-x-5 gap-y-2">
                  {item("qty")}
                  {item("leadCount")}
                  {item("estimated")}
                  {item("positions", true)}
                </dl>
              </li>
            );
          })}
        </ul>
      </div>
    );
  }
  return (
    <div
      className="relative overflow-x-auto rounded-lg ring-1 ring-hull-700"
      style={awaited ? reserved(lines.length) : undefined}
    >
      <table
        className={`w-full min-w-[52rem] border-collapse text-left ${busy ? "opacity-60" : ""}`}
        aria-label="Wanted parts"
        aria-busy={busy}
      >
        <thead className="bg-hull-850">
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id}>
              {g.headers.map((h) => {
                const sorted = h.column.getIsSorted();
                return (
                  <th
                    key={h.id}
                    scope="col"
                    className="p-2 text-sm text-mist"
                    aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : "none"}
                  >
                    <button
                      type="button"
                      className="min-h-11 text-left font-semibold hover:text-chalk"
                      onClick={h.column.getToggleSortingHandler()}
                    >
                      <table.FlexRender header={h} />
                      <span aria-hidden="true">{sorted ? ARROW[sorted] : ""}</span>
                    </button>
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((row) => (
            <tr key={row.id} className="border-t border-hull-700 align-top" data-testid="part-row">
              {row.getAllCells().map((cell) => (
                <td key={cell.id} className="p-2">
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

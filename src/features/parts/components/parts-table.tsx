import { functionalUpdate, useTable } from "@tanstack/react-table";
import { useMemo } from "react";
import { rowsAwaited, useFirstScreenful } from "../../../lib/use-first-screenful";
import type { PartLine, PartSort } from "../../../schemas/parts";
import { partColumns, partsFeatures } from "./part-columns";

const ARROW = { asc: " ▲", desc: " ▼" } as const;

interface Props {
  siteId: string;
  lines: PartLine[];
  busy?: boolean;
  sort?: PartSort;
  dir?: "asc" | "desc";
  onSort: (sort: PartSort, dir: "asc" | "desc") => void;
}

/**
 * The height the table will take once its rows are drawn, kept for it on the render that draws the page around it
 * and none of its rows yet, so what stands below it (the pager, the budget) moves as little as it can when they come.
 * A line is 65–129 px tall at 360 and 1280 px wide (it wraps its words; measured on the 20,000-position bench site),
 * the heading row 60: the shortest is reserved, so the page can only grow below the list, never jump back up.
 */
const reserved = (rows: number) => ({ minHeight: `${60 + rows * 65}px` });

/** The scrounger's list: TanStack Table v9; sorting, filters and pages are in the URL and done by the server. */
export function PartsTable({ siteId, lines, busy = false, sort, dir, onSort }: Props) {
  const columns = useMemo(() => partColumns(siteId), [siteId]);
  const shown = useFirstScreenful(lines);
  const sorting = useMemo(() => (sort && sort !== "created" ? [{ id: sort, desc: dir === "desc" }] : []), [sort, dir]);
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
      onSort((next?.id ?? "created") as PartSort, next?.desc ? "desc" : "asc");
    },
  });
  return (
    <div
      className="relative overflow-x-auto rounded-lg ring-1 ring-hull-700"
      style={rowsAwaited(lines, shown) ? reserved(lines.length) : undefined}
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

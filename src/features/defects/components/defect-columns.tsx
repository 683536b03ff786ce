import { Link } from "react-router";
import {
  createColumnHelper,
  columnOrderingFeature,
  columnVisibilityFeature,
  rowPaginationFeature,
  rowSelectionFeature,
  rowSortingFeature,
  tableFeatures,
} from "@tanstack/react-table";
import { paths } from "../../../config/paths";
import { Money } from "../../../lib/money";
import { DEFECT_CATEGORY_LABELS, DEFECT_STATUS_LABELS } from "../../../domain/vocab";
import type { DefectRow } from "../../../schemas/defects";
import { SeverityBadge, StatusBadge, FlagMarks } from "./badges";
import { dateOf as date } from "../../../lib/clock";

export const registerFeatures = tableFeatures({
  rowSortingFeature,
  rowPaginationFeature,
  columnVisibilityFeature,
  columnOrderingFeature,
  rowSelectionFeature,
});
const col = createColumnHelper<typeof registerFeatures, DefectRow>();

/**
 * The least width of a column in the wide table, so a long title or board name wraps into a readable block rather than
 * a column a word wide. The table wraps those cells in it; the phone's cards show the same cells without it.
 */
export const COLUMN_MIN_WIDTH: Partial<Record<string, string>> = { title: "min-w-56", board: "min-w-32" };

/** Column labels for the column menu and the CSV (ids match the server's sort keys). */
export const COLUMN_LABELS: Record<string, string> = {
  ref: "Ref",
  priority: "Priority score",
  title: "Defect",
  board: "Board",
  position: "Position",
  category: "Category",
  severity: "Severity",
  status: "Status",
  assignee: "Assignee",
  dueOn: "Due",
  effortHours: "Effort (h)",
  costEstimate: "Cost",
  createdAt: "Raised",
  updatedAt: "Updated",
};

export function makeColumns(siteId: string) {
  return col.columns([
    col.display({
      id: "select",
      enableSorting: false,
      enableHiding: false,
      header: ({ table }) => (
        <input
          type="checkbox"
          aria-label="Select every defect on this page"
          className="h-5 w-5 accent-brass-400"
          checked={table.getIsAllPageRowsSelected()}
          onChange={table.getToggleAllPageRowsSelectedHandler()}
        />
      ),
      cell: ({ row }) => (
        <input
          type="checkbox"
          aria-label={`Select D-${row.original.ref}`}
          className="h-5 w-5 accent-brass-400"
          checked={row.getIsSelected()}
          onClick={row.getToggleSelectedHandler()}
          onChange={() => {}}
        />
      ),
    }),
    col.accessor("ref", {
      id: "ref",
      header: "Ref",
      enableHiding: false,
      cell: (c) => (
        <Link
          data-row-link
          to={paths.defect.href(siteId, c.row.original.id)}
          className="font-mono font-semibold text-brass-300"
        >
          D-{c.getValue()}
        </Link>
      ),
    }),
    col.accessor("priorityScore", {
      id: "priority",
      header: "Priority score",
      cell: (c) => (
        <span className="font-mono">
          {c.getValue()}
          {c.row.original.pinned && (
            <span
              className="ml-1 rounded bg-tide-700 px-1 text-xs text-tide-300"
              title={`Placed by the curator ${c.row.original.pinned === "above" ? "before" : "after"} another defect`}
            >
              {c.row.original.pinned === "above" ? "↑" : "↓"} order
              <span className="sr-only">
                {" "}
                set by the curator: {c.row.original.pinned === "above" ? "before" : "after"}
              </span>
            </span>
          )}
        </span>
      ),
    }),
    col.accessor("title", {
      id: "title",
      header: "Defect",
      cell: (c) => (
        <span className="block">
          <span className="block">{c.getValue()}</span>
          <FlagMarks safety={c.row.original.safetyCritical} blocking={c.row.original.blocksEnergisation} />
        </span>
      ),
    }),
    col.accessor("boardName", {
      id: "board",
      header: "Board",
      cell: (c) => (
        <span className="block">
          {c.getValue()}
          {c.row.original.sectionName && <span className="block text-xs text-fog">{c.row.original.sectionName}</span>}
        </span>
      ),
    }),
    col.accessor("designation", {
      id: "position",
      header: "Position",
      cell: (c) => <span className="font-mono">{c.getValue() ?? "—"}</span>,
    }),
    col.accessor("category", { id: "category", header: "Category", cell: (c) => DEFECT_CATEGORY_LABELS[c.getValue()] }),
    col.accessor("severity", {
      id: "severity",
      header: "Severity",
      cell: (c) => <SeverityBadge severity={c.getValue()} />,
    }),
    col.accessor("status", {
      id: "status",
      header: "Status",
      cell: (c) => <StatusBadge status={c.getValue()} title={DEFECT_STATUS_LABELS[c.getValue()]} />,
    }),
    col.accessor("assigneeName", {
      id: "assignee",
      header: "Assignee",
      cell: (c) => c.getValue() ?? <span className="text-fog">Nobody</span>,
    }),
    col.accessor("dueOn", {
      id: "dueOn",
      header: "Due",
      cell: (c) => <span className="whitespace-nowrap font-mono">{c.getValue() ?? "—"}</span>,
    }),
    col.accessor("effortHours", {
      id: "effortHours",
      header: "Effort (h)",
      cell: (c) => <span className="font-mono">{c.getValue() ?? "—"}</span>,
    }),
    col.accessor("costEstimate", {
      id: "costEstimate",
      header: "Cost",
      cell: (c) => (
        <span className="whitespace-nowrap font-mono">
          <Money value={c.getValue()} whole />
        </span>
      ),
    }),
    col.accessor("createdAt", {
      id: "createdAt",
      header: "Raised",
      cell: (c) => <span className="font-mono">{date(c.getValue())}</span>,
    }),
    col.accessor("updatedAt", {
      id: "updatedAt",
      header: "Updated",
      cell: (c) => <span className="font-mono">{date(c.getValue())}</span>,
    }),
  ]);
}
export const DEFAULT_ORDER = [
  "select",
  "ref",
  "priority",
  "title",
  "board",
  "position",
  "category",
  "severity",
  "status",
  "assignee",
  "dueOn",
  "effortHours",
  "costEstimate",
  "createdAt",
  "updatedAt",
];

import {
  createColumnHelper,
  createSortedRowModel,
  rowSortingFeature,
  sortFn_alphanumeric,
  sortFn_basic,
  tableFeatures,
} from "@tanstack/react-table";
import { Link } from "react-router";
import { paths } from "../../../config/paths";
import { HERITAGE_RULES, PART_STATUSES } from "../../../domain/vocab";
import type { PartLine } from "../../../schemas/parts";
import { Money } from "../../../lib/money";
import { HeritageRuleBadge, PartStatusBadge } from "./badges";
import { positionHref } from "./links";

export const partsFeatures = tableFeatures({
  rowSortingFeature,
  sortedRowModel: createSortedRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric, basic: sortFn_basic },
});

const col = createColumnHelper<typeof partsFeatures, PartLine>();

export function partColumns(siteId: string) {
  return col.columns([
    col.accessor("title", {
      id: "part",
      header: "Part wanted",
      sortFn: "alphanumeric",
      cell: (c) => (
        <>
          <span className="block font-mono text-xs text-mist" data-testid="line-ref">
            {c.row.original.ref}
          </span>
          <Link to={paths.partLine.href(siteId, c.row.original.id)} className="font-semibold">
            {c.getValue()}
          </Link>
        </>
      ),
    }),
    col.accessor((r) => HERITAGE_RULES.indexOf(r.heritageRule), {
      id: "heritageRule",
      header: "Heritage rule",
      sortFn: "basic",
      cell: (c) => <HeritageRuleBadge rule={c.row.original.heritageRule} />,
    }),
    col.accessor("qty", {
      header: "Qty",
      sortFn: "basic",
      cell: (c) => <span className="font-mono">{c.getValue()}</span>,
    }),
    col.accessor(
      (r) =>
        r.positions
          .filter((p) => p.state === "active")
          .map((p) => p.designation ?? "")
          .join(", "),
      {
        id: "positions",
        header: "Positions",
        sortFn: "alphanumeric",
        cell: (c) => {
          const line = c.row.original;
          const ps = line.positions.filter((p) => p.state !== "withdrawn" && p.positionId && p.boardId);
          // The row carries the line's first LINKS_IN_ROW positions; the rest are on the line's own page.
          const more = line.linkCount - line.positions.length;
          if (!ps.length && more <= 0)
            return <span className="text-fog">{line.origin === "manual" ? "Spare / by hand" : "—"}</span>;
          return (
            <ul className="flex flex-wrap gap-1">
              {ps.map((p) => (
                <li key={p.linkId}>
                  <Link
                    to={positionHref(siteId, p.boardId!, p.positionId!)}
                    className="inline-flex min-h-8 items-center rounded bg-hull-800 px-1.5 font-mono text-sm wrap-anywhere"
                    title={p.boardName ?? ""}
                  >
                    {p.designation}
                    {p.defectId && <span className="sr-only"> (defect)</span>}
                  </Link>
                </li>
              ))}
              {more > 0 && (
                <li>
                  <Link
                    to={paths.partLine.href(siteId, line.id)}
                    className="inline-flex min-h-8 items-center px-1.5 text-sm"
                    data-testid="more-positions"
                    aria-label={`${more} more position${more === 1 ? "" : "s"} on line ${line.ref}`}
                  >
                    +{more} more
                  </Link>
                </li>
              )}
            </ul>
          );
        },
      },
    ),
    col.accessor((r) => PART_STATUSES.indexOf(r.status), {
      id: "status",
      header: "Status",
      sortFn: "basic",
      cell: (c) => <PartStatusBadge status={c.row.original.status} />,
    }),
    col.accessor("leadCount", {
      header: "Leads",
      sortFn: "basic",
      cell: (c) => <span className="font-mono">{c.getValue()}</span>,
    }),
    col.accessor((r) => r.estimated ?? -1, {
      id: "estimated",
      header: "Estimated / spent",
      sortFn: "basic",
      // One line in the table; on a phone's card the two amounts may take two.
      cell: (c) => (
        <span className="font-mono text-sm md:whitespace-nowrap">
          <span className="whitespace-nowrap">
            <Money value={c.row.original.estimated} /> /
          </span>{" "}
          <span className="whitespace-nowrap">
            <Money value={c.row.original.spent} />
          </span>
        </span>
      ),
    }),
  ]);
}

import { Link } from "react-router";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { EARTHING_LABELS } from "../../../domain/vocab";
import { inventoryCsvHref, useBoards } from "../../../features/inventory/api";
import { BoardThumbnail } from "../../../features/inventory/components/board-thumbnail";
import { can } from "../../../domain/permissions";
import { useSiteContext } from "../sites/site-layout";

const pct = (n: number, of: number) => (of ? Math.round((n / of) * 100) : 0);

export default function BoardListPage() {
  const { site, role } = useSiteContext();
  const q = useBoards(site.id);
  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-bold">Boards on {site.name}</h1>
          <p className="text-mist">Open a board to see its front, position by position.</p>
        </div>
        <div className="flex flex-wrap gap-2">
          <a
            href={inventoryCsvHref(site.id)}
            download
            className="inline-flex min-h-11 items-center rounded-md px-4 font-semibold ring-1 ring-hull-600 no-underline"
          >
            Export inventory CSV
          </a>
          {can(role, "inventory.curate") && (
            <>
              <Link
                to={paths.inventoryImport.href(site.id)}
                className="inline-flex min-h-11 items-center rounded-md px-4 font-semibold ring-1 ring-hull-600 no-underline"
              >
                Import CSV
              </Link>
              <Link
                to={paths.boardNew.href(site.id)}
                className="inline-flex min-h-11 items-center rounded-md bg-brass-400 px-4 font-semibold text-hull-950 no-underline"
              >
                New board
              </Link>
            </>
          )}
        </div>
      </header>
      {q.isPending && <Loading />}
      {(q.isLoadingError || serverRefused(q.error)) && <ErrorPanel error={q.error} />}
      {q.data?.length === 0 && (
        <EmptyState title="No boards yet">
          {can(role, "inventory.curate")
            ? "Add the first board, or import an inventory spreadsheet."
            : "The curator has not set up any boards yet."}
        </EmptyState>
      )}
      <ul className="grid gap-3 md:grid-cols-2">
        {q.data?.map((b) => (
          <li key={b.id} className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
            <Link to={paths.board.href(site.id, b.id)} className="text-lg font-bold text-chalk">
              {b.name}
            </Link>
            <p className="text-sm text-mist">
              {[
                b.location,
                `${b.nominalVolts} V`,
                `${b.phases}-phase`,
                `${b.frequencyHz} Hz`,
                EARTHING_LABELS[b.earthing],
                b.yearBuilt && `built ${b.yearBuilt}`,
              ]
                .filter(Boolean)
                .join(" · ")}
            </p>
            <div className="mt-3">
              <BoardThumbnail siteId={site.id} boardId={b.id} />
            </div>
            <p className="mt-1 text-xs text-fog">
              {b.waterLineMm != null
                ? `Flood line at ${b.waterLineMm} mm of the ${b.faceHeightMm ?? "?"} mm face`
                : "The water did not reach this face"}{" "}
              · cells filled by rust grade, hatched when the part is out
            </p>
            <p className="mt-3 text-sm">
              <span className="font-mono font-bold">{b.surveyedCount}</span> of{" "}
              <span className="font-mono">{b.positionCount}</span> positions surveyed (
              {pct(b.surveyedCount, b.positionCount)}%)
            </p>
            <div className="mt-1 h-2 rounded-full bg-hull-700" aria-hidden="true">
              <div
                className="h-2 rounded-full bg-brass-400"
                style={{ width: `${pct(b.surveyedCount, b.positionCount)}%` }}
              />
            </div>
            {can(role, "inventory.curate") && (
              <Link
                to={paths.boardSetup.href(site.id, b.id)}
                className="mt-3 inline-flex min-h-11 items-center text-sm"
              >
                Set up
              </Link>
            )}
          </li>
        ))}
      </ul>
    </div>
  );
}

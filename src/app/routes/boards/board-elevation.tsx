import { Suspense, useCallback, useMemo, useState, type ReactNode } from "react";
import { Link, useParams, useSearchParams } from "react-router";
import { CloseButton } from "../../../components/button";
import { laterPart } from "../../../components/later-part";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { EARTHING_LABELS } from "../../../domain/vocab";
import { BOARD_PAGE } from "../../../schemas/inventory";
import { useBoard, useBoardOnScreen } from "../../../features/inventory/api";
import { BoardElevation } from "../../../features/inventory/components/board-elevation";
import {
  ElevationFilters,
  NO_FILTERS,
  tileMatches,
  type TileFilters,
} from "../../../features/inventory/components/elevation-filters";
import { TileLegend } from "../../../features/inventory/components/tile-legend";
import { defectHref } from "../../../features/inventory/defect-link";
import { can } from "../../../domain/permissions";
import { useLoadWhenIdle } from "../../../lib/when-idle";
import { useSiteContext } from "../sites/site-layout";

/*
 * What the board page shows only once a tile is opened (the position's panel, its photos, its breaker operations) and
 * the ground-lamp card below the board come in chunks of their own, asked for when first drawn and, once the board is
 * on screen, at idle time. Imported with the page, their modules (forms, the photo viewer, the readings' and return
 * to service's schemas) were downloaded and evaluated before the board's first tile could be drawn: on a phone at
 * 4 × CPU slowdown about a third of a second of script and some fifteen requests of a cold load.
 */
const loadPanel = () => import("../../../features/inventory/components/position-panel");
const loadPhotos = () => import("../../../features/photos/components/position-photos");
const loadOperations = () => import("../../../features/return-to-service/components/breaker-operations");
const loadGroundCheck = () => import("../../../features/readings/components/latest-ground-check");
// The panel draws the photos and operations handed to it: all three are asked for at once, not one after another.
// Each says so in its own place, not as the page's error, when its chunk cannot be fetched (`laterPart`).
const PositionPanel = laterPart(
  "This position's panel",
  () => Promise.all([loadPanel(), loadPhotos(), loadOperations()]).then(([m]) => m.PositionPanel),
  { frame: (message, p) => <PanelFrame onClose={p.onClose}>{message}</PanelFrame> },
);
const PositionPhotos = laterPart("The position's photos", () => loadPhotos().then((m) => m.PositionPhotos));
const PanelOperations = laterPart("The breaker's operations", () => loadOperations().then((m) => m.PanelOperations));
const LatestGroundCheck = laterPart("The ground-lamp card", () => loadGroundCheck().then((m) => m.LatestGroundCheck));
const LATER = [loadGroundCheck, loadPanel, loadPhotos, loadOperations];

export default function BoardElevationPage() {
  const { site, role } = useSiteContext();
  const { boardId = "" } = useParams();
  const [search, setSearch] = useSearchParams();
  const [filters, setFilters] = useState<TileFilters>(NO_FILTERS);
  const q = useBoard(site.id, boardId);
  const onScreen = useBoardOnScreen(site.id, boardId, q.data);
  const selected = search.get("position");
  const select = useCallback(
    (id: string | null) => {
      setSearch(
        (s) => {
          if (id) s.set("position", id);
          else s.delete("position");
          return s;
        },
        { replace: true },
      );
    },
    [setSearch],
  );
  const close = useCallback(() => {
    const id = selected;
    select(null);
    // give focus back to the tile the panel was opened from
    setTimeout(() => (document.querySelector(`[data-position-id="${id}"]`) as HTMLElement | null)?.focus(), 0);
  }, [select, selected]);
  const matching = useMemo(
    () => onScreen.positions.filter((t) => tileMatches(t, filters)).length,
    [onScreen.positions, filters],
  );
  useLoadWhenIdle(!!q.data, LATER);
  if (q.isPending) return <Loading what="Drawing the board" />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  const { board, total, complete } = q.data;
  const { positions, comingRows, onRows } = onScreen;
  const tile = positions.find((t) => t.id === selected);
  return (
    <div className="space-y-4">
      <nav aria-label="Breadcrumb" className="text-sm [&_a]:underline">
        <Link to={paths.boards.href(site.id)}>Boards</Link> / {board.name}
      </nav>
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-bold">{board.name}</h1>
          <Link to={paths.rtsBoard.href(site.id, board.id)} className="text-sm underline">
            Return to service: stages, hold points and watch
          </Link>
          <p className="text-sm text-mist">
            {[
              board.location,
              `${board.nominalVolts} V`,
              board.phases === 3 ? "3-phase" : "1-phase",
              `${board.frequencyHz} Hz`,
              EARTHING_LABELS[board.earthing],
              board.yearBuilt ? `built ${board.yearBuilt}` : null,
              board.drawingRef ? `drawing ${board.drawingRef}` : null,
            ]
              .filter(Boolean)
              .join(" · ")}
          </p>
        </div>
        {can(role, "inventory.curate") && (
          <Link
            to={paths.boardSetup.href(site.id, board.id)}
            className="inline-flex min-h-11 items-center rounded-md px-4 font-semibold ring-1 ring-hull-600 no-underline"
          >
            Set up this board
          </Link>
        )}
      </header>
      <ElevationFilters value={filters} onChange={setFilters} matching={matching} total={total} />
      {/* A board read in pages keeps this line, read or not, so nothing below it moves when the last page comes. */}
      {total > BOARD_PAGE && (
        <p role="status" className="min-h-10 text-sm text-mist" data-testid="board-reading" data-complete={complete}>
          {complete
            ? `All ${total.toLocaleString("en")} positions read.`
            : `Read ${positions.length.toLocaleString("en")} of ${total.toLocaleString("en")} positions; the rest are coming.`}
        </p>
      )}
      {positions.length === 0 && complete ? (
        <p className="rounded-lg border border-dashed border-hull-500 p-6 text-center text-mist">
          No positions on this board yet.
        </p>
      ) : (
        <BoardElevation
          board={board}
          tiles={positions}
          total={total}
          complete={complete}
          comingRows={comingRows}
          onRows={onRows}
          filters={filters}
          selectedId={selected}
          onOpen={(t) => select(t.id)}
        />
      )}
      <TileLegend />
      <div className="grid gap-4 md:grid-cols-[1fr_auto] md:items-start">
        <Suspense fallback={<Loading what="Reading the ground lamps" />}>
          <LatestGroundCheck siteId={site.id} boardId={board.id} />
        </Suspense>
        <nav aria-label="More about this board" className="flex flex-col gap-2 text-sm">
          <Link
            className="inline-flex min-h-11 items-center rounded-md px-4 ring-1 ring-hull-600"
            to={paths.readingsBoard.href(site.id, board.id)}
          >
            Test readings of this board
          </Link>
          <Link
            className="inline-flex min-h-11 items-center rounded-md px-4 ring-1 ring-hull-600"
            to={paths.photoGallery.href(site.id, { boardId: board.id })}
          >
            Photos of this board
          </Link>
          <Link
            className="inline-flex min-h-11 items-center rounded-md px-4 ring-1 ring-hull-600"
            to={paths.defects.href(site.id, `board=${board.id}`)}
          >
            Defects on this board
          </Link>
        </nav>
      </div>
      {selected && (
        <Suspense fallback={<PanelOpening />}>
          <PositionPanel
            siteId={site.id}
            positionId={selected}
            canDecide={can(role, "inventory.curate")}
            onClose={close}
            photos={<PositionPhotos siteId={site.id} positionId={selected} />}
            extra={<PanelOperations siteId={site.id} boardId={board.id} positionId={selected} role={role} />}
            links={{
              readings: (componentId) => paths.readingsComponent.href(site.id, componentId),
              quickLog: can(role, "inventory.log") ? paths.quickLog.href(site.id, selected) : undefined,
              setup: can(role, "inventory.curate") ? paths.boardSetup.href(site.id, board.id, selected) : undefined,
              defect: can(role, "defects.raise")
                ? (latest) =>
                    defectHref(site.id, { positionId: selected, componentId: tile?.component?.id, inspection: latest })
                : undefined,
            }}
          />
        </Suspense>
      )}
    </div>
  );
}

/** The position panel's place while its code arrives, or when it could not (the panel is a full-height drawer on a phone). */
function PanelFrame({ children, onClose }: { children: ReactNode; onClose?: () => void }) {
  return (
    <div className="fixed inset-0 z-40 bg-hull-900 p-4 ring-1 ring-hull-600 md:inset-y-0 md:left-auto md:right-0 md:w-[28rem]">
      {onClose && (
        <div className="mb-2 flex justify-end">
          <CloseButton label="Close the position panel" onClick={onClose} />
        </div>
      )}
      {children}
    </div>
  );
}

function PanelOpening() {
  return (
    <PanelFrame>
      <Loading what="Opening the position" />
    </PanelFrame>
  );
}

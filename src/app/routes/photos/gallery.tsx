import { useMemo, useState } from "react";
import { useParams, useSearchParams } from "react-router";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { useBoardPhotoTargets, usePhotoBoards, usePhotoMutations, usePhotos } from "../../../features/photos/api";
import { ComparePhotos } from "../../../features/photos/components/compare-photos";
import { PhotoGrid } from "../../../features/photos/components/photo-grid";
import { PhotoViewer } from "../../../features/photos/components/photo-viewer";
import type { Photo } from "../../../schemas/photos";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";
import { useSitePositionSearch } from "./position-search";

export default function GalleryPage() {
  const { siteId = "" } = useParams();
  const { role } = useSiteContext();
  const [params, setParams] = useSearchParams();
  const positionId = params.get("positionId") ?? undefined;
  const boards = usePhotoBoards(siteId);
  const photos = usePhotos(
    siteId,
    positionId ? { positionId } : { boardId: params.get("boardId") ?? boards.data?.[0]?.id },
    !!(positionId || params.get("boardId") || boards.data?.length),
  );
  // A position's board: from the link when it says, else from its photos; its designation from that board's
  // positions (one board, read when a position is shown), else from its photos.
  const boardId = params.get("boardId") ?? (positionId ? photos.data?.[0]?.boardId : boards.data?.[0]?.id) ?? undefined;
  const boardTargets = useBoardPhotoTargets(siteId, positionId ? boardId : undefined);
  const designation =
    boardTargets.data?.find((t) => t.positionId === positionId)?.designation ??
    photos.data?.find((p) => p.positionId === positionId)?.designation;
  // Which group is open (null: the position's own list) and where; the list itself is read
  // from the query each render, so edits made in the viewer show at once.
  const [open, setOpen] = useState<{ group: string | null; i: number } | null>(null);
  const { remove } = usePhotoMutations(siteId);

  const groups = useMemo(() => {
    const m = new Map<string, Photo[]>();
    for (const p of photos.data ?? [])
      m.set(p.designation ?? "Board (no position)", [...(m.get(p.designation ?? "Board (no position)") ?? []), p]);
    return [...m.entries()].sort(([a], [b]) => a.localeCompare(b, undefined, { numeric: true }));
  }, [photos.data]);

  const openList: Photo[] = !open
    ? []
    : open.group === null
      ? (photos.data ?? [])
      : (groups.find(([d]) => d === open.group)?.[1] ?? []);

  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">
        {positionId
          ? designation
            ? `Photos of position ${designation}`
            : "Photos of this position"
          : "Photos by board"}
      </h1>
      <label className="block max-w-md text-sm font-semibold text-mist">
        Board
        <select
          className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
          value={boardId ?? ""}
          onChange={(e) => setParams({ boardId: e.target.value })}
        >
          {(boards.data ?? []).map((b) => (
            <option key={b.id} value={b.id}>
              {b.name}
            </option>
          ))}
        </select>
      </label>
      {photos.isPending && (positionId || boardId) ? (
        <Loading what="Loading photos" />
      ) : photos.isLoadingError || serverRefused(photos.error) ? (
        <ErrorPanel error={photos.error} />
      ) : !photos.data?.length ? (
        <EmptyState title="No photos here yet">
          The photographer's uploads appear here once filed to a position.
        </EmptyState>
      ) : positionId ? (
        <>
          <PhotoGrid siteId={siteId} photos={photos.data} onOpen={(i) => setOpen({ group: null, i })} />
          <ComparePhotos key={positionId} siteId={siteId} photos={photos.data} />
        </>
      ) : (
        groups.map(([designation, list]) => (
          <section key={designation} aria-label={`Position ${designation}`} className="space-y-1">
            <h2 className="font-mono font-semibold">
              {list[0].positionId ? (
                <button
                  type="button"
                  className="min-h-11 underline"
                  onClick={() => setParams({ positionId: list[0].positionId! })}
                >
                  {designation}
                </button>
              ) : (
                designation
              )}
              <span className="ml-2 font-sans text-sm text-mist">
                {list.length} photo{list.length === 1 ? "" : "s"}
              </span>
            </h2>
            <PhotoGrid siteId={siteId} photos={list} onOpen={(i) => setOpen({ group: designation, i })} compact />
          </section>
        ))
      )}
      {open && openList.length > 0 && (
        <PhotoViewer
          siteId={siteId}
          photos={openList}
          index={Math.min(open.i, openList.length - 1)}
          onIndex={(i) => setOpen({ ...open, i })}
          onClose={() => setOpen(null)}
          canDownloadOriginal={can(role, "photos.original")}
          tagging={
            can(role, "photos.file") ? { boards: boards.data ?? [], useSiteSearch: useSitePositionSearch } : undefined
          }
          onDelete={
            can(role, "photos.delete")
              ? (p) => {
                  if (window.confirm("Delete this photo? It is kept for 30 days, then purged."))
                    remove.mutate(p.id, { onSuccess: () => setOpen(null) });
                }
              : undefined
          }
        />
      )}
    </div>
  );
}

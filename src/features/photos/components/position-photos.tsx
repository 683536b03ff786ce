import { useState } from "react";
import { Link } from "react-router";
import { serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { usePhotos } from "../api";
import { PhotoGrid } from "./photo-grid";
import { PhotoViewer } from "./photo-viewer";

/**
 * Self-contained strip for the position side panel: the position's thumbnails, the
 * full-screen viewer on click, and a link to its gallery (with before/after).
 */
export function PositionPhotos({ siteId, positionId }: { siteId: string; positionId: string }) {
  const photos = usePhotos(siteId, { positionId });
  const [open, setOpen] = useState<number | null>(null);
  if (photos.isPending)
    return (
      <p className="text-sm text-mist" role="status">
        Loading photos…
      </p>
    );
  if (photos.isLoadingError || serverRefused(photos.error))
    return (
      <p className="text-sm text-flare-300" role="alert">
        Photos could not be loaded.
      </p>
    );
  const list = photos.data;
  return (
    <section aria-label="Photos of this position" className="space-y-2">
      <div className="flex items-center justify-between">
        <h3 className="font-semibold">Photos ({list.length})</h3>
        <Link to={paths.photoGallery.href(siteId, { positionId })} className="text-sm underline">
          Gallery and before/after
        </Link>
      </div>
      {list.length ? (
        <PhotoGrid siteId={siteId} photos={list} onOpen={setOpen} compact />
      ) : (
        <p className="text-sm text-mist">No photos yet.</p>
      )}
      {open !== null && (
        <PhotoViewer siteId={siteId} photos={list} index={open} onIndex={setOpen} onClose={() => setOpen(null)} />
      )}
    </section>
  );
}

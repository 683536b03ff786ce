import { PHOTO_KIND_LABELS } from "../../../domain/vocab";
import type { Photo } from "../../../schemas/photos";
import { RenditionImage } from "./rendition-image";

/** Thumbnails as buttons (they open the viewer); each labelled with what it shows. */
export function PhotoGrid({
  siteId,
  photos,
  onOpen,
  compact = false,
}: {
  siteId: string;
  photos: Photo[];
  onOpen: (i: number) => void;
  compact?: boolean;
}) {
  return (
    <ul
      className={compact ? "flex gap-2 overflow-x-auto pb-1" : "grid grid-cols-2 gap-2 sm:grid-cols-4 lg:grid-cols-6"}
    >
      {photos.map((p, i) => (
        <li key={p.id} className={compact ? "shrink-0" : ""}>
          <button
            type="button"
            onClick={() => onOpen(i)}
            className="group block w-full overflow-hidden rounded-md bg-hull-800 text-left ring-1 ring-hull-700 hover:ring-brass-400"
            aria-label={`Open photo: ${PHOTO_KIND_LABELS[p.kind]}${p.designation ? `, position ${p.designation}` : ""}${p.caption ? `, ${p.caption}` : ""}`}
          >
            <RenditionImage
              siteId={siteId}
              photo={p}
              rendition="thumb"
              alt=""
              className={compact ? "h-20 w-28 object-cover" : "aspect-[4/3] w-full object-cover"}
            />
            {!compact && (
              <span className="block truncate px-2 py-1 text-xs text-mist">
                {PHOTO_KIND_LABELS[p.kind]}
                {p.designation ? ` · ${p.designation}` : ""}
              </span>
            )}
          </button>
        </li>
      ))}
    </ul>
  );
}

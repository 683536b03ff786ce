import { useId } from "react";
import { PHOTO_KIND_LABELS, type PhotoKind } from "../../../domain/vocab";
import type { Photo } from "../../../schemas/photos";
import { photoUrl, usePhotos } from "../api";
import { RenditionImage } from "./rendition-image";
import { stamp as when } from "../../../lib/clock";

/**
 * Pick one of a component's photos of a kind (the thermal image of a scan) by its thumbnail:
 * radio buttons named `name` inside the caller's form, "None" first. Newest first; a person never
 * types or sees an internal photo id.
 */
export function PhotoPicker({
  siteId,
  componentId,
  positionId,
  kind,
  name,
  legend,
  error,
}: {
  siteId: string;
  componentId: string;
  /** When known, the position's photos are offered (where the photo desk files them); else the component's. */
  positionId?: string;
  kind: PhotoKind;
  name: string;
  legend: string;
  error?: string;
}) {
  const id = useId();
  const q = usePhotos(siteId, positionId ? { positionId, kind } : { componentId, kind }, !!(positionId || componentId));
  const photos = [...(q.data ?? [])].sort((a, b) =>
    (b.capturedAt ?? b.createdAt).localeCompare(a.capturedAt ?? a.createdAt),
  );
  return (
    <fieldset className="sm:col-span-2" aria-describedby={error ? `${id}-error` : `${id}-hint`}>
      <legend className="text-sm font-semibold text-mist">{legend}</legend>
      <p id={`${id}-hint`} className="text-xs text-fog">
        {q.isPending
          ? "Looking for this component's photos…"
          : photos.length
            ? `${positionId ? "This position's" : "This component's"} photos filed as "${PHOTO_KIND_LABELS[kind].toLowerCase()}", newest first.`
            : `No photo of this ${positionId ? "position" : "component"} is filed as "${PHOTO_KIND_LABELS[kind].toLowerCase()}" yet: upload it from the board's position panel or the photo desk, then pick it here.`}
      </p>
      <div className="mt-2 flex flex-wrap gap-2">
        <label className="flex min-h-11 cursor-pointer items-center gap-2 rounded-md px-3 ring-1 ring-hull-600 has-[:checked]:ring-2 has-[:checked]:ring-brass-300">
          <input type="radio" name={name} value="" defaultChecked className="h-5 w-5 accent-brass-400" />
          None
        </label>
        {photos.map((p) => (
          <label
            key={p.id}
            className="flex w-32 cursor-pointer flex-col gap-1 rounded-md p-1 ring-1 ring-hull-600 has-[:checked]:ring-2 has-[:checked]:ring-brass-300"
          >
            <RenditionImage
              siteId={siteId}
              photo={p}
              rendition="thumb"
              alt=""
              className="aspect-[4/3] w-full rounded object-cover"
            />
            <span className="flex items-start gap-1 text-xs">
              <input type="radio" name={name} value={p.id} className="mt-0.5 h-4 w-4 shrink-0 accent-brass-400" />
              <span className="min-w-0 break-words">
                {p.caption || p.originalName}
                <span className="block text-fog">{when(p.capturedAt ?? p.createdAt)}</span>
              </span>
            </span>
          </label>
        ))}
      </div>
      {error && (
        <p id={`${id}-error`} role="alert" className="mt-1 text-sm text-flare-300">
          {error}
        </p>
      )}
    </fieldset>
  );
}

/** A small picture of a photo (a reading's thermal image), opening the full-size copy. */
export function PhotoThumb({ siteId, photo, alt }: { siteId: string; photo: Photo; alt: string }) {
  return (
    <a href={photoUrl(siteId, photo.id, "display")} target="_blank" rel="noreferrer" className="inline-block">
      <RenditionImage
        siteId={siteId}
        photo={photo}
        rendition="thumb"
        alt={alt}
        className="h-24 w-32 rounded object-cover"
      />
    </a>
  );
}

/** The photos with these ids, in one request, by id (for a list of readings that each name one). */
export function usePhotoMap(siteId: string, ids: string[]): Map<string, Photo> {
  const unique = [...new Set(ids)].sort();
  const q = usePhotos(siteId, { ids: unique }, unique.length > 0);
  return new Map((q.data ?? []).map((p) => [p.id, p]));
}

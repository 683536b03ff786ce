import type { Photo } from "../../../schemas/photos";
import { photoUrl } from "../api";

/**
 * A photo's display copy or thumbnail, once the background job has made it. Until then
 * a plain panel says it is being processed (the list refetches while any photo is); a
 * photo whose processing failed says why, so the photographer can upload it again.
 */
export function RenditionImage({
  siteId,
  photo,
  rendition,
  alt,
  className,
}: {
  siteId: string;
  photo: Photo;
  rendition: "thumb" | "display";
  alt: string;
  className?: string;
}) {
  if (photo.renditionState === "ready")
    return <img src={photoUrl(siteId, photo.id, rendition)} alt={alt} loading="lazy" className={className} />;
  const failed = photo.renditionState === "failed";
  return (
    <span
      role="img"
      aria-label={failed ? `${alt ? `${alt}: ` : ""}could not be processed` : `${alt ? `${alt}: ` : ""}processing`}
      className={`${className ?? ""} flex flex-col items-center justify-center gap-1 border border-dashed ${failed ? "border-flare-400 text-flare-300" : "border-hull-600 text-mist"} bg-hull-900 p-2 text-center text-xs`}
    >
      <span className="font-semibold">{failed ? "Not processed" : "Processing…"}</span>
      {failed && photo.renditionError && <span className="line-clamp-3">{photo.renditionError}</span>}
    </span>
  );
}

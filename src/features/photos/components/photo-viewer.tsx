import { useEffect, useLayoutEffect, useRef } from "react";
import { PHOTO_KIND_LABELS } from "../../../domain/vocab";
import type { Photo, PhotoTargetBoard } from "../../../schemas/photos";
import { photoUrl } from "../api";
import { PhotoTagForm } from "./photo-tag-form";
import type { UseSiteSearch } from "./position-picker";
import { RenditionImage } from "./rendition-image";
import { stamp } from "../../../lib/clock";

interface Props {
  siteId: string;
  photos: Photo[];
  index: number;
  onIndex: (i: number) => void;
  onClose: () => void;
  canDownloadOriginal?: boolean;
  onDelete?: (p: Photo) => void;
  /** Given to those who may tag (photographer, curator): the form under the picture, with where photos can go. */
  tagging?: { boards: PhotoTargetBoard[]; useSiteSearch?: UseSiteSearch };
}

const btn =
  "min-h-11 min-w-11 rounded-md bg-hull-800 px-3 font-semibold text-chalk ring-1 ring-hull-600 hover:bg-hull-700";

/**
 * Full screen, one photo at a time: ← and → step through, Esc closes. A native modal `<dialog>` (HTML's
 * `showModal()`): it is drawn in the top layer over everything, whatever stacking the page beneath has made, and
 * the page beneath is inert, so Tab and a screen reader stay on the photo; the page does not scroll behind it
 * (index.css, `html:has(dialog:modal)`).
 */
export function PhotoViewer({
  siteId,
  photos,
  index,
  onIndex,
  onClose,
  canDownloadOriginal,
  onDelete,
  tagging,
}: Props) {
  const close = useRef<HTMLButtonElement>(null);
  const dialog = useRef<HTMLDialogElement>(null);
  const p = photos[index];
  const shown = !!p;
  // Before the first paint, so the dialog is never drawn in the page's flow first.
  useLayoutEffect(() => {
    const d = dialog.current;
    if (!d) return;
    const opener = document.activeElement as HTMLElement | null;
    if (!d.open) d.showModal();
    close.current?.focus();
    return () => {
      if (d.open) d.close();
      opener?.focus?.();
    };
  }, [shown]);
  useEffect(() => {
    const key = (e: KeyboardEvent) => {
      // Arrows inside the tag form move the caret, not the photo.
      if (e.target instanceof HTMLElement && e.target.closest("form") && e.key !== "Escape") return;
      if (e.key === "Escape") onClose();
      else if (e.key === "ArrowRight") onIndex(Math.min(photos.length - 1, index + 1));
      else if (e.key === "ArrowLeft") onIndex(Math.max(0, index - 1));
      else return;
      e.preventDefault();
    };
    window.addEventListener("keydown", key);
    return () => window.removeEventListener("keydown", key);
  }, [index, photos.length, onIndex, onClose]);
  if (!p) return null;
  const title = [p.designation && `Position ${p.designation}`, PHOTO_KIND_LABELS[p.kind]].filter(Boolean).join(" · ");
  return (
    <dialog
      ref={dialog}
      aria-label={`Photo ${index + 1} of ${photos.length}: ${title}`}
      // Esc is handled with the arrows above; the dialog's own cancel (Esc, a phone's back gesture) closes the same way.
      onCancel={(e) => {
        e.preventDefault();
        onClose();
      }}
      // A close by the browser itself (a back gesture with no cancel before it) leaves the viewer in step.
      onClose={onClose}
      className="fixed inset-0 m-0 open:flex h-full max-h-none w-full max-w-none flex-col overflow-y-auto bg-hull-950 p-0 text-chalk backdrop:bg-hull-950"
    >
      <div className="flex flex-wrap items-center gap-2 p-2">
        <p className="flex-1 text-sm text-chalk">
          <span className="font-semibold">{title}</span>
          <span className="text-mist">
            {" "}
            — {index + 1} of {photos.length}
            {p.boardName ? ` · ${p.boardName}` : ""}
          </span>
        </p>
        {canDownloadOriginal && (
          <a className={`${btn} inline-flex items-center no-underline`} href={photoUrl(siteId, p.id, "original")}>
            Original
          </a>
        )}
        {onDelete && (
          <button type="button" className={btn} onClick={() => onDelete(p)}>
            Delete
          </button>
        )}
        <button ref={close} type="button" className={btn} onClick={onClose}>
          Close
        </button>
      </div>
      <div className="relative flex min-h-0 flex-1 items-center justify-center">
        <RenditionImage
          siteId={siteId}
          photo={p}
          rendition="display"
          alt={p.caption || title}
          className="max-h-full max-w-full object-contain"
        />
        <button
          type="button"
          className={`${btn} absolute left-2`}
          onClick={() => onIndex(Math.max(0, index - 1))}
          disabled={index === 0}
          aria-label="Previous photo"
        >
          ←
        </button>
        <button
          type="button"
          className={`${btn} absolute right-2`}
          onClick={() => onIndex(Math.min(photos.length - 1, index + 1))}
          disabled={index === photos.length - 1}
          aria-label="Next photo"
        >
          →
        </button>
      </div>
      <p className="p-3 text-sm text-mist">
        {p.caption || "No caption."} {p.capturedAt && <>· taken {stamp(p.capturedAt)}</>}{" "}
        {p.cameraModel && <>· {p.cameraModel}</>} · {p.width}×{p.height}
      </p>
      {tagging && (
        <PhotoTagForm siteId={siteId} photo={p} boards={tagging.boards} useSiteSearch={tagging.useSiteSearch} />
      )}
    </dialog>
  );
}

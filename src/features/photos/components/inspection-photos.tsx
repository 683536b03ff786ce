import { useState } from "react";
import { PHOTO_KINDS, PHOTO_KIND_LABELS, type PhotoKind } from "../../../domain/vocab";
import { usePhotoMutations, usePhotos } from "../api";
import { useUploadQueue } from "../use-upload-queue";
import { PhotoGrid } from "./photo-grid";
import { PhotoViewer } from "./photo-viewer";
import { UploadList } from "./upload-list";

/**
 * For the inspection form (volunteers may attach photos to their own inspections): take
 * or pick photos, see them upload, and the inspection's photos so far. Self-contained
 * (props: siteId, inspectionId) so the inventory screens can compose it.
 */
export function InspectionPhotos({ siteId, inspectionId }: { siteId: string; inspectionId: string }) {
  const [kind, setKind] = useState<PhotoKind>("damage");
  const photos = usePhotos(siteId, { inspectionId });
  const { invalidate } = usePhotoMutations(siteId);
  const queue = useUploadQueue(siteId, () => void invalidate());
  const [open, setOpen] = useState<number | null>(null);
  const list = photos.data ?? [];
  return (
    <section aria-label="Photos of this inspection" className="space-y-2">
      <div className="flex flex-wrap items-end gap-2">
        <label className="text-sm font-semibold text-mist">Kind
          <select className="mt-1 block min-h-11 rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk" value={kind} onChange={(e) => setKind(e.target.value as PhotoKind)}>
            {PHOTO_KINDS.map((k) => <option key={k} value={k}>{PHOTO_KIND_LABELS[k]}</option>)}
          </select>
        </label>
        <label className="inline-flex min-h-11 cursor-pointer items-center rounded-md bg-hull-800 px-4 font-semibold text-chalk ring-1 ring-hull-600 hover:bg-hull-700">
          Add photos
          <input type="file" accept="image/*" capture="environment" multiple className="sr-only"
            onChange={(e) => { queue.add([...(e.target.files ?? [])], { kind, caption: "", inspectionId }); e.target.value = ""; }} />
        </label>
      </div>
      <UploadList items={queue.items} onRetry={queue.retry} />
      {list.length > 0 && <PhotoGrid siteId={siteId} photos={list} onOpen={setOpen} compact />}
      {open !== null && <PhotoViewer siteId={siteId} photos={list} index={open} onIndex={setOpen} onClose={() => setOpen(null)} />}
    </section>
  );
}

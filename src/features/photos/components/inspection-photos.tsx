import { useState } from "react";
import { PHOTO_KINDS, PHOTO_KIND_LABELS, type PhotoKind } from "../../../domain/vocab";
import { queuePhoto, useOutbox } from "../../../lib/outbox";
import { usePhotoMutations, usePhotos } from "../api";
import { useUploadQueue } from "../use-upload-queue";
import { PhotoGrid } from "./photo-grid";
import { PhotoViewer } from "./photo-viewer";
import { UploadList } from "./upload-list";

/**
 * For the quick log (volunteers may attach photos to their own inspections and custody
 * moves) and a defect's evidence: take or pick photos (the phone's camera), see them upload,
 * and the photos so far. Self-contained (siteId and one of inspectionId / custodyMoveId /
 * defectId) so other screens can compose it.
 */
export function InspectionPhotos({
  siteId,
  inspectionId,
  custodyMoveId,
  defectId,
  pendingParent,
  defaultKind = "damage",
  label = "Photos of this inspection",
  onUploaded,
}: {
  siteId: string;
  /** The inspection or move is itself waiting in the outbox (no signal): its photos wait for it. */
  pendingParent?: { itemId: string; field: "inspectionId" | "custodyMoveId" | "defectId" };
  inspectionId?: string;
  custodyMoveId?: string;
  defectId?: string;
  defaultKind?: PhotoKind;
  label?: string;
  /** Called when an upload has been saved (a defect's evidence counts after-work photos). */
  onUploaded?: () => void;
}) {
  const [kind, setKind] = useState<PhotoKind>(defaultKind);
  const photos = usePhotos(siteId, { inspectionId, custodyMoveId, defectId });
  const { invalidate } = usePhotoMutations(siteId);
  const queue = useUploadQueue(siteId, (p) => {
    void invalidate([p]);
    onUploaded?.();
  });
  const [open, setOpen] = useState<number | null>(null);
  const outbox = useOutbox();
  const [kept, setKept] = useState<string[]>([]);
  const list = pendingParent ? [] : (photos.data ?? []);
  const keptHere = outbox.items.filter((i) => kept.includes(i.id));
  function add(files: File[]) {
    if (pendingParent || !outbox.online) {
      // No signal, or the record is not on the server yet: the pictures wait in the outbox.
      for (const f of files)
        void queuePhoto({
          siteId,
          label: `Photo ${f.name}`,
          file: f,
          name: f.name,
          fields: Object.fromEntries(
            Object.entries({ kind, inspectionId, custodyMoveId, defectId }).filter(([, v]) => !!v),
          ) as Record<string, string>,
          dependsOn: pendingParent,
        }).then((item) => setKept((k) => [...k, item.id]));
      return;
    }
    queue.add(files, { kind, caption: "", inspectionId, custodyMoveId, defectId });
  }
  return (
    <section aria-label={label} className="space-y-2">
      <div className="flex flex-wrap items-end gap-2">
        <label className="text-sm font-semibold text-mist">
          Kind
          <select
            className="mt-1 block min-h-11 rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
            value={kind}
            onChange={(e) => setKind(e.target.value as PhotoKind)}
          >
            {PHOTO_KINDS.map((k) => (
              <option key={k} value={k}>
                {PHOTO_KIND_LABELS[k]}
              </option>
            ))}
          </select>
        </label>
        <label className="inline-flex min-h-11 cursor-pointer items-center rounded-md bg-hull-800 px-4 font-semibold text-chalk ring-1 ring-hull-600 hover:bg-hull-700">
          Add photos
          <input
            type="file"
            accept="image/*"
            capture="environment"
            multiple
            className="sr-only"
            onChange={(e) => {
              add([...(e.target.files ?? [])]);
              e.target.value = "";
            }}
          />
        </label>
      </div>
      <UploadList items={queue.items} onRetry={queue.retry} />
      {keptHere.length > 0 && (
        <ul className="space-y-1 text-sm" aria-label="Photos waiting on this phone">
          {keptHere.map((i) => (
            <li key={i.id} className="rounded bg-hull-850 px-2 py-1 text-tide-300" data-testid="photo-pending">
              {i.photo?.name} — waiting to send
            </li>
          ))}
        </ul>
      )}
      {list.length > 0 && <PhotoGrid siteId={siteId} photos={list} onOpen={setOpen} compact />}
      {open !== null && (
        <PhotoViewer siteId={siteId} photos={list} index={open} onIndex={setOpen} onClose={() => setOpen(null)} />
      )}
    </section>
  );
}

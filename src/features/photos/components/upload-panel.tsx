import { useEffect, useRef, useState } from "react";
import { useDropzone } from "react-dropzone";
import { SelectField, TextField } from "../../../components/field";
import { PHOTO_KINDS, PHOTO_KIND_LABELS, type PhotoKind } from "../../../domain/vocab";
import type { Photo, PhotoTargetBoard } from "../../../schemas/photos";
import { useUploadQueue } from "../use-upload-queue";
import { PositionPicker, type Place, type UseSiteSearch } from "./position-picker";
import { UploadList } from "./upload-list";

/** The browser's hint only; the server decides the type from the bytes. */
const ACCEPT = {
  "image/jpeg": [".jpg", ".jpeg"],
  "image/png": [".png"],
  "image/webp": [".webp"],
  "image/heic": [".heic"],
  "image/heif": [".heif"],
  "image/tiff": [".tif", ".tiff"],
};

export function UploadPanel({
  siteId,
  boards,
  useSiteSearch,
  onUploaded,
}: {
  siteId: string;
  boards: PhotoTargetBoard[];
  useSiteSearch?: UseSiteSearch;
  onUploaded?: (p: Photo) => void;
}) {
  const [kind, setKind] = useState<PhotoKind>("as_found");
  const [caption, setCaption] = useState("");
  const [place, setPlace] = useState<Place>({ boardId: "", positionId: "" });
  const where = { boardId: place.boardId || undefined, positionId: place.positionId || undefined };
  const queue = useUploadQueue(siteId, onUploaded);
  // New files bring their progress into view: on a phone it starts below the fold, under the form and the drop area.
  const progress = useRef<HTMLParagraphElement>(null);
  const count = queue.items.length;
  const seen = useRef(count);
  useEffect(() => {
    if (count > seen.current) progress.current?.scrollIntoView({ block: "nearest", behavior: "smooth" });
    seen.current = count;
  }, [count]);
  const { getRootProps, getInputProps, isDragActive, open } = useDropzone({
    accept: ACCEPT,
    multiple: true,
    noClick: true,
    onDrop: (files) => queue.add(files, { kind, caption, ...where }),
  });
  const done = queue.items.filter((i) => i.state === "done").length;

  return (
    <section aria-labelledby="upload-title" className="space-y-3">
      <h2 id="upload-title" className="text-xl font-bold">
        Upload a shoot
      </h2>
      <div className="grid gap-3 sm:grid-cols-2">
        <SelectField
          label="Kind of shot"
          value={kind}
          onChange={(e) => setKind(e.target.value as PhotoKind)}
          hint="A file named for its kind (…_nameplate.jpg, …_after.jpg) is filed as that kind."
        >
          {PHOTO_KINDS.map((k) => (
            <option key={k} value={k}>
              {PHOTO_KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <TextField
          label="Caption (optional)"
          value={caption}
          maxLength={500}
          onChange={(e) => setCaption(e.target.value)}
        />
        <fieldset className="sm:col-span-2">
          <legend className="text-sm font-semibold text-mist">File to (optional)</legend>
          <p id="upload-place-hint" className="text-xs text-fog">
            Choose the board, then the position, or type to find one. Or leave it and assign after the upload.
          </p>
          <PositionPicker
            siteId={siteId}
            boards={boards}
            value={place}
            onChange={setPlace}
            useSiteSearch={useSiteSearch}
            noBoard="Assign later"
            noPosition="The board itself"
            describedBy="upload-place-hint"
          />
        </fieldset>
      </div>
      <div
        {...getRootProps()}
        className={`rounded-lg border-2 border-dashed p-6 text-center ${isDragActive ? "border-brass-400 bg-hull-800" : "border-hull-500"}`}
        data-testid="dropzone"
      >
        <input {...getInputProps()} aria-label="Choose photos" data-testid="photo-input" />
        <p className="text-mist">{isDragActive ? "Drop the photos here" : "Drop photos here, or"}</p>
        <div className="mt-2 flex flex-wrap justify-center gap-2">
          <button
            type="button"
            onClick={open}
            className="min-h-11 rounded-md bg-brass-400 px-4 font-semibold text-hull-950 hover:bg-brass-300"
          >
            Choose photos
          </button>
          {/* A second input with capture: on a phone it opens the camera; the first still picks from the library. */}
          <label className="inline-flex min-h-11 cursor-pointer items-center rounded-md bg-hull-800 px-4 font-semibold text-chalk ring-1 ring-hull-600 hover:bg-hull-700">
            Take a photo
            <input
              type="file"
              accept="image/*"
              capture="environment"
              className="sr-only"
              onChange={(e) => {
                queue.add([...(e.target.files ?? [])], { kind, caption, ...where });
                e.target.value = "";
              }}
            />
          </label>
        </div>
        <p className="mt-2 text-xs text-fog">
          JPEG, PNG, WebP, HEIC/HEIF or TIFF, up to 40 MB each. Three upload at a time.
        </p>
      </div>
      {queue.items.length > 0 && (
        <p ref={progress} className="scroll-mb-24 text-sm text-mist" aria-live="polite" data-testid="upload-summary">
          {done} of {queue.items.length} uploaded{queue.inFlight ? " — keep this page open until they finish." : "."}
        </p>
      )}
      <UploadList items={queue.items} onRetry={queue.retry} />
    </section>
  );
}

import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { ApiError } from "../../../lib/api-client";
import { PHOTO_KINDS, PHOTO_KIND_LABELS, type PhotoKind } from "../../../domain/vocab";
import type { Photo, PhotoTarget } from "../../../schemas/photos";
import { usePhotoMutations } from "../api";

const control = "mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk";

/** Kind, caption and position of one photo; a stale edit shows the photo as it is now (409). */
export function PhotoTagForm({
  siteId,
  photo,
  targets,
  onSaved,
}: {
  siteId: string;
  photo: Photo;
  targets: PhotoTarget[];
  onSaved?: (p: Photo) => void;
}) {
  const [base, setBase] = useState(photo);
  const [kind, setKind] = useState<PhotoKind>(photo.kind);
  const [caption, setCaption] = useState(photo.caption);
  const [positionId, setPositionId] = useState(photo.positionId ?? "");
  const [message, setMessage] = useState("");
  const { patch } = usePhotoMutations(siteId);
  const reset = (p: Photo) => {
    setBase(p);
    setKind(p.kind);
    setCaption(p.caption);
    setPositionId(p.positionId ?? "");
  };
  // Another photo opened in the same form starts from that photo: adjusted while rendering (React's "storing information from previous renders"), not in an effect.
  const [formFor, setFormFor] = useState(photo.id);
  if (formFor !== photo.id) {
    setFormFor(photo.id);
    reset(photo);
    setMessage("");
  }

  const submit = (e: FormEvent) => {
    e.preventDefault();
    patch.mutate(
      {
        id: base.id,
        version: base.version,
        kind,
        caption,
        ...(positionId !== (base.positionId ?? "")
          ? { positionId: positionId || null, boardId: positionId ? undefined : base.boardId }
          : {}),
      },
      {
        onSuccess: (p) => {
          reset(p);
          setMessage("✓ Saved.");
          onSaved?.(p);
        },
        onError: (err) => {
          if (err instanceof ApiError && err.status === 409 && err.current) {
            reset(err.current as Photo);
            setMessage("Someone changed this photo meanwhile; the form now shows their version. Edit again if needed.");
          } else setMessage(err.message);
        },
      },
    );
  };
  return (
    <form
      onSubmit={submit}
      className="grid gap-2 p-3 sm:grid-cols-[10rem_minmax(0,1fr)_14rem_auto] sm:items-end"
      aria-label="Tag this photo"
    >
      <label className="text-sm font-semibold text-mist">
        Kind
        <select className={control} value={kind} onChange={(e) => setKind(e.target.value as PhotoKind)}>
          {PHOTO_KINDS.map((k) => (
            <option key={k} value={k}>
              {PHOTO_KIND_LABELS[k]}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm font-semibold text-mist">
        Caption
        <input className={control} value={caption} maxLength={500} onChange={(e) => setCaption(e.target.value)} />
      </label>
      <label className="text-sm font-semibold text-mist">
        Position
        <select className={control} value={positionId} onChange={(e) => setPositionId(e.target.value)}>
          <option value="">Not filed to a position</option>
          {targets.map((t) => (
            <option key={t.positionId} value={t.positionId}>
              {t.designation} · {t.boardName}
            </option>
          ))}
        </select>
      </label>
      <Button type="submit" disabled={patch.isPending}>
        Save tags
      </Button>
      {message && (
        <p role="status" className="text-sm text-mist sm:col-span-4">
          {message}
        </p>
      )}
    </form>
  );
}

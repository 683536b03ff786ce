import { PHOTO_KINDS, PHOTO_KIND_LABELS, type PhotoKind } from "../../../domain/vocab";
import type { Photo } from "../../../schemas/photos";

export interface Staged {
  positionId: string;
  /** What the row shows of the position (the site's positions are not all on the phone to look it up). */
  designation: string;
  boardName: string;
  kind: PhotoKind;
  /** Where the kind came from: the file name said it, the photographer chose it, or the upload's kind. */
  kindFrom: "file name" | "chosen" | "upload";
  source: "typed" | "tag in file name" | "designation in file name";
}

const cols = "sm:grid-cols-[minmax(0,2fr)_minmax(0,1.2fr)_minmax(9rem,1fr)_minmax(0,1fr)_auto]";

/**
 * What will be saved, before it is: file → position, the kind of shot (changeable here) and how
 * the match was made. A list laid out as columns from a tablet up and as cards on a phone, so a
 * long file name wraps instead of widening the page.
 */
export function AssignmentTable({
  photos,
  staged,
  onRemove,
  onKind,
}: {
  photos: Photo[];
  staged: Record<string, Staged>;
  onRemove: (id: string) => void;
  onKind: (photo: Photo, kind: PhotoKind) => void;
}) {
  const rows = photos.filter((p) => staged[p.id]);
  if (!rows.length) return null;
  return (
    <section aria-labelledby="staged-title" className="space-y-1 text-sm">
      <h3 id="staged-title" className="font-semibold text-mist">
        Ready to save ({rows.length})
      </h3>
      <div aria-hidden="true" className={`hidden gap-x-3 text-fog sm:grid ${cols}`}>
        <span>File</span>
        <span>Position</span>
        <span>Kind of shot</span>
        <span>Matched by</span>
        <span />
      </div>
      <ul className="divide-y divide-hull-700 border-t border-hull-700">
        {rows.map((p) => {
          const s = staged[p.id];
          return (
            <li key={p.id} className={`grid items-center gap-x-3 gap-y-1 py-2 ${cols}`} data-testid="staged-row">
              <span className="min-w-0 font-mono break-all">{p.originalName}</span>
              <span className="min-w-0">
                <span className="sr-only">Position </span>
                <span className="font-mono">{s.designation}</span> <span className="text-mist">{s.boardName}</span>
              </span>
              <span className="min-w-0">
                <select
                  aria-label={`Kind of shot for ${p.originalName}`}
                  className="block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
                  value={s.kind}
                  onChange={(e) => onKind(p, e.target.value as PhotoKind)}
                >
                  {PHOTO_KINDS.map((k) => (
                    <option key={k} value={k}>
                      {PHOTO_KIND_LABELS[k]}
                    </option>
                  ))}
                </select>
                {s.kindFrom === "file name" && (
                  <span className="text-xs text-fog" data-testid="kind-from-name">
                    kind read from the file name
                  </span>
                )}
              </span>
              <span className="min-w-0 text-mist">
                <span className="sm:sr-only">Matched by </span>
                {s.source}
              </span>
              <span>
                <button
                  type="button"
                  className="min-h-11 px-2 underline"
                  onClick={() => onRemove(p.id)}
                  aria-label={`Unfile ${p.originalName}`}
                >
                  Unfile
                </button>
              </span>
            </li>
          );
        })}
      </ul>
    </section>
  );
}

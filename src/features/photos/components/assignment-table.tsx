import type { PhotoKind } from "../../../domain/vocab";
import { PHOTO_KIND_LABELS } from "../../../domain/vocab";
import type { Photo, PhotoTarget } from "../../../schemas/photos";

export interface Staged {
  positionId: string;
  kind: PhotoKind;
  source: "typed" | "tag in file name" | "designation in file name";
}

/** What will be saved, before it is: file → position, and how the match was made. */
export function AssignmentTable({
  photos,
  staged,
  byId,
  onRemove,
}: {
  photos: Photo[];
  staged: Record<string, Staged>;
  byId: Map<string, PhotoTarget>;
  onRemove: (id: string) => void;
}) {
  const rows = photos.filter((p) => staged[p.id]);
  if (!rows.length) return null;
  return (
    <table className="w-full text-left text-sm">
      <caption className="mb-1 text-left font-semibold text-mist">Ready to save</caption>
      <thead className="text-fog">
        <tr>
          <th scope="col" className="py-1">
            File
          </th>
          <th scope="col">Position</th>
          <th scope="col">Kind</th>
          <th scope="col">Matched by</th>
          <th scope="col">
            <span className="sr-only">Remove</span>
          </th>
        </tr>
      </thead>
      <tbody>
        {rows.map((p) => {
          const s = staged[p.id];
          const t = byId.get(s.positionId);
          return (
            <tr key={p.id} className="border-t border-hull-700" data-testid="staged-row">
              <td className="py-1 font-mono">{p.originalName}</td>
              <td>
                <span className="font-mono">{t?.designation}</span> <span className="text-mist">{t?.boardName}</span>
              </td>
              <td>{PHOTO_KIND_LABELS[s.kind]}</td>
              <td>{s.source}</td>
              <td>
                <button
                  type="button"
                  className="min-h-11 px-2 underline"
                  onClick={() => onRemove(p.id)}
                  aria-label={`Unfile ${p.originalName}`}
                >
                  Unfile
                </button>
              </td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

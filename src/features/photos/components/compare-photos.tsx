import { useState } from "react";
import { PHOTO_KIND_LABELS } from "../../../domain/vocab";
import type { Photo } from "../../../schemas/photos";
import { photoUrl } from "../api";
import { RenditionImage } from "./rendition-image";
import { dateOf } from "../../../lib/clock";

const label = (p: Photo) =>
  `${PHOTO_KIND_LABELS[p.kind]} · ${dateOf(p.capturedAt ?? p.createdAt)}${p.caption ? ` · ${p.caption}` : ""}`;

/** Defaults: the earliest "as found" against the latest "after work" (or the newest). */
function defaults(photos: Photo[]) {
  const byTime = [...photos].sort((a, b) => (a.capturedAt ?? a.createdAt).localeCompare(b.capturedAt ?? b.createdAt));
  const before = byTime.find((p) => p.kind === "as_found") ?? byTime[0];
  const after =
    [...byTime].reverse().find((p) => p.kind === "after_work" && p.id !== before?.id) ??
    byTime.filter((p) => p.id !== before?.id).at(-1);
  return [before?.id ?? "", after?.id ?? ""];
}

/** Before and after of one position: side by side, or one over the other with a slider. */
export function ComparePhotos({ siteId, photos }: { siteId: string; photos: Photo[] }) {
  const [ids, setIds] = useState(() => defaults(photos));
  const [mode, setMode] = useState<"side" | "slider">("side");
  const [split, setSplit] = useState(50);
  if (photos.length < 2)
    return <p className="text-sm text-mist">Two photos of this position are needed for a before/after comparison.</p>;
  const [a, b] = ids.map((id) => photos.find((p) => p.id === id) ?? photos[0]);
  const pick = (slot: 0 | 1, id: string) => setIds((cur) => (slot === 0 ? [id, cur[1]] : [cur[0], id]));
  const select = (slot: 0 | 1, text: string) => (
    <label className="block text-sm font-semibold text-mist">
      {text}
      <select
        className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
        value={ids[slot]}
        onChange={(e) => pick(slot, e.target.value)}
      >
        {photos.map((p) => (
          <option key={p.id} value={p.id}>
            {label(p)}
          </option>
        ))}
      </select>
    </label>
  );
  return (
    <section aria-labelledby="compare-title" className="space-y-3">
      <h2 id="compare-title" className="text-lg font-bold">
        Before and after
      </h2>
      <div className="grid gap-3 sm:grid-cols-3">
        {select(0, "Before")}
        {select(1, "After")}
        <fieldset className="text-sm">
          <legend className="font-semibold text-mist">View</legend>
          <div className="mt-1 flex gap-3">
            {(["side", "slider"] as const).map((m) => (
              <label key={m} className="inline-flex min-h-11 items-center gap-2">
                <input type="radio" name="compare-mode" checked={mode === m} onChange={() => setMode(m)} />{" "}
                {m === "side" ? "Side by side" : "Slider"}
              </label>
            ))}
          </div>
        </fieldset>
      </div>
      {mode === "side" ? (
        <div className="grid gap-2 sm:grid-cols-2">
          {[a, b].map((p, i) => (
            <figure key={i}>
              <RenditionImage
                siteId={siteId}
                photo={p}
                rendition="display"
                alt={`${i === 0 ? "Before" : "After"}: ${label(p)}`}
                className="w-full rounded-md object-contain"
              />
              <figcaption className="text-sm text-mist">
                {i === 0 ? "Before" : "After"} — {label(p)}
              </figcaption>
            </figure>
          ))}
        </div>
      ) : (
        <div>
          <div className="relative overflow-hidden rounded-md">
            <img src={photoUrl(siteId, b.id, "display")} alt={`After: ${label(b)}`} className="block w-full" />
            <img
              src={photoUrl(siteId, a.id, "display")}
              alt={`Before: ${label(a)}`}
              className="absolute inset-0 h-full w-full object-cover"
              style={{ clipPath: `inset(0 ${100 - split}% 0 0)` }}
            />
            <div aria-hidden="true" className="absolute inset-y-0 w-0.5 bg-brass-400" style={{ left: `${split}%` }} />
          </div>
          <label className="mt-2 block text-sm font-semibold text-mist">
            Before ← {split} % → After
            <input
              type="range"
              min={0}
              max={100}
              value={split}
              onChange={(e) => setSplit(Number(e.target.value))}
              className="block min-h-11 w-full accent-brass-400"
            />
          </label>
        </div>
      )}
    </section>
  );
}

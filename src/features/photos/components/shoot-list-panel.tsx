import { useState } from "react";
import { Link } from "react-router";
import { Button } from "../../../components/button";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { PHOTO_KINDS, PHOTO_KIND_LABELS, type PhotoKind } from "../../../domain/vocab";
import { usePhotoMutations, usePhotoSettings, useShootList } from "../api";

/** Per board: which positions still lack a required shot, and how far the shoot has got. */
export function ShootListPanel({ siteId, boardId }: { siteId: string; boardId: string }) {
  const list = useShootList(siteId, boardId);
  const [onlyMissing, setOnlyMissing] = useState(true);
  if (list.isPending) return <Loading what="Reading the shoot list" />;
  if (list.isLoadingError || serverRefused(list.error)) return <ErrorPanel error={list.error} />;
  const d = list.data;
  const pct = d.shotsRequired ? Math.round((d.shotsTaken / d.shotsRequired) * 100) : 100;
  const rows = onlyMissing ? d.positions.filter((p) => p.missing.length) : d.positions;
  return (
    <section aria-labelledby="shoot-title" className="space-y-3">
      <h2 id="shoot-title" className="text-xl font-bold">
        {d.board.name}
      </h2>
      <p>
        <span className="font-semibold">
          {d.complete} of {d.total} positions
        </span>{" "}
        have every required shot ({d.shotsTaken} of {d.shotsRequired} shots, {pct} %).
      </p>
      <progress
        max={100}
        value={pct}
        className="h-3 w-full overflow-hidden rounded [&::-webkit-progress-bar]:bg-hull-700 [&::-webkit-progress-value]:bg-kelp-400"
        aria-label="Shoot list progress"
      />
      <label className="inline-flex min-h-11 items-center gap-2 text-sm">
        <input type="checkbox" checked={onlyMissing} onChange={(e) => setOnlyMissing(e.target.checked)} /> Only
        positions still missing a shot
      </label>
      {rows.length === 0 ? (
        <p className="text-kelp-300">✓ Nothing missing on this board.</p>
      ) : (
        <ul className="grid gap-2 sm:grid-cols-2 lg:grid-cols-3" aria-label="Positions">
          {rows.map((p) => (
            <li key={p.id} className="rounded-md bg-hull-850 p-3 ring-1 ring-hull-700" data-testid="shoot-row">
              <Link
                to={paths.photoGallery.href(siteId, { positionId: p.id, boardId })}
                className="font-mono font-semibold"
              >
                {p.designation}
              </Link>
              <span className="ml-2 text-sm text-mist">
                {p.photoCount} photo{p.photoCount === 1 ? "" : "s"}
              </span>
              <p className="text-sm">
                {p.missing.length ? (
                  <>Missing: {p.missing.map((k) => PHOTO_KIND_LABELS[k]).join(", ")}</>
                ) : (
                  <span className="text-kelp-300">✓ Complete</span>
                )}
              </p>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

/** The curator chooses which kinds of shot every position needs. */
export function RequiredShotsEditor({ siteId }: { siteId: string }) {
  const settings = usePhotoSettings(siteId);
  const { saveSettings } = usePhotoMutations(siteId);
  const [kinds, setKinds] = useState<PhotoKind[]>([]);
  // The saved settings (first load, or after a save) replace the choice: adjusted while rendering (React's "storing information from previous renders"), not in an effect.
  const [kindsFrom, setKindsFrom] = useState<typeof settings.data>(undefined);
  if (settings.data && settings.data !== kindsFrom) {
    setKindsFrom(settings.data);
    setKinds(settings.data.requiredKinds);
  }
  if (!settings.data) return null;
  const toggle = (k: PhotoKind) => setKinds((cur) => (cur.includes(k) ? cur.filter((x) => x !== k) : [...cur, k]));
  return (
    <fieldset className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700">
      <legend className="px-1 font-semibold">Shots every position needs</legend>
      <div className="flex flex-wrap gap-x-4">
        {PHOTO_KINDS.map((k) => (
          <label key={k} className="inline-flex min-h-11 items-center gap-2">
            <input type="checkbox" checked={kinds.includes(k)} onChange={() => toggle(k)} /> {PHOTO_KIND_LABELS[k]}
          </label>
        ))}
      </div>
      <Button
        className="mt-2"
        onClick={() => saveSettings.mutate({ requiredKinds: kinds, version: settings.data.version })}
        disabled={saveSettings.isPending}
      >
        Save required shots
      </Button>
      {saveSettings.isError && <ErrorPanel error={saveSettings.error} />}
      {saveSettings.isSuccess && (
        <p role="status" className="mt-1 text-sm text-kelp-300">
          ✓ Saved.
        </p>
      )}
    </fieldset>
  );
}

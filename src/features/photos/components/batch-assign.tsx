import { useEffect, useState, type KeyboardEvent } from "react";
import { useBlocker } from "react-router";
import { Button } from "../../../components/button";
import { ErrorPanel } from "../../../components/status";
import { kindFromFileName, normalizeToken, searchTargets } from "../../../domain/photo-matching";
import { PHOTO_KINDS, PHOTO_KIND_LABELS, type PhotoKind } from "../../../domain/vocab";
import type { Photo, PhotoTarget, PhotoTargetBoard } from "../../../schemas/photos";
import { useBoardPhotoTargets, useMatchNames, usePhotoMutations } from "../api";
import { AssignmentTable, type Staged } from "./assignment-table";
import type { UseSiteSearch } from "./position-picker";
import { RenditionImage } from "./rendition-image";

interface Props {
  siteId: string;
  photos: Photo[];
  boards: PhotoTargetBoard[];
  /** The site-wide search typing uses while no board is chosen (the page lends the inventory's look-up). */
  useSiteSearch: UseSiteSearch;
}

const exact = (t: PhotoTarget, typed: string) =>
  [t.designation, t.tagNumber ?? ""].some((v) => normalizeToken(v) === normalizeToken(typed));

/** Names sent per request to the server's file-name matching (its limit). */
const MATCH_BATCH = 500;

/**
 * After a shoot: step through the unfiled photos and give each a position by typing
 * its designation or tag number (Enter files it and moves on; Page Up / Page Down step),
 * or match file names automatically — every match is shown before anything is saved.
 * With a board chosen, typing searches that board's positions on the phone; without one, the whole site on the
 * server. File names are matched on the server (tags across the site, designations on the chosen board).
 */
export function BatchAssign({ siteId, photos, boards, useSiteSearch }: Props) {
  const [index, setIndex] = useState(0);
  const [typed, setTyped] = useState("");
  const [boardId, setBoardId] = useState("");
  const [staged, setStaged] = useState<Record<string, Staged>>({});
  const [note, setNote] = useState("");
  const [kindFor, setKindFor] = useState<Record<string, PhotoKind>>({});
  // Enter pressed before the answer for what was typed came: file to its first match once it does.
  const [enterFor, setEnterFor] = useState<string | null>(null);
  const { assign } = usePhotoMutations(siteId);
  const match = useMatchNames(siteId);
  const pool = useBoardPhotoTargets(siteId, boardId || undefined);
  const site = useSiteSearch(siteId, boardId ? "" : typed);
  const suggestions = boardId ? searchTargets(typed, pool.data ?? []) : site.targets.slice(0, 8);
  const searching = !!typed.trim() && (boardId ? pool.isPending : site.pending);
  const current = photos[Math.min(index, photos.length - 1)];
  const count = Object.keys(staged).length;
  useLeaveGuard(count);

  if (!photos.length)
    return (
      <p className="text-mist" role="status">
        {note && <span className="mr-1 font-semibold text-kelp-300">✓ {note}</span>}Every uploaded photo is filed to a
        position.
      </p>
    );
  const go = (i: number) => {
    setIndex(Math.max(0, Math.min(photos.length - 1, i)));
    setTyped("");
  };
  /** The kind a photo would be filed as: the photographer's choice, else what its file name says, else its upload's kind. */
  const kindOf = (photo: Photo): { kind: PhotoKind; kindFrom: Staged["kindFrom"] } => {
    if (kindFor[photo.id]) return { kind: kindFor[photo.id], kindFrom: "chosen" };
    const named = kindFromFileName(photo.originalName);
    return named ? { kind: named, kindFrom: "file name" } : { kind: photo.kind, kindFrom: "upload" };
  };
  const stage = (photo: Photo, t: PhotoTarget, source: Staged["source"]) =>
    setStaged((s) => ({
      ...s,
      [photo.id]: {
        positionId: t.positionId,
        designation: t.designation,
        boardName: t.boardName,
        ...(s[photo.id] ? { kind: s[photo.id].kind, kindFrom: s[photo.id].kindFrom } : kindOf(photo)),
        source,
      },
    }));
  const setKind = (photo: Photo, k: PhotoKind) => {
    setKindFor((m) => ({ ...m, [photo.id]: k }));
    setStaged((s) => (s[photo.id] ? { ...s, [photo.id]: { ...s[photo.id], kind: k, kindFrom: "chosen" } } : s));
  };

  const fileTo = (t: PhotoTarget | undefined) => {
    if (!t) return setNote(`No position matches "${typed.trim()}".`);
    stage(current, t, "typed");
    go(index + 1);
  };
  // The answer Enter was waiting for is in (adjusted while rendering, as React's "storing information from
  // previous renders"; not in an effect).
  // Only an exact designation or tag is filed unseen; anything looser waits for the photographer's choice.
  if (enterFor !== null && (enterFor !== typed || !searching)) {
    setEnterFor(null);
    const first = suggestions[0];
    // (Typed on meanwhile: Enter meant the earlier text, and is dropped.)
    if (enterFor === typed) {
      if (!first || exact(first, typed)) fileTo(first);
      else setNote(`No position is exactly "${typed.trim()}": choose one of those found.`);
    }
  }

  const onKey = (e: KeyboardEvent<HTMLInputElement>) => {
    if (e.key === "Enter" && typed.trim()) {
      e.preventDefault();
      if (searching) setEnterFor(typed);
      else fileTo(suggestions[0]);
    } else if (e.key === "PageDown") {
      e.preventDefault();
      go(index + 1);
    } else if (e.key === "PageUp") {
      e.preventDefault();
      go(index - 1);
    }
  };

  const autoMatch = async () => {
    const open = photos.filter((p) => !staged[p.id]);
    let found = 0;
    let unsure = 0;
    try {
      for (let i = 0; i < open.length; i += MATCH_BATCH) {
        const batch = open.slice(i, i + MATCH_BATCH);
        const r = await match.mutateAsync({
          names: batch.map((p) => p.originalName),
          boardId: boardId || undefined,
        });
        const byId = new Map(r.targets.map((t) => [t.positionId, t]));
        batch.forEach((p, j) => {
          const m = r.matches[j];
          const t = m.kind === "tag" || m.kind === "designation" ? byId.get(m.positionId) : undefined;
          if (t && m.kind !== "ambiguous" && m.kind !== "none") {
            stage(p, t, m.kind === "tag" ? "tag in file name" : "designation in file name");
            found++;
          } else if (m.kind === "ambiguous") unsure++;
        });
      }
    } catch {
      setNote(`${found} matched by file name before the connection failed; match again to finish.`);
      return;
    }
    setNote(
      `${found} matched by file name${unsure ? `; ${unsure} named a designation found on several boards — choose the board and match again` : ""}. Check them below, then save.`,
    );
  };

  const save = () =>
    assign.mutate(
      {
        items: photos
          .filter((p) => staged[p.id])
          .map((p) => ({
            photoId: p.id,
            version: p.version,
            positionId: staged[p.id].positionId,
            kind: staged[p.id].kind,
          })),
      },
      {
        onSuccess: (saved) => {
          setStaged({});
          setIndex(0);
          setNote(`${saved.length} ${saved.length === 1 ? "photo" : "photos"} filed.`);
        },
      },
    );
  const here = staged[current.id];

  return (
    <section aria-labelledby="assign-title" className="space-y-3">
      <h2 id="assign-title" className="text-xl font-bold">
        File the shoot to positions
      </h2>
      <div className="flex flex-wrap items-end gap-3">
        <label className="block text-sm font-semibold text-mist">
          Board
          <select
            className="mt-1 block min-h-11 rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
            value={boardId}
            onChange={(e) => setBoardId(e.target.value)}
          >
            <option value="">All boards</option>
            {boards.map((b) => (
              <option key={b.id} value={b.id}>
                {b.name}
              </option>
            ))}
          </select>
        </label>
        <Button tone="quiet" onClick={() => void autoMatch()} disabled={match.isPending}>
          {match.isPending ? "Matching…" : "Match file names"}
        </Button>
        <p className="text-sm text-mist" aria-live="polite">
          {note}
        </p>
      </div>
      <div className="grid gap-4 md:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
        <figure className="rounded-lg bg-hull-850 p-2 ring-1 ring-hull-700">
          <RenditionImage
            siteId={siteId}
            photo={current}
            rendition="display"
            alt={`Photo ${index + 1} of ${photos.length}, ${current.originalName}`}
            className="max-h-80 w-full object-contain"
          />
          <figcaption className="mt-1 font-mono text-sm text-mist">
            {index + 1} / {photos.length} · {current.originalName}
          </figcaption>
        </figure>
        <div className="space-y-3">
          <label className="block text-sm font-semibold text-mist">
            Designation or tag number
            <input
              className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 font-mono text-chalk focus:border-brass-400 focus:outline-none"
              value={typed}
              onChange={(e) => setTyped(e.target.value)}
              onKeyDown={onKey}
              autoComplete="off"
              aria-describedby="assign-help"
            />
          </label>
          <p id="assign-help" className="hidden text-xs text-fog sm:block">
            Press Enter to file this photo to the first match and move on to the next. Page Up / Page Down step without
            filing.
          </p>
          <ul aria-label="Matching positions" className="space-y-1" aria-busy={searching}>
            {suggestions.map((t, i) => (
              <li key={t.positionId}>
                <button
                  type="button"
                  className={`min-h-11 w-full rounded-md px-3 text-left ring-1 ${i === 0 ? "bg-hull-700 ring-brass-400" : "bg-hull-800 ring-hull-600"}`}
                  onClick={() => {
                    stage(current, t, "typed");
                    go(index + 1);
                  }}
                >
                  <span className="font-mono">{t.designation}</span>{" "}
                  <span className="text-sm text-mist">
                    {t.boardName}
                    {t.tagNumber ? ` · tag ${t.tagNumber}` : ""}
                  </span>
                </button>
              </li>
            ))}
          </ul>
          <label className="block text-sm font-semibold text-mist">
            Kind of shot
            <select
              className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
              value={here?.kind ?? kindOf(current).kind}
              onChange={(e) => setKind(current, e.target.value as PhotoKind)}
            >
              {PHOTO_KINDS.map((k) => (
                <option key={k} value={k}>
                  {PHOTO_KIND_LABELS[k]}
                </option>
              ))}
            </select>
          </label>
          <p className="text-sm" aria-live="polite">
            {here ? (
              <>
                Filed to <span className="font-mono">{here.designation}</span> on {here.boardName} (not saved yet)
              </>
            ) : (
              "Not filed yet."
            )}
          </p>
          <div className="flex gap-2">
            <Button tone="quiet" onClick={() => go(index - 1)} disabled={index === 0}>
              Previous
            </Button>
            <Button tone="quiet" onClick={() => go(index + 1)} disabled={index >= photos.length - 1}>
              Next
            </Button>
          </div>
        </div>
      </div>
      <AssignmentTable
        photos={photos}
        staged={staged}
        onRemove={(id) => setStaged(({ [id]: _, ...rest }) => rest)}
        onKind={setKind}
      />
      {assign.isError && <ErrorPanel error={assign.error} />}
      <Button onClick={save} disabled={!count || assign.isPending}>
        {assign.isPending ? "Saving…" : `Save ${count} assignment${count === 1 ? "" : "s"}`}
      </Button>
    </section>
  );
}

/**
 * Staged filings live only in this page: leaving it (a link, Back, closing the tab) with some
 * unsaved asks first. React Router's blocker covers moves inside the app, `beforeunload` the rest.
 */
function useLeaveGuard(unsaved: number) {
  const blocker = useBlocker(
    ({ currentLocation, nextLocation }) => unsaved > 0 && currentLocation.pathname !== nextLocation.pathname,
  );
  useEffect(() => {
    if (blocker.state !== "blocked") return;
    const leave = window.confirm(
      `${unsaved} photo${unsaved === 1 ? " is" : "s are"} matched to positions but not saved. Leave the photo desk and lose ${unsaved === 1 ? "it" : "them"}?`,
    );
    if (leave) blocker.proceed();
    else blocker.reset();
  }, [blocker, unsaved]);
  useEffect(() => {
    if (!unsaved) return;
    const ask = (e: BeforeUnloadEvent) => {
      e.preventDefault();
      e.returnValue = "";
    };
    window.addEventListener("beforeunload", ask);
    return () => window.removeEventListener("beforeunload", ask);
  }, [unsaved]);
}

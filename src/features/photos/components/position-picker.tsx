import { useDeferredValue, useId, useState } from "react";
import type { PhotoTarget, PhotoTargetBoard } from "../../../schemas/photos";
import { useBoardPhotoTargets } from "../api";

/** What a site-wide search for positions answered for the text typed (empty while it is read). */
export interface PositionSearch {
  targets: PhotoTarget[];
  /** The answer for this very text is not in yet. */
  pending: boolean;
  failed: boolean;
}
/**
 * The site-wide search for positions by designation, tag number or circuit, lent by the page (the inventory's
 * look-up, see src/app/routes/photos/position-search.ts): features never import each other.
 */
export type UseSiteSearch = (siteId: string, typed: string) => PositionSearch;

export interface Place {
  boardId: string;
  positionId: string;
}

const control = "mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk";

/**
 * Board first, then one of its positions (read only once the board is chosen), or typed: "Find a position" asks the
 * whole site and sets both. A site of 200,000 positions is never one list on the phone.
 */
export function PositionPicker({
  siteId,
  boards,
  value,
  onChange,
  useSiteSearch,
  noBoard,
  noPosition,
  describedBy,
}: {
  siteId: string;
  boards: PhotoTargetBoard[];
  value: Place;
  onChange: (p: Place) => void;
  useSiteSearch?: UseSiteSearch;
  /** The board list's first choice ("Assign later"); without it a board must be chosen. */
  noBoard?: string;
  /** The position list's first choice: the board itself. */
  noPosition: string;
  describedBy?: string;
}) {
  const ids = useId();
  const targets = useBoardPhotoTargets(siteId, value.boardId || undefined);
  // The position found by typing, shown in the list until the board's own positions are read.
  const [found, setFound] = useState<PhotoTarget | null>(null);
  const listed = targets.data ?? [];
  const extra =
    found && found.positionId === value.positionId && !listed.some((t) => t.positionId === found.positionId);
  return (
    <div className="space-y-2">
      <div className="grid gap-2 sm:grid-cols-2">
        <label className="block text-sm font-semibold text-mist">
          Board
          <select
            className={control}
            value={value.boardId}
            aria-describedby={describedBy}
            onChange={(e) => onChange({ boardId: e.target.value, positionId: "" })}
          >
            {(noBoard !== undefined || !value.boardId) && <option value="">{noBoard ?? "Choose a board"}</option>}
            {boards.map((b) => (
              <option key={b.id} value={b.id}>
                {b.name} ({b.positionCount} position{b.positionCount === 1 ? "" : "s"})
              </option>
            ))}
          </select>
        </label>
        <label className="block text-sm font-semibold text-mist">
          Position
          <select
            className={`${control} disabled:opacity-60`}
            value={value.positionId}
            disabled={!value.boardId}
            aria-describedby={`${ids}-state`}
            onChange={(e) => onChange({ boardId: value.boardId, positionId: e.target.value })}
          >
            <option value="">{value.boardId ? noPosition : "Choose a board first"}</option>
            {extra && <option value={found.positionId}>{found.designation}</option>}
            {listed.map((t) => (
              <option key={t.positionId} value={t.positionId}>
                {t.designation}
                {t.tagNumber ? ` · ${t.tagNumber}` : ""}
              </option>
            ))}
          </select>
          <span id={`${ids}-state`} className="block text-xs font-normal text-fog" aria-live="polite">
            {value.boardId && targets.isPending
              ? "Reading the board's positions…"
              : targets.isError
                ? "The board's positions could not be read; type to find a position instead."
                : ""}
          </span>
        </label>
      </div>
      {useSiteSearch && (
        <FindPosition
          siteId={siteId}
          useSiteSearch={useSiteSearch}
          onPick={(t) => {
            setFound(t);
            onChange({ boardId: t.boardId, positionId: t.positionId });
          }}
        />
      )}
    </div>
  );
}

/** "Find a position": what is typed, looked up across the site; a choice sets the board and the position. */
function FindPosition({
  siteId,
  useSiteSearch,
  onPick,
}: {
  siteId: string;
  useSiteSearch: UseSiteSearch;
  onPick: (t: PhotoTarget) => void;
}) {
  const [typed, setTyped] = useState("");
  const deferred = useDeferredValue(typed);
  const search = useSiteSearch(siteId, deferred);
  const id = useId();
  return (
    <div>
      <label className="block text-sm font-semibold text-mist" htmlFor={id}>
        Or find a position
      </label>
      <input
        id={id}
        className={`${control} font-mono`}
        value={typed}
        onChange={(e) => setTyped(e.target.value)}
        onKeyDown={(e) => {
          // Enter takes the first position found (never submits the form around the picker).
          if (e.key !== "Enter") return;
          e.preventDefault();
          const first = !search.pending && typed === deferred ? search.targets[0] : undefined;
          if (first) {
            onPick(first);
            setTyped("");
          }
        }}
        placeholder="Designation, tag or circuit"
        autoComplete="off"
        enterKeyHint="search"
      />
      {typed.trim() && (
        <ul aria-label="Positions found" className="mt-1 space-y-1" aria-busy={search.pending}>
          {search.targets.slice(0, 6).map((t) => (
            <li key={t.positionId}>
              <button
                type="button"
                className="min-h-11 w-full rounded-md bg-hull-800 px-3 text-left ring-1 ring-hull-600 hover:bg-hull-700"
                onClick={() => {
                  onPick(t);
                  setTyped("");
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
          {!search.pending && !search.targets.length && (
            <li className="text-sm text-mist">
              {search.failed ? "The search could not be run." : "No position found."}
            </li>
          )}
        </ul>
      )}
    </div>
  );
}

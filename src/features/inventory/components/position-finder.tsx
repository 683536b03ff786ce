import { useEffect, useState } from "react";
import { COMPONENT_KIND_LABELS, COMPONENT_KIND_SHORT, CUSTODY_LABELS } from "../../../domain/vocab";
import { useBoard, useBoards, useLookup } from "../api";
import { KindGlyph } from "./kind-glyph";

function useDebounced<T>(value: T, ms: number): T {
  const [v, setV] = useState(value);
  useEffect(() => {
    const t = setTimeout(() => setV(value), ms);
    return () => clearTimeout(t);
  }, [value, ms]);
  return v;
}

const pick =
  "flex min-h-12 w-full items-center gap-3 rounded-md bg-hull-800 px-3 text-left ring-1 ring-hull-600 hover:ring-brass-400";

/** Find a position by typing what is painted on the board or written on the tag, or by board → position. */
export function PositionFinder({ siteId, onPick }: { siteId: string; onPick: (positionId: string) => void }) {
  const [text, setText] = useState("");
  const q = useDebounced(text.trim(), 250);
  const hits = useLookup(siteId, q);
  const [boardId, setBoardId] = useState("");
  const boards = useBoards(siteId);
  const board = useBoard(siteId, boardId);
  return (
    <div className="space-y-5">
      <div>
        <label htmlFor="find-position" className="block text-sm font-semibold text-mist">
          Designation or tag number
        </label>
        <input
          id="find-position"
          type="search"
          autoComplete="off"
          autoCapitalize="characters"
          enterKeyHint="search"
          value={text}
          onChange={(e) => setText(e.target.value)}
          placeholder="e.g. 2-14, KL 42, bilge pump"
          aria-describedby="find-position-hint"
          className="mt-1 block min-h-14 w-full rounded-md border border-hull-500 bg-hull-900 px-3 font-mono text-xl text-chalk placeholder:text-fog"
        />
        <p id="find-position-hint" className="mt-1 text-xs text-fog">
          A circuit name or a kind (MCCB, fuse, meter) finds positions too; close spellings count.
        </p>
        <div aria-live="polite" className="mt-2">
          {q && hits.isFetching && !hits.data && <p className="text-sm text-mist">Looking…</p>}
          {/* No signal and no answer kept for these words: say so, and the way that works without signal. */}
          {q && hits.fetchStatus === "paused" && !hits.data && (
            <p role="status" className="text-sm text-mist" data-testid="finder-offline">
              No signal: typed search needs the server. Pick the board below and tap the position instead.
            </p>
          )}
          {q && hits.data?.length === 0 && (
            <p className="text-sm text-mist">No designation, tag, circuit or kind like “{q}”.</p>
          )}
          {hits.isError && (
            <p role="alert" className="text-sm text-flare-300">
              {hits.error.message}
            </p>
          )}
          {q && hits.data && hits.data.length > 0 && (
            <ul className="space-y-2" aria-label="Matching positions">
              {hits.data.map((h) => (
                <li key={h.positionId}>
                  <button type="button" className={pick} onClick={() => onPick(h.positionId)}>
                    <KindGlyph kind={h.kind} className="h-5 w-5 shrink-0 text-mist" />
                    <span className="font-mono text-lg font-bold">{h.designation}</span>
                    <span className="min-w-0 flex-1 py-1 text-sm text-mist">
                      {h.circuit && (
                        <span
                          className={`block truncate ${h.matchedOn === "circuit" ? "font-semibold text-chalk" : "text-chalk"}`}
                        >
                          {h.circuit}
                        </span>
                      )}
                      {h.matchedOn === "kind" && (
                        <span className="block truncate font-semibold text-chalk">{COMPONENT_KIND_LABELS[h.kind]}</span>
                      )}
                      <span className="block truncate">
                        {h.boardName}
                        {h.sectionName ? ` · ${h.sectionName}` : ""}
                      </span>
                      {h.tagNumber && (
                        <span className="block truncate font-mono">
                          tag {h.tagNumber}
                          {h.custody ? ` · ${CUSTODY_LABELS[h.custody]}` : ""}
                        </span>
                      )}
                    </span>
                  </button>
                </li>
              ))}
            </ul>
          )}
        </div>
      </div>
      <div>
        <label htmlFor="pick-board" className="block text-sm font-semibold text-mist">
          …or pick the board
        </label>
        <select
          id="pick-board"
          value={boardId}
          onChange={(e) => setBoardId(e.target.value)}
          className="mt-1 block min-h-12 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
        >
          <option value="">Choose a board</option>
          {boards.data?.map((b) => (
            <option key={b.id} value={b.id}>
              {b.name}
            </option>
          ))}
        </select>
        {board.data && (
          <ul className="mt-2 grid grid-cols-3 gap-2" aria-label={`Positions on ${board.data.board.name}`}>
            {board.data.positions.map((p) => (
              <li key={p.id}>
                <button
                  type="button"
                  onClick={() => onPick(p.id)}
                  className="flex min-h-12 w-full flex-col items-start justify-center rounded-md bg-hull-800 px-2 ring-1 ring-hull-600"
                >
                  <span className="font-mono font-bold">{p.designation}</span>
                  <span className="text-[11px] text-mist">
                    {COMPONENT_KIND_SHORT[p.kind]}
                    {p.latest?.astmGrade != null ? ` · G${p.latest.astmGrade}` : " · not graded"}
                  </span>
                </button>
              </li>
            ))}
          </ul>
        )}
      </div>
    </div>
  );
}

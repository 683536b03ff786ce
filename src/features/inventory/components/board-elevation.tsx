import { useRef, type KeyboardEvent } from "react";
import { waterLineFromTop } from "../../../domain/board-geometry";
import type { Board, TileRow } from "../contract";
import { BoardTile } from "./board-tile";
import { tileMatches, type TileFilters } from "./elevation-filters";

const ROW_REM = 5.5;

/** The tile nearest in the arrow's direction, scored on centre distance (off-axis counts double). */
export function neighbour(tiles: TileRow[], from: TileRow, key: string): TileRow | undefined {
  const centre = (t: TileRow) => ({ r: t.gridRow + t.rowSpan / 2, c: t.gridCol + t.colSpan / 2 });
  const a = centre(from);
  const dir = { ArrowRight: [0, 1], ArrowLeft: [0, -1], ArrowDown: [1, 0], ArrowUp: [-1, 0] }[key];
  if (!dir) return undefined;
  let best: TileRow | undefined;
  let bestScore = Infinity;
  for (const t of tiles) {
    if (t.id === from.id) continue;
    const b = centre(t);
    const along = (b.r - a.r) * dir[0] + (b.c - a.c) * dir[1];
    if (along <= 0) continue;
    const across = Math.abs((b.r - a.r) * dir[1]) + Math.abs((b.c - a.c) * dir[0]);
    const score = along + across * 2;
    if (score < bestScore) {
      bestScore = score;
      best = t;
    }
  }
  return best;
}

function WaterLine({ board }: { board: Board }) {
  if (board.waterLineMm == null || !board.faceHeightMm) return null;
  const top = waterLineFromTop(board.waterLineMm, board.faceHeightMm) * 100;
  return (
    <div aria-hidden="true" className="pointer-events-none absolute inset-x-0 bottom-0 z-10" style={{ top: `${top}%` }}>
      <div className="absolute inset-0 bg-tide-400/15 [background-image:repeating-linear-gradient(0deg,rgba(106,168,242,0.10)_0_1px,transparent_1px_10px)]" />
      <svg className="absolute -top-2 left-0 h-4 w-full" preserveAspectRatio="none" viewBox="0 0 100 8">
        <path
          d="M0 4 Q 2.5 0 5 4 T 10 4 T 15 4 T 20 4 T 25 4 T 30 4 T 35 4 T 40 4 T 45 4 T 50 4 T 55 4 T 60 4 T 65 4 T 70 4 T 75 4 T 80 4 T 85 4 T 90 4 T 95 4 T 100 4"
          fill="none"
          className="stroke-tide-300"
          strokeWidth="1.4"
          vectorEffect="non-scaling-stroke"
        />
      </svg>
      <span className="absolute -top-6 right-1 rounded bg-hull-950/90 px-1.5 py-0.5 text-[11px] font-semibold text-tide-300 ring-1 ring-tide-400">
        ≈ flood water line · {board.waterLineMm} mm
      </span>
    </div>
  );
}

export function BoardElevation({
  board,
  tiles,
  filters,
  selectedId,
  onOpen,
}: {
  board: Board;
  tiles: TileRow[];
  filters: TileFilters;
  selectedId: string | null;
  onOpen: (t: TileRow) => void;
}) {
  const refs = useRef(new Map<string, HTMLButtonElement>());
  const focusId = selectedId ?? tiles[0]?.id;
  function onKeyDown(e: KeyboardEvent<HTMLButtonElement>, t: TileRow) {
    const next = neighbour(tiles, t, e.key);
    if (!next) return;
    e.preventDefault();
    refs.current.get(next.id)?.focus();
  }
  return (
    <div className="overflow-x-auto rounded-lg bg-hull-950 p-2 ring-1 ring-hull-700" data-testid="board-elevation">
      {board.waterLineMm != null && board.faceHeightMm ? (
        <p className="mb-2 text-sm text-tide-300">
          The flood reached {board.waterLineMm} mm up this {board.faceHeightMm} mm face; the tinted band is below that
          line.
        </p>
      ) : (
        <p className="mb-2 text-sm text-fog">No water line recorded for this board yet.</p>
      )}
      <div
        role="group"
        aria-label={`Front of ${board.name}: ${tiles.length} positions. Use the arrow keys to move between them, Enter to open one.`}
        className="relative grid gap-1.5 rounded-md border-4 border-hull-700 bg-hull-900 p-1.5"
        style={{
          gridTemplateColumns: `repeat(${board.gridCols}, minmax(5.25rem, 1fr))`,
          gridTemplateRows: `repeat(${board.gridRows}, ${ROW_REM}rem)`,
          minWidth: `${board.gridCols * 5.6}rem`,
        }}
      >
        {tiles.map((t) => (
          <BoardTile
            key={t.id}
            ref={(el) => {
              if (el) refs.current.set(t.id, el);
              else refs.current.delete(t.id);
            }}
            tile={t}
            dimmed={!tileMatches(t, filters)}
            selected={t.id === selectedId}
            tabIndex={t.id === focusId ? 0 : -1}
            onOpen={onOpen}
            onKeyDown={onKeyDown}
          />
        ))}
        <WaterLine board={board} />
      </div>
    </div>
  );
}

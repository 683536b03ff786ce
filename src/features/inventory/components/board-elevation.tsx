import {
  useCallback,
  useEffect,
  useLayoutEffect,
  useMemo,
  useRef,
  useState,
  type KeyboardEvent,
  type RefObject,
} from "react";
import { flushSync } from "react-dom";
import { useVirtualizer, useWindowVirtualizer } from "@tanstack/react-virtual";
import { usePrinting } from "../../../lib/use-printing";
import { waterLineFromTop } from "../../../domain/board-geometry";
import type { Board, TileRow } from "../contract";
import { BoardTile } from "./board-tile";
import { tileMatches, type TileFilters } from "./elevation-filters";

const ROW_REM = 6;
/**
 * Boards with more positions than this draw only the grid rows and columns on screen (plus a
 * margin), through @tanstack/react-virtual: a board of 3,600 positions drew every tile in one
 * long task (6.5 s on the bench's phone profile for 341). Smaller boards draw whole, so every
 * tile stays findable with the browser's find-in-page. Printing always draws every tile.
 * `npm run bench` builds a second copy with VITE_BOARD_WINDOW_FROM set past any board, to measure
 * the board page drawn whole against windowed (server/cli/bench-board.ts); builds never set it.
 */
export const WINDOW_FROM = Number(import.meta.env.VITE_BOARD_WINDOW_FROM) || 200;
const OVERSCAN = 2;

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

/**
 * The tinted band below the flood line, drawn over the face (decoration: it never carries words).
 * It is laid on the grid itself — the row the line crosses, at its fraction of that row, then every
 * row below — so it stays true to the rows when a row grows to fit a tile's words.
 */
function WaterLine({ board }: { board: Board }) {
  if (board.waterLineMm == null || !board.faceHeightMm) return null;
  const at = waterLineFromTop(board.waterLineMm, board.faceHeightMm) * board.gridRows;
  const row = Math.floor(at); // 0-based row the line crosses
  if (row >= board.gridRows) return null;
  const tint =
    "absolute inset-x-0 bg-tide-400/15 [background-image:repeating-linear-gradient(0deg,rgba(106,168,242,0.10)_0_1px,transparent_1px_10px)]";
  return (
    <>
      <div
        aria-hidden="true"
        data-testid="water-line-band"
        className="pointer-events-none relative z-10"
        style={{ gridRow: `${row + 1} / span 1`, gridColumn: "1 / -1" }}
      >
        {/* -bottom-1.5: the tint also covers the gap to the next row. */}
        <div
          className={`${tint} ${row + 1 < board.gridRows ? "-bottom-1.5" : "bottom-0"}`}
          style={{ top: `${(at - row) * 100}%` }}
        >
          <WaveStroke />
        </div>
      </div>
      {row + 1 < board.gridRows && (
        <div
          aria-hidden="true"
          className="pointer-events-none relative z-10"
          style={{ gridRow: `${row + 2} / ${board.gridRows + 1}`, gridColumn: "1 / -1" }}
        >
          <div className={`${tint} inset-y-0`} />
        </div>
      )}
    </>
  );
}

const WaveStroke = () => (
  <svg className="absolute -top-2 left-0 h-4 w-full" preserveAspectRatio="none" viewBox="0 0 100 8">
    <path
      d="M0 4 Q 2.5 0 5 4 T 10 4 T 15 4 T 20 4 T 25 4 T 30 4 T 35 4 T 40 4 T 45 4 T 50 4 T 55 4 T 60 4 T 65 4 T 70 4 T 75 4 T 80 4 T 85 4 T 90 4 T 95 4 T 100 4"
      fill="none"
      className="stroke-tide-300"
      strokeWidth="1.4"
      vectorEffect="non-scaling-stroke"
    />
  </svg>
);

/** The legend's swatch: the same wave and tint as on the face, so the words above name what is drawn. */
const WaveSwatch = () => (
  <svg aria-hidden="true" viewBox="0 0 24 12" className="inline-block h-3 w-6 shrink-0 align-[-1px]">
    <rect x="0" y="6" width="24" height="6" className="fill-tide-400/30" />
    <path d="M0 6 Q 3 2 6 6 T 12 6 T 18 6 T 24 6" fill="none" className="stroke-tide-300" strokeWidth="1.4" />
  </svg>
);

interface Geometry {
  /** Row track + row gap, px. */
  rowStep: number;
  /** Column track + column gap, px. */
  colStep: number;
  /** Where row 1 starts, from the top of the document. */
  top: number;
  /** Where column 1 starts, from the left of the scroll box's content. */
  left: number;
}

/** Reads the grid's resolved track sizes and where its first cell sits (CSS grid has already laid it out). */
function measure(grid: HTMLElement, box: HTMLElement): Geometry {
  const cs = getComputedStyle(grid);
  const first = (v: string) => parseFloat(v.split(" ")[0]) || 0;
  const g = grid.getBoundingClientRect();
  const b = box.getBoundingClientRect();
  return {
    rowStep: first(cs.gridTemplateRows) + (parseFloat(cs.rowGap) || 0),
    colStep: first(cs.gridTemplateColumns) + (parseFloat(cs.columnGap) || 0),
    top: g.top + window.scrollY + grid.clientTop + (parseFloat(cs.paddingTop) || 0),
    left: g.left - b.left + box.scrollLeft + grid.clientLeft + (parseFloat(cs.paddingLeft) || 0),
  };
}

const sameGeometry = (a: Geometry | null, b: Geometry) =>
  !!a &&
  Math.abs(a.rowStep - b.rowStep) < 0.5 &&
  Math.abs(a.colStep - b.colStep) < 0.5 &&
  Math.abs(a.top - b.top) < 0.5 &&
  Math.abs(a.left - b.left) < 0.5;

/**
 * Which tiles to draw: with windowing, those whose cells meet the visible rows and columns
 * (the page scrolls the rows, the board's own box scrolls the columns), plus the tile that holds
 * the keyboard focus and the open one, so Tab and the arrow keys always have a tile to land on.
 */
function useTileWindow(
  tiles: TileRow[],
  board: Board,
  keep: (string | null | undefined)[],
  big: boolean,
  printing: boolean,
  gridRef: RefObject<HTMLDivElement | null>,
  boxRef: RefObject<HTMLDivElement | null>,
) {
  const [geo, setGeo] = useState<Geometry | null>(null);
  useLayoutEffect(() => {
    const grid = gridRef.current;
    const box = boxRef.current;
    if (!big || !grid || !box) return;
    const update = () => {
      const next = measure(grid, box);
      setGeo((prev) => (sameGeometry(prev, next) ? prev : next));
    };
    // No measure here: reading the grid right after React wrote the page forced a layout of the whole page inside
    // the render's task. The observer's first call comes after the browser's own layout of this frame (a clean
    // read), and the tiles are drawn by the render that follows, a task of its own.
    const ro = new ResizeObserver(update);
    ro.observe(grid);
    ro.observe(document.body);
    window.addEventListener("resize", update);
    return () => {
      ro.disconnect();
      window.removeEventListener("resize", update);
    };
  }, [big, gridRef, boxRef]);
  const rowStep = geo?.rowStep || 96;
  const colStep = geo?.colStep || 96;
  const rows = useWindowVirtualizer({
    count: board.gridRows,
    estimateSize: () => rowStep,
    overscan: OVERSCAN,
    scrollMargin: geo?.top ?? 0,
    enabled: big && !!geo,
  });
  const cols = useVirtualizer({
    count: board.gridCols,
    horizontal: true,
    getScrollElement: () => boxRef.current,
    estimateSize: () => colStep,
    overscan: OVERSCAN,
    scrollMargin: geo?.left ?? 0,
    enabled: big && !!geo,
  });
  useLayoutEffect(() => {
    rows.measure();
    cols.measure();
  }, [rowStep, colStep, rows, cols]);
  const rowItems = rows.getVirtualItems();
  const colItems = cols.getVirtualItems();
  const r0 = rowItems.length ? rowItems[0].index + 1 : 1;
  const r1 = rowItems.length ? rowItems[rowItems.length - 1].index + 1 : 0;
  const c0 = colItems.length ? colItems[0].index + 1 : 1;
  const c1 = colItems.length ? colItems[colItems.length - 1].index + 1 : 0;
  const keepKey = keep.join("|");
  const windowed = big && !printing;
  const drawn = useMemo(() => {
    if (!windowed) return tiles;
    const kept = new Set(keepKey.split("|").filter(Boolean));
    return tiles.filter(
      (t) =>
        kept.has(t.id) ||
        (t.gridRow <= r1 && t.gridRow + t.rowSpan - 1 >= r0 && t.gridCol <= c1 && t.gridCol + t.colSpan - 1 >= c0),
    );
  }, [tiles, windowed, r0, r1, c0, c1, keepKey]);
  return { drawn, rows: windowed && r1 >= r0 ? ([r0, r1] as const) : null };
}

export function BoardElevation({
  board,
  tiles,
  total = tiles.length,
  complete = true,
  comingRows,
  onRows,
  filters,
  selectedId,
  onOpen,
}: {
  board: Board;
  /** The tiles read so far, in board order (a large board comes in pages). */
  tiles: TileRow[];
  /** How many positions the board has, read or not. */
  total?: number;
  /** Whether every page is in; until then the rows after the last tile read show that they are coming. */
  complete?: boolean;
  /**
   * The row ranges (first, last) not read yet, when the caller knows them (a board read in order and a page read
   * where the window is); by default every row after the last tile read, until `complete`.
   */
  comingRows?: readonly (readonly [number, number])[];
  /** Told the rows the window shows (first, last), each time they change; windowed boards only. */
  onRows?: (first: number, last: number) => void;
  filters: TileFilters;
  selectedId: string | null;
  onOpen: (t: TileRow) => void;
}) {
  const gridRef = useRef<HTMLDivElement>(null);
  const boxRef = useRef<HTMLDivElement>(null);
  const printing = usePrinting();
  const [activeId, setActiveId] = useState<string | null>(null);
  const focusId = (activeId && tiles.some((t) => t.id === activeId) ? activeId : null) ?? selectedId ?? tiles[0]?.id;
  const big = Math.max(tiles.length, total) > WINDOW_FROM;
  // Tiles come in board order: below the last one read, no row has been read yet.
  const readToRow = complete ? null : (tiles[tiles.length - 1]?.gridRow ?? 0);
  const coming = complete
    ? []
    : (comingRows ?? (readToRow !== null && readToRow < board.gridRows ? [[readToRow + 1, board.gridRows]] : []));
  const windowed = big && !printing;
  const { drawn, rows } = useTileWindow(tiles, board, [focusId, selectedId], big, printing, gridRef, boxRef);
  const [first, last] = rows ?? [0, 0];
  useEffect(() => {
    if (first > 0) onRows?.(first, last);
  }, [first, last, onRows]);
  const onKeyDown = useCallback(
    (e: KeyboardEvent<HTMLButtonElement>, t: TileRow) => {
      const next = neighbour(tiles, t, e.key);
      if (!next) return;
      e.preventDefault();
      // Draw the tile first (it may lie outside the window), then focus it: focus scrolls it into view.
      flushSync(() => setActiveId(next.id));
      gridRef.current?.querySelector<HTMLElement>(`[data-position-id="${next.id}"]`)?.focus();
    },
    [tiles],
  );
  return (
    <div
      ref={boxRef}
      className="overflow-x-auto rounded-lg bg-hull-950 p-2 ring-1 ring-hull-700"
      data-testid="board-elevation"
      data-windowed={windowed || undefined}
      data-drawn={drawn.length}
    >
      {/* The water line's words live in this key above the face, never on it: no label covers a tile. */}
      {board.waterLineMm != null && board.faceHeightMm ? (
        <p className="mb-2 flex items-center gap-2 text-sm text-tide-300" data-testid="water-line-key">
          <WaveSwatch />
          <span>
            Flood water line: {board.waterLineMm} mm up this {board.faceHeightMm} mm face; the tinted band is below it.
          </span>
        </p>
      ) : (
        <p className="mb-2 text-sm text-fog">No water line recorded for this board yet.</p>
      )}
      <div
        ref={gridRef}
        role="group"
        aria-label={`Front of ${board.name}: ${total} positions. Use the arrow keys to move between them, Enter to open one.`}
        className="relative grid gap-1.5 rounded-md border-4 border-hull-700 bg-hull-900 p-1.5"
        style={{
          gridTemplateColumns: `repeat(${board.gridCols}, minmax(5.25rem, 1fr))`,
          // Rows grow to fit a tile's words (a cut word misleads); a windowed board keeps them even, since it
          // places the drawn tiles from one measured row.
          gridTemplateRows: `repeat(${board.gridRows}, ${windowed ? `${ROW_REM}rem` : `minmax(${ROW_REM}rem, auto)`})`,
          minWidth: `${board.gridCols * 5.6}rem`,
        }}
      >
        {drawn.map((t) => (
          <BoardTile
            key={t.id}
            tile={t}
            dimmed={!tileMatches(t, filters)}
            selected={t.id === selectedId}
            tabIndex={t.id === focusId ? 0 : -1}
            onOpen={onOpen}
            onKeyDown={onKeyDown}
            onFocus={setActiveId}
          />
        ))}
        <WaterLine board={board} />
        {coming
          .filter(([from, to]) => from <= to)
          .map(([from, to]) => (
            <div
              key={from}
              aria-hidden="true"
              data-testid="board-rows-coming"
              className="pointer-events-none rounded-sm bg-hull-800/60 motion-safe:animate-pulse"
              style={{ gridRow: `${from} / ${to + 1}`, gridColumn: "1 / -1" }}
            />
          ))}
      </div>
    </div>
  );
}

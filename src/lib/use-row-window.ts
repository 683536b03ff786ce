import { useState, type RefObject } from "react";
import {
  defaultRangeExtractor,
  elementScroll,
  useVirtualizer,
  type Range,
  type VirtualItem,
  type Virtualizer,
} from "@tanstack/react-virtual";

/** Rows drawn past each edge of the box's visible part, so a short scroll or an arrow key finds its row drawn. */
const OVERSCAN = 4;

/**
 * The box's size from a ResizeObserver only. @tanstack/virtual-core's own observer reads the box's size at once when
 * the table mounts, right after React wrote the page: a layout forced inside the render's task (the same cost the
 * board's window had, see useTileWindow). Until the observer's first call (after the browser's own layout of the
 * frame, a clean read) the virtualizer works from `initialRect`, a guess good enough for the first rows.
 */
function observeBoxAfterLayout(
  instance: Virtualizer<HTMLElement, HTMLTableRowElement>,
  cb: (rect: { width: number; height: number }) => void,
) {
  const box = instance.scrollElement;
  if (!box || typeof ResizeObserver === "undefined") return;
  const ro = new ResizeObserver(() => cb({ width: box.clientWidth, height: box.clientHeight }));
  ro.observe(box);
  return () => ro.disconnect();
}

/**
 * A row's height from its ResizeObserver entry (delivered after layout), else the height already known or the
 * estimate: never a synchronous read of a row that was just drawn (virtual-core's fallback reads `offsetHeight`).
 */
function measuredAfterLayout<S extends HTMLElement | Window>(
  row: HTMLTableRowElement,
  entry: ResizeObserverEntry | undefined,
  instance: Virtualizer<S, HTMLTableRowElement>,
) {
  const box = entry?.borderBoxSize?.[0];
  if (box) return Math.round(box.blockSize);
  const index = instance.indexFromElement(row);
  return instance.itemSizeCache.get(instance.options.getItemKey(index)) ?? instance.options.estimateSize(index);
}

const written = new WeakSet<object>();

/**
 * Scrolls as virtual-core asks, but for its first request: when it mounts, virtual-core writes the scroll position it
 * started from back to the box (0), and writing a scroll position
 * makes the browser lay the page out there and then — the page's first style and layout pulled into the render's
 * task (traced on the register: a 935 ms task at load 12 where the render alone was ~500). That write changes nothing
 * and is left out.
 */
type ScrollFn<S extends HTMLElement | Window> = (
  offset: number,
  options: { adjustments?: number; behavior?: ScrollBehavior },
  instance: Virtualizer<S, HTMLTableRowElement>,
) => void;
const scrollAfterMount =
  <S extends HTMLElement | Window>(scroll: ScrollFn<S>): ScrollFn<S> =>
  (offset, options, instance) => {
    if (!written.has(instance)) {
      written.add(instance);
      return;
    }
    scroll(offset, options, instance);
  };
const scrollBox = scrollAfterMount<HTMLElement>(elementScroll);

/** One stretch of the table to draw: an empty row `gap` px tall (rows not drawn), then `item`'s row. */
export interface RowSlot {
  gap: number;
  item: VirtualItem;
}

export interface RowWindow {
  /** The rows to draw, in order, each with the height left empty before it. */
  slots: RowSlot[];
  /** The height left empty after the last row drawn. */
  after: number;
  /** Attach to each drawn `<tr>` (which carries `data-index`): its height is measured once laid out. */
  measure: (row: HTMLTableRowElement | null) => void;
  /** Brings row `index` into view (drawing it); the caller focuses it once drawn. */
  scrollTo: (index: number) => void;
  /** Keeps row `index` drawn wherever the box is scrolled (the row that holds the keyboard focus). */
  keep: (index: number | null) => void;
}

/**
 * A table's rows drawn only where its own scroll box shows them (plus OVERSCAN rows each side), through
 * @tanstack/react-virtual, with the rows not drawn left as empty height so the box scrolls as if every row were
 * there. `whole` draws every row (printing, or a list short enough not to need it). `headHeight` is the sticky
 * heading row above the rows; `boxHeight` the box's height before it is first measured.
 */
export function useRowWindow({
  count,
  rowHeight,
  headHeight,
  boxHeight,
  boxRef,
  whole,
}: {
  count: number;
  rowHeight: number;
  headHeight: number;
  boxHeight: () => number;
  boxRef: RefObject<HTMLElement | null>;
  whole: boolean;
}): RowWindow {
  const [kept, keep] = useState<number | null>(null);
  const v = useVirtualizer<HTMLElement, HTMLTableRowElement>({
    count,
    getScrollElement: () => boxRef.current,
    estimateSize: () => rowHeight,
    paddingStart: headHeight,
    overscan: whole ? count : OVERSCAN,
    initialRect: { width: typeof window === "undefined" ? 0 : window.innerWidth, height: boxHeight() },
    observeElementRect: observeBoxAfterLayout,
    scrollToFn: scrollBox,
    measureElement: measuredAfterLayout,
    rangeExtractor: extractor(kept, whole),
  });
  return windowOf(v, headHeight, keep);
}

/** The keyboard's row kept drawn wherever the list is scrolled; `whole` draws every row. */
const extractor =
  (kept: number | null, whole: boolean) =>
  (range: Range): number[] => {
    const drawn = whole ? Array.from({ length: range.count }, (_, i) => i) : defaultRangeExtractor(range);
    return kept != null && kept < range.count && !drawn.includes(kept) ? [...drawn, kept].sort((a, b) => a - b) : drawn;
  };

function windowOf<S extends HTMLElement | Window>(
  v: Virtualizer<S, HTMLTableRowElement>,
  start: number,
  keep: (index: number | null) => void,
): RowWindow {
  const items = v.getVirtualItems();
  let end = start;
  const slots = items.map((item) => {
    const gap = Math.max(0, item.start - end);
    end = item.end;
    return { gap, item };
  });
  return {
    slots,
    after: Math.max(0, v.getTotalSize() + (v.options.scrollMargin ?? 0) - end),
    measure: v.measureElement,
    scrollTo: (index) => v.scrollToIndex(index, { align: "auto" }),
    keep,
  };
}

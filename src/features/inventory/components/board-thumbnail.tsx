import { useEffect, useRef, useState } from "react";
import { waterLineFromTop } from "../../../domain/board-geometry";
import { useBoardThumbnail } from "../api";
import { custodyPattern, gradeBar } from "./tile-style";

/** True once the element has come within a screen of the viewport (then stays true). */
function useNearScreen<T extends Element>() {
  const ref = useRef<T>(null);
  const [near, setNear] = useState(() => typeof IntersectionObserver === "undefined"); // no observer: read at once
  useEffect(() => {
    const el = ref.current;
    if (near || !el) return;
    const io = new IntersectionObserver((entries) => entries.some((e) => e.isIntersecting) && setNear(true), {
      rootMargin: "100% 0px",
    });
    io.observe(el);
    return () => io.disconnect();
  }, [near]);
  return [ref, near] as const;
}

/**
 * A small picture of the board's front: one cell per position, filled by rust band, hatched when out. Decorative; the
 * card says it in words. Read only when the card comes near the screen, from the board's compact thumbnail (a few
 * bytes a position), so a list of a hundred boards never reads a hundred boards' tiles.
 */
export function BoardThumbnail({ siteId, boardId }: { siteId: string; boardId: string }) {
  const [ref, near] = useNearScreen<HTMLDivElement>();
  const q = useBoardThumbnail(siteId, boardId, near);
  if (!q.data)
    return <div ref={ref} data-testid="board-thumbnail" className="h-24 rounded bg-hull-900" aria-hidden="true" />;
  const t = q.data;
  const line = t.waterLineMm != null && t.faceHeightMm ? waterLineFromTop(t.waterLineMm, t.faceHeightMm) * 100 : null;
  return (
    <div
      ref={ref}
      data-testid="board-thumbnail"
      data-cells={t.cells.length}
      aria-hidden="true"
      className="relative rounded border-2 border-hull-700 bg-hull-900 p-1"
    >
      <div
        className="grid h-24 gap-px"
        style={{
          gridTemplateColumns: `repeat(${t.gridCols}, 1fr)`,
          gridTemplateRows: `repeat(${t.gridRows}, 1fr)`,
        }}
      >
        {t.cells.map(([row, col, rowSpan, colSpan, grade, custody], i) => (
          <span
            key={i}
            className={`rounded-[2px] ${grade == null ? "bg-hull-600" : gradeBar(grade)}`}
            style={{
              gridRow: `${row} / span ${rowSpan}`,
              gridColumn: `${col} / span ${colSpan}`,
              opacity: 0.85,
              ...custodyPattern(custody ?? undefined),
            }}
          />
        ))}
      </div>
      {line != null && <span className="absolute inset-x-0 border-t-2 border-tide-300" style={{ top: `${line}%` }} />}
    </div>
  );
}

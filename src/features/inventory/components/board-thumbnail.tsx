import { waterLineFromTop } from "../../../domain/board-geometry";
import { useBoard } from "../api";
import { custodyPattern, gradeBar } from "./tile-style";

/** A small picture of the board's front: one cell per position, filled by rust band, hatched when out. Decorative; the card says it in words. */
export function BoardThumbnail({ siteId, boardId }: { siteId: string; boardId: string }) {
  const q = useBoard(siteId, boardId);
  if (!q.data) return <div className="h-24 rounded bg-hull-900" aria-hidden="true" />;
  const { board, positions } = q.data;
  const line =
    board.waterLineMm != null && board.faceHeightMm
      ? waterLineFromTop(board.waterLineMm, board.faceHeightMm) * 100
      : null;
  return (
    <div aria-hidden="true" className="relative rounded border-2 border-hull-700 bg-hull-900 p-1">
      <div
        className="grid h-24 gap-px"
        style={{
          gridTemplateColumns: `repeat(${board.gridCols}, 1fr)`,
          gridTemplateRows: `repeat(${board.gridRows}, 1fr)`,
        }}
      >
        {positions.map((p) => (
          <span
            key={p.id}
            className={`rounded-[2px] ${p.latest?.astmGrade == null ? "bg-hull-600" : gradeBar(p.latest.astmGrade)}`}
            style={{
              gridRow: `${p.gridRow} / span ${p.rowSpan}`,
              gridColumn: `${p.gridCol} / span ${p.colSpan}`,
              opacity: 0.85,
              ...custodyPattern(p.component?.custody),
            }}
          />
        ))}
      </div>
      {line != null && <span className="absolute inset-x-0 border-t-2 border-tide-300" style={{ top: `${line}%` }} />}
    </div>
  );
}

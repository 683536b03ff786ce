import { forwardRef, type KeyboardEvent } from "react";
import { COMPONENT_KIND_LABELS, COMPONENT_KIND_SHORT, CUSTODY_LABELS, DISPOSITION_LABELS } from "../../../domain/vocab";
import type { TileRow } from "../contract";
import { KindGlyph } from "./kind-glyph";
import { CUSTODY_SHORT, DISPOSITION_STYLE, custodyPattern, gradeTone } from "./tile-style";

/** Designations longer than this take a smaller face on a one-column tile (9 characters of 13 px mono fill one). */
const LONG_DESIGNATION = 9;

interface Props {
  tile: TileRow;
  dimmed: boolean;
  selected: boolean;
  tabIndex: number;
  onOpen: (tile: TileRow) => void;
  onKeyDown: (e: KeyboardEvent<HTMLButtonElement>, tile: TileRow) => void;
  /** Told which tile took the focus (the board keeps that one drawn and in the tab order). */
  onFocus?: (id: string) => void;
}

/** The words a screen reader hears for one tile: everything the drawing shows. */
export function tileDescription(t: TileRow): string {
  const c = t.component;
  const parts = [`Position ${t.designation}`, COMPONENT_KIND_LABELS[t.kind]];
  if (t.circuit) parts.push(`feeds ${t.circuit}`);
  parts.push(t.latest?.astmGrade != null ? `rust grade ${t.latest.astmGrade}` : "not graded");
  parts.push(
    c?.disposition ? DISPOSITION_LABELS[c.disposition] + (c.dispositionOverridden ? " (override)" : "") : "undecided",
  );
  if (c && c.custody !== "in_place") parts.push(CUSTODY_LABELS[c.custody]);
  if (t.photoCount > 0) parts.push(`${t.photoCount} photo${t.photoCount === 1 ? "" : "s"}`);
  if (t.openDefectCount > 0) parts.push(`${t.openDefectCount} open defect${t.openDefectCount === 1 ? "" : "s"}`);
  return parts.join(", ");
}

export const BoardTile = forwardRef<HTMLButtonElement, Props>(function BoardTile(
  { tile: t, dimmed, selected, tabIndex, onOpen, onKeyDown, onFocus },
  ref,
) {
  const c = t.component;
  const grade = t.latest?.astmGrade ?? null;
  const disp = c?.disposition ?? "undecided";
  const out = c && c.custody !== "in_place";
  return (
    <button
      ref={ref}
      type="button"
      data-testid={`tile-${t.designation}`}
      data-position-id={t.id}
      data-dimmed={dimmed || undefined}
      aria-label={tileDescription(t)}
      aria-pressed={selected}
      tabIndex={tabIndex}
      onClick={() => onOpen(t)}
      onKeyDown={(e) => onKeyDown(e, t)}
      onFocus={onFocus ? () => onFocus(t.id) : undefined}
      style={{
        gridRow: `${t.gridRow} / span ${t.rowSpan}`,
        gridColumn: `${t.gridCol} / span ${t.colSpan}`,
        ...custodyPattern(c?.custody),
      }}
      className={`group relative flex min-h-[4.5rem] flex-col overflow-hidden rounded-md bg-hull-800 p-1.5 text-left text-chalk ring-1 transition-opacity
        ${selected ? "ring-2 ring-brass-300" : c?.custody === "missing" ? "ring-0 outline-2 outline-dashed outline-fog" : "ring-hull-600 hover:ring-brass-400"}
        ${dimmed ? "opacity-25" : ""}`}
    >
      {c?.dispositionOverridden && (
        <span
          aria-hidden="true"
          className="absolute right-0 top-0 h-0 w-0 border-l-[14px] border-t-[14px] border-l-transparent border-t-brass-300"
        />
      )}
      {/* Designation and grade share the first line while they fit; a long designation takes a smaller face on a
          one-column tile and wraps (anywhere, being one word), the grade going under it — a cut word ("OUT · …") misleads whoever reads the board. */}
      <span
        className={`flex flex-wrap items-start justify-between gap-x-1 gap-y-0.5 ${c?.dispositionOverridden ? "pr-2.5" : ""}`}
      >
        <span
          data-testid="tile-designation"
          className={`min-w-0 font-mono font-bold tracking-tight [overflow-wrap:anywhere] ${
            t.designation.length > LONG_DESIGNATION && t.colSpan === 1
              ? "text-[11px] leading-[13px]"
              : "text-[13px] leading-4"
          }`}
        >
          {t.designation}
        </span>
        <span className={`ml-auto shrink-0 rounded px-1 font-mono text-[11px] font-bold leading-4 ${gradeTone(grade)}`}>
          {grade == null ? "G –" : `G${grade}`}
        </span>
      </span>
      {/* Kind and rating wrap as two pieces when the tile is narrow ("MCCB" / "100 A"). */}
      <span className="mt-1 flex flex-wrap items-center gap-x-1 text-[11px] leading-[14px] text-mist">
        <span className="flex items-center gap-1 whitespace-nowrap">
          <KindGlyph kind={t.kind} className="h-3.5 w-3.5 shrink-0" />
          {COMPONENT_KIND_SHORT[t.kind]}
        </span>
        {c?.ratingAmps != null && <span className="whitespace-nowrap text-fog">{c.ratingAmps} A</span>}
      </span>
      {/* Disposition, then the photo and defect marks beside it, wrapping under it when the tile is narrow. */}
      <span className="mt-auto flex flex-wrap items-center justify-between gap-x-1 gap-y-0.5 pt-1">
        <span
          className={`inline-block whitespace-nowrap rounded border bg-hull-900/80 px-1 text-[10px] leading-[14px] ${DISPOSITION_STYLE[disp].chip}`}
        >
          <span aria-hidden="true">{DISPOSITION_STYLE[disp].mark} </span>
          {disp === "undecided" ? "undecided" : DISPOSITION_LABELS[disp].toLowerCase()}
        </span>
        {(t.photoCount > 0 || t.openDefectCount > 0) && (
          <span className="ml-auto flex shrink-0 gap-0.5" aria-hidden="true">
            {t.photoCount > 0 && (
              <span className="flex items-center rounded bg-hull-950/80 px-0.5 text-tide-300" title="photos">
                <svg viewBox="0 0 16 16" className="h-3 w-3" fill="none" stroke="currentColor" strokeWidth="1.6">
                  <path d="M2 5h3l1.5-2h3L11 5h3v8H2Z" />
                  <circle cx="8" cy="9" r="2.3" />
                </svg>
              </span>
            )}
            {t.openDefectCount > 0 && (
              <span className="rounded bg-flare-700 px-1 text-[10px] font-bold leading-3 text-chalk ring-1 ring-flare-400">
                !{t.openDefectCount}
              </span>
            )}
          </span>
        )}
      </span>
      {/* Custody in full words across the whole tile: they wrap between words, never cut. */}
      {out && (
        <span
          className="mt-0.5 text-[10px] font-semibold uppercase leading-3 tracking-wide text-chalk"
          data-testid="tile-custody"
        >
          {CUSTODY_SHORT[c.custody]}
        </span>
      )}
    </button>
  );
});

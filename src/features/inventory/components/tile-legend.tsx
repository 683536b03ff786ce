import {
  COMPONENT_KIND_LABELS,
  COMPONENT_KIND_SHORT,
  COMPONENT_KINDS,
  DISPOSITION_LABELS,
  DISPOSITIONS,
} from "../../../domain/vocab";
import { KindGlyph } from "./kind-glyph";
import { DISPOSITION_STYLE, GRADE_BANDS, custodyPattern } from "./tile-style";

const Swatch = ({ style, className = "" }: { style?: React.CSSProperties; className?: string }) => (
  <span
    aria-hidden="true"
    className={`inline-block h-5 w-7 shrink-0 rounded bg-hull-800 ring-1 ring-hull-600 ${className}`}
    style={style}
  />
);

/** What every mark on a tile means, in words. */
export function TileLegend() {
  return (
    <details className="rounded-lg bg-hull-850 p-3 text-sm ring-1 ring-hull-700" open>
      <summary className="min-h-8 cursor-pointer font-semibold">How to read a tile</summary>
      <div className="mt-2 grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <section>
          <h3 className="text-xs font-semibold uppercase tracking-wide text-fog">Rust grade (ASTM D610)</h3>
          <ul className="mt-1 space-y-1">
            {GRADE_BANDS.map((b) => (
              <li key={b.key} className="flex items-center gap-2">
                <span className={`rounded px-1 font-mono text-xs font-bold ${b.tone}`}>G{b.max}</span>
                {b.label}
              </li>
            ))}
            <li className="flex items-center gap-2">
              <span className="rounded bg-hull-700 px-1 font-mono text-xs font-bold text-mist">G –</span>Not graded yet
            </li>
          </ul>
        </section>
        <section>
          <h3 className="text-xs font-semibold uppercase tracking-wide text-fog">Disposition</h3>
          <ul className="mt-1 space-y-1">
            {DISPOSITIONS.map((d) => (
              <li key={d} className="flex items-center gap-2">
                <span className={`rounded border px-1 text-xs ${DISPOSITION_STYLE[d].chip}`}>
                  {DISPOSITION_STYLE[d].mark} {DISPOSITION_LABELS[d].toLowerCase()}
                </span>
              </li>
            ))}
            <li>
              <span className={`rounded border px-1 text-xs ${DISPOSITION_STYLE.undecided.chip}`}>· undecided</span> not
              decided yet
            </li>
            <li className="flex items-center gap-2">
              <span
                aria-hidden="true"
                className="relative inline-block h-5 w-7 rounded bg-hull-800 ring-1 ring-hull-600"
              >
                <span className="absolute right-0 top-0 border-l-[10px] border-t-[10px] border-l-transparent border-t-brass-300" />
              </span>
              Corner notch: curator overrode the recommendation
            </li>
          </ul>
        </section>
        <section>
          <h3 className="text-xs font-semibold uppercase tracking-wide text-fog">Where the part is</h3>
          <ul className="mt-1 space-y-1">
            <li className="flex items-center gap-2">
              <Swatch />
              In place (no pattern)
            </li>
            <li className="flex items-center gap-2">
              <Swatch style={custodyPattern("removed")} />
              Hatched ╲: removed or in the workshop
            </li>
            <li className="flex items-center gap-2">
              <Swatch style={custodyPattern("ready_to_refit")} />
              Hatched ╱: ready to refit
            </li>
            <li className="flex items-center gap-2">
              <Swatch style={custodyPattern("scrapped")} />
              Cross-hatched: scrapped
            </li>
            <li className="flex items-center gap-2">
              <Swatch style={custodyPattern("missing")} className="outline-2 outline-dashed outline-fog" />
              Dotted, dashed edge: missing
            </li>
          </ul>
        </section>
        <section>
          <h3 className="text-xs font-semibold uppercase tracking-wide text-fog">Kinds and badges</h3>
          <ul className="mt-1 grid grid-cols-2 gap-x-2 gap-y-0.5">
            {COMPONENT_KINDS.map((k) => (
              <li key={k} className="flex items-center gap-1 text-xs" title={COMPONENT_KIND_LABELS[k]}>
                <KindGlyph kind={k} className="h-4 w-4 shrink-0 text-mist" />
                <span className="font-mono">{COMPONENT_KIND_SHORT[k]}</span>
                <span className="sr-only">{COMPONENT_KIND_LABELS[k]}</span>
              </li>
            ))}
          </ul>
          <p className="mt-2 text-xs text-mist">
            <span className="text-tide-300">▣ camera</span>: has photos ·{" "}
            <span className="rounded bg-flare-700 px-1 text-chalk">!2</span>: open defects
          </p>
        </section>
      </div>
    </details>
  );
}

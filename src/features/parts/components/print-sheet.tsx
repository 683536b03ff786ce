import {
  COMPONENT_KIND_LABELS,
  HERITAGE_RULE_LABELS,
  type ComponentKind,
  type HeritageRule,
} from "../../../domain/vocab";
import { frameWords } from "../../../domain/part-workflow";

export interface SheetLine {
  ref: string;
  title: string;
  kind: ComponentKind;
  ratingAmps: number | null;
  poles: number | null;
  voltageRating: number | null;
  frame: string;
  mounting: string;
  maker: string;
  model: string;
  need: string;
  qty: number;
  heritageRule: HeritageRule;
  photoUrl: string | null;
  positions?: string;
}

const RULE_MARK: Record<HeritageRule, string> = { original_only: "◆", period_ok: "◈", modern_ok: "○" };

/** One card per line: what to look for, how many, how strict, and the nameplate to recognise it by. Prints clean on white. */
export function PrintSheet({ lines }: { lines: SheetLine[] }) {
  return (
    <ol className="grid gap-3 print:block">
      {lines.map((l) => (
        <li
          key={l.ref}
          data-testid="sheet-line"
          className="grid grid-cols-[7rem_1fr] gap-3 rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700 print:mb-3 print:break-inside-avoid print:bg-white print:text-black print:ring-black"
        >
          {l.photoUrl ? (
            <img
              src={l.photoUrl}
              alt={`Nameplate of ${l.title}`}
              className="h-28 w-28 rounded object-cover"
              loading="lazy"
            />
          ) : (
            <div className="flex h-28 w-28 items-center justify-center rounded border border-dashed border-hull-500 p-2 text-center text-xs text-mist print:border-black print:text-black">
              no nameplate photo
            </div>
          )}
          <div className="min-w-0 wrap-anywhere">
            <p className="text-sm text-mist print:text-black">
              Line {l.ref} · {COMPONENT_KIND_LABELS[l.kind]}
            </p>
            <h2 className="font-bold">{l.title}</h2>
            <p className="mt-1 font-semibold">
              Wanted: {l.qty} · <span aria-hidden="true">{RULE_MARK[l.heritageRule]}</span>{" "}
              {HERITAGE_RULE_LABELS[l.heritageRule]}
            </p>
            <p className="mt-1 font-mono text-sm">
              {[
                l.ratingAmps != null && `${l.ratingAmps} A`,
                l.poles != null && `${l.poles} poles`,
                l.voltageRating != null && `${l.voltageRating} V`,
                l.frame && frameWords(l.frame),
                l.mounting,
                [l.maker, l.model].filter(Boolean).join(" "),
              ]
                .filter(Boolean)
                .join(" · ")}
            </p>
            {l.need && <p className="text-sm">Part: {l.need}</p>}
            {l.positions && <p className="text-sm text-mist print:text-black">For positions: {l.positions}</p>}
          </div>
        </li>
      ))}
    </ol>
  );
}

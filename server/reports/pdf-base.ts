/**
 * What every Tideline PDF shares: the app's own fonts (from fonts/, embedded and
 * subset by pdfkit), its palette mapped for paper, and text that falls back to another
 * shipped font for a character the first one lacks (Ω is only in the mono Greek file).
 */
import { join } from "node:path";
import * as fontkit from "fontkit";
import PDFDocument from "pdfkit";
import { projectRoot } from "../../db/pg";

const FONT_DIR = join(projectRoot, "fonts");

/**
 * Static WOFF cuts of the app's two families (pdfkit's font engine cannot subset the
 * variable WOFF2 files the browser uses; see fonts/README.md).
 */
export const FONT_FILES = {
  body: "atkinson-hyperlegible-next-latin-400-normal.woff",
  bold: "atkinson-hyperlegible-next-latin-700-normal.woff",
  italic: "atkinson-hyperlegible-next-latin-400-italic.woff",
  ext: "atkinson-hyperlegible-next-latin-ext-400-normal.woff",
  mono: "jetbrains-mono-latin-400-normal.woff",
  monoBold: "jetbrains-mono-latin-700-normal.woff",
  greek: "jetbrains-mono-greek-400-normal.woff",
} as const;
export type FontName = keyof typeof FONT_FILES;

/** Fallback order after the requested font when a character is missing. */
const FALLBACK: FontName[] = ["body", "ext", "mono", "greek"];

/** Characters none of the shipped fonts draw, written out instead. */
const SUBSTITUTES: Record<string, string> = {
  "≥": ">=",
  "≤": "<=",
  "→": "->",
  "←": "<-",
  "✕": "x",
  "×": "x",
  "✓": "yes",
  "⚠": "!",
  "−": "-",
  "○": "o",
  "◇": "<>",
  "⌕": "?",
  "…": "...",
  "’": "'",
  "‘": "'",
  "“": '"',
  "”": '"',
  "⅝": "5/8",
  "\u00a0": " ",
};

type Glyphs = { hasGlyphForCodePoint(cp: number): boolean };
let glyphCache: Map<FontName, Glyphs> | null = null;
function glyphs(): Map<FontName, Glyphs> {
  if (!glyphCache) {
    glyphCache = new Map(
      (Object.keys(FONT_FILES) as FontName[]).map((n) => [n, fontkit.openSync(join(FONT_DIR, FONT_FILES[n]))]),
    );
  }
  return glyphCache;
}

/** The printable palette: Tideline's "night watch" colours, darker tones on white paper. */
export const INK = {
  text: "#0d141b", // hull-900
  muted: "#4a5f6c", // hull-500
  rule: "#b4c3cd", // mist
  faint: "#edf2f5", // chalk
  brass: "#7a5714", // brass-700, headings
  brassBar: "#cf972c", // brass-500, rules and bars
  kelp: "#1d5a49",
  kelpLight: "#8fe0c6",
  rust: "#7c3a1c",
  rustLight: "#f5ae8c",
  flare: "#7d2222",
  flareLight: "#ff9d9d",
  tide: "#1f4775",
  tideLight: "#9cc8ff",
  brassLight: "#f0cd80",
} as const;

export const PT_PER_MM = 72 / 25.4;
export const mm = (v: number) => v * PT_PER_MM;

export function newDocument(opts: {
  size: "A4" | "LETTER" | [number, number];
  margin: number;
  title: string;
  author: string;
  subject: string;
}) {
  const doc = new PDFDocument({
    size: opts.size,
    margin: opts.margin,
    autoFirstPage: false,
    compress: true,
    info: {
      Title: opts.title,
      Author: opts.author,
      Subject: opts.subject,
      Creator: "Tideline",
      Producer: "Tideline (pdfkit)",
    },
    lang: "en",
  });
  for (const n of Object.keys(FONT_FILES) as FontName[]) doc.registerFont(n, join(FONT_DIR, FONT_FILES[n]));
  doc.font("body");
  return doc;
}

/** Splits text into runs of one font each: the wanted font where it has the glyph, else the first fallback that does. */
export function fontRuns(text: string, wanted: FontName): Array<{ font: FontName; text: string }> {
  const g = glyphs();
  const clean = [...text].map((ch) => SUBSTITUTES[ch] ?? ch).join("");
  const runs: Array<{ font: FontName; text: string }> = [];
  for (const ch of clean) {
    const cp = ch.codePointAt(0)!;
    let font: FontName = wanted;
    if (cp > 0x20 && !g.get(wanted)!.hasGlyphForCodePoint(cp))
      font = FALLBACK.find((f) => g.get(f)!.hasGlyphForCodePoint(cp)) ?? wanted;
    const last = runs[runs.length - 1];
    if (last && last.font === font) last.text += ch;
    else runs.push({ font, text: ch });
  }
  return runs;
}

/**
 * JetBrains Mono draws "...", "->", "<=" and the like as contextual ligatures whose glyphs
 * the Latin subset file lacks (fontkit then reads past the table). Readings and tags
 * want plain characters anyway: contextual alternates and ligatures off for the mono faces.
 * A fresh object each time, since fontkit fills it in.
 */
const featuresFor = (font: FontName) =>
  font === "mono" || font === "monoBold" || font === "greek"
    ? ({ calt: false, liga: false } as unknown as PDFKit.Mixins.TextOptions["features"])
    : undefined;

export type TextOpts = PDFKit.Mixins.TextOptions & { font?: FontName; size?: number; color?: string };

/** doc.text with Tideline's fonts and the fallback runs; x/y as pdfkit's. */
export function text(
  doc: PDFKit.PDFDocument,
  str: string,
  x: number | undefined,
  y: number | undefined,
  opts: TextOpts = {},
) {
  const { font = "body", size, color, ...rest } = opts;
  if (size) doc.fontSize(size);
  doc.fillColor(color ?? INK.text);
  const runs = fontRuns(str, font);
  if (runs.length <= 1) {
    const f = runs[0]?.font ?? font;
    doc.font(f);
    const o = { ...rest, features: featuresFor(f) };
    if (x === undefined) doc.text(runs[0]?.text ?? "", o);
    else doc.text(runs[0]?.text ?? "", x, y, o);
    return doc;
  }
  runs.forEach((r, i) => {
    doc.font(r.font);
    const o = { ...rest, features: featuresFor(r.font), continued: i < runs.length - 1 };
    if (i === 0 && x !== undefined) doc.text(r.text, x, y, o);
    else doc.text(r.text, o);
  });
  return doc;
}

/** Height the text would take in a box of this width (same fallback fonts). */
export function heightOf(doc: PDFKit.PDFDocument, str: string, width: number, opts: TextOpts = {}) {
  const { font = "body", size, ...rest } = opts;
  if (size) doc.fontSize(size);
  doc.font(font);
  const clean = fontRuns(str, font)
    .map((r) => r.text)
    .join("");
  return doc.heightOfString(clean, { width, ...rest, features: featuresFor(font) });
}

export function widthOf(doc: PDFKit.PDFDocument, str: string, opts: { font?: FontName; size?: number } = {}) {
  if (opts.size) doc.fontSize(opts.size);
  let w = 0;
  for (const r of fontRuns(str, opts.font ?? "body")) {
    doc.font(r.font);
    w += doc.widthOfString(r.text, { features: featuresFor(r.font) });
  }
  return w;
}

/** Writes text clipped to one line at most `width` wide (ending in "..." when cut). */
export function line(doc: PDFKit.PDFDocument, str: string, x: number, y: number, width: number, opts: TextOpts = {}) {
  let s = str.replace(/\s+/g, " ");
  if (widthOf(doc, s, opts) > width) {
    while (s.length > 1 && widthOf(doc, s + "...", opts) > width) s = s.slice(0, -1);
    s += "...";
  }
  return text(doc, s, x, y, { ...opts, lineBreak: false, width: width + 2 });
}

/** The caution printed in every report and on the labels page: it defers to the standards and to qualified people. */
export const SAFETY_CAUTION = [
  "Flooded switchgear can kill: electric shock and arc flash.",
  "Testing and re-energising flood-damaged switchgear is hazardous work. Establish an electrically safe work condition, keep to the approach boundaries and personal protective equipment of NFPA 70E (or your jurisdiction's equivalent), apply lockout/tagout, and follow the manufacturer's instructions and local codes. A qualified, licensed person decides every test and every energisation.",
];

export const SCOPE_STATEMENT =
  "This report records observations and readings made by the crew and computations against the criteria they recorded. It certifies nothing: it does not declare any equipment safe, fit for service or ready to energise.";

/**
 * Label stock Tideline prints tag labels on. Geometry of the common sheet formats
 * (all in millimetres; from memory of the stationers' published layouts, which are
 * common practice and sold by many makers under compatible codes — measure one of
 * your sheets against these before a long run). The thermal roll is one label per
 * page at the printer's own size.
 */

export interface LabelSheet {
  id: string;
  label: string;
  /** Page size, mm. */
  pageWidth: number;
  pageHeight: number;
  cols: number;
  rows: number;
  /** Label size, mm. */
  labelWidth: number;
  labelHeight: number;
  /** Distance from the page's top / left edge to the first label, mm. */
  top: number;
  left: number;
  /** Distance from one label's left (top) edge to the next one's, mm. */
  pitchX: number;
  pitchY: number;
  /** Where the figures come from. */
  source: string;
}

const IN = 25.4;

export const LABEL_SHEETS = [
  {
    id: "a4-21",
    label: "A4, 21 labels (3 × 7), 63.5 × 38.1 mm",
    pageWidth: 210,
    pageHeight: 297,
    cols: 3,
    rows: 7,
    labelWidth: 63.5,
    labelHeight: 38.1,
    top: 15.15,
    left: 7.2,
    pitchX: 66.0,
    pitchY: 38.1,
    source: "Common A4 21-up address-label layout, from memory (common practice)",
  },
  {
    id: "a4-24",
    label: "A4, 24 labels (3 × 8), 63.5 × 33.9 mm",
    pageWidth: 210,
    pageHeight: 297,
    cols: 3,
    rows: 8,
    labelWidth: 63.5,
    labelHeight: 33.9,
    top: 12.9,
    left: 7.2,
    pitchX: 66.0,
    pitchY: 33.9,
    source: "Common A4 24-up address-label layout, from memory (common practice)",
  },
  {
    id: "letter-30",
    label: "US Letter, 30 labels (3 × 10), 2⅝ × 1 in",
    pageWidth: 8.5 * IN,
    pageHeight: 11 * IN,
    cols: 3,
    rows: 10,
    labelWidth: 2.625 * IN,
    labelHeight: 1 * IN,
    top: 0.5 * IN,
    left: 0.1875 * IN,
    pitchX: 2.75 * IN,
    pitchY: 1 * IN,
    source: "Common US Letter 30-up address-label layout, from memory (common practice)",
  },
  {
    id: "letter-10",
    label: "US Letter, 10 labels (2 × 5), 4 × 2 in",
    pageWidth: 8.5 * IN,
    pageHeight: 11 * IN,
    cols: 2,
    rows: 5,
    labelWidth: 4 * IN,
    labelHeight: 2 * IN,
    top: 0.5 * IN,
    left: 0.15625 * IN,
    pitchX: 4.1875 * IN,
    pitchY: 2 * IN,
    source: "Common US Letter 10-up shipping-label layout, from memory (common practice)",
  },
  {
    id: "thermal-50x25",
    label: "Thermal label printer, 50 × 25 mm, one per label",
    pageWidth: 50,
    pageHeight: 25,
    cols: 1,
    rows: 1,
    labelWidth: 50,
    labelHeight: 25,
    top: 0,
    left: 0,
    pitchX: 50,
    pitchY: 25,
    source: "A common small thermal label size (common practice): the page is the label",
  },
] as const satisfies readonly LabelSheet[];

export type LabelSheetId = (typeof LABEL_SHEETS)[number]["id"];
export const LABEL_SHEET_IDS = LABEL_SHEETS.map((s) => s.id) as [LabelSheetId, ...LabelSheetId[]];

export const labelSheet = (id: LabelSheetId): LabelSheet => LABEL_SHEETS.find((s) => s.id === id)!;

export interface LabelSlot {
  /** 0-based page. */
  page: number;
  /** 1-based label number on its sheet (left to right, top to bottom). */
  number: number;
  /** Top-left corner of the label, mm from the page's top-left. */
  x: number;
  y: number;
}

/**
 * Where each of `count` labels goes when printing starts at label `start` (1-based) of
 * the first sheet: the labels before it on a part-used sheet are skipped, later sheets
 * start at label 1.
 * @throws RangeError when start is outside the sheet or count is negative
 */
export function labelSlots(sheet: LabelSheet, count: number, start = 1): LabelSlot[] {
  const perSheet = sheet.cols * sheet.rows;
  if (!Number.isInteger(start) || start < 1 || start > perSheet)
    throw new RangeError(`start must be 1…${perSheet} for this sheet`);
  if (!Number.isInteger(count) || count < 0) throw new RangeError("count must be a whole number ≥ 0");
  const slots: LabelSlot[] = [];
  for (let i = 0; i < count; i++) {
    const n = start - 1 + i;
    const page = Math.floor(n / perSheet);
    const k = n % perSheet;
    const row = Math.floor(k / sheet.cols);
    const col = k % sheet.cols;
    slots.push({ page, number: k + 1, x: sheet.left + col * sheet.pitchX, y: sheet.top + row * sheet.pitchY });
  }
  return slots;
}

/** Checks that a sheet's labels fit on its page and do not overlap (used by the tests and at start-up). */
export function sheetFits(sheet: LabelSheet): boolean {
  const eps = 0.01;
  const right = sheet.left + (sheet.cols - 1) * sheet.pitchX + sheet.labelWidth;
  const bottom = sheet.top + (sheet.rows - 1) * sheet.pitchY + sheet.labelHeight;
  return (
    right <= sheet.pageWidth + eps &&
    bottom <= sheet.pageHeight + eps &&
    sheet.pitchX + eps >= sheet.labelWidth &&
    sheet.pitchY + eps >= sheet.labelHeight
  );
}

/** The short URL a tag's QR code carries: `<base>/t/<tag>`. */
export const tagUrl = (baseUrl: string, tag: string) => `${baseUrl.replace(/\/+$/, "")}/t/${encodeURIComponent(tag)}`;

/**
 * The tag in a scanned code: a Tideline short URL (any host — a label printed on another
 * machine of the same crew still names the tag) or the bare tag number itself.
 */
export function tagFromScan(text: string): string | null {
  const t = text.trim();
  if (!t) return null;
  const m = /^(?:https?:\/\/[^/\s]+)?\/t\/([^/?#\s]+)\/?(?:[?#].*)?$/i.exec(t);
  if (m) {
    try {
      return decodeURIComponent(m[1]);
    } catch {
      return null;
    }
  }
  if (/^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$/.test(t)) return t;
  return null;
}

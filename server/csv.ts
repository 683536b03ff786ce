/**
 * CSV as every export writes it: RFC 4180 through papaparse (CRLF, quoted where needed),
 * UTF-8 with a byte-order mark so spreadsheets pick the encoding, and the CSV-injection
 * guard OWASP describes ("CSV Injection"): a text cell starting
 * with = + - @, tab or carriage return gets a leading single quote.
 */
import Papa from "papaparse";

export const BOM = "\uFEFF";

/** Cells a spreadsheet would run as a formula. papaparse's own default pattern stops at a line break. */
export const RISKY = /^[=+\-@\t\r]/;

export const guardCell = (v: string) => (RISKY.test(v) ? `'${v}` : v);

/** Undoes the guard on import, so an exported file reads back as it was. */
export const unguardCell = (v: string) => (v.length > 1 && v[0] === "'" && RISKY.test(v.slice(1)) ? v.slice(1) : v);

/**
 * Text a spreadsheet opening the CSV would turn into something else (common practice, seen in
 * LibreOffice Calc and Excel with their default import): a number ("007" → 7, "1E5" →
 * 100000, "12345678901234567" → 1.23457E+16), a percentage, a date or time ("3/4", "1-2",
 * "2026-12-02", "10:30") or a boolean. Such identifiers (tags, designations, serials) are
 * written as ="007": the spreadsheet shows and saves back the text 007.
 */
export function spreadsheetWouldConvert(v: string): boolean {
  const s = v.trim();
  if (!s || s.length > 64) return false;
  if (/^[+-]?(\d[\d,]*\.?\d*|\.\d+)([eE][+-]?\d+)?%?$/.test(s)) return true; // numbers, 1E5, 30%
  if (/^\d{1,4}[-/.]\d{1,2}([-/.]\d{1,4})?$/.test(s)) return true; // dates: 3/4, 1-2, 2026-12-02, 1.2.26
  if (/^\d{1,2}:\d{2}(:\d{2})?$/.test(s)) return true; // times
  if (/^\d{1,2}[-/ ][A-Za-z]{3,9}([-/ ]\d{2,4})?$/.test(s)) return true; // 1-Dec, 2 March 2026
  if (/^(true|false)$/i.test(s)) return true;
  return false;
}

/**
 * A text cell for a file a person may open in a spreadsheet: kept as text when the
 * spreadsheet would convert it (="…", a constant string formula — quotes inside are doubled,
 * so nothing in it can run), otherwise guarded against CSV injection.
 */
export const textCell = (v: string) => (spreadsheetWouldConvert(v) ? `="${v.replace(/"/g, '""')}"` : guardCell(v));

/** Reads back a textCell: ="007" → 007, '=SUM(…) → =SUM(…). */
export function readTextCell(v: string): string {
  const m = /^="((?:[^"]|"")*)"$/.exec(v);
  return m ? m[1].replace(/""/g, '"') : unguardCell(v);
}

/** Rows (already guarded where they hold text) as CSV lines, each ending in CRLF. */
export const csvLines = (rows: unknown[][]) => (rows.length ? Papa.unparse(rows, { newline: "\r\n" }) + "\r\n" : "");

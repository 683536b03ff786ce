/**
 * CSV as every export writes it: RFC 4180 through papaparse (CRLF, quoted where needed),
 * UTF-8 with a byte-order mark so spreadsheets pick the encoding, and the CSV-injection
 * guard of /shared/STACK.md 'Spreadsheets' (OWASP "CSV Injection"): a text cell starting
 * with = + - @, tab or carriage return gets a leading single quote.
 */
import Papa from "papaparse";

export const BOM = "\uFEFF";

/** Cells a spreadsheet would run as a formula. papaparse's own default pattern stops at a line break. */
export const RISKY = /^[=+\-@\t\r]/;

export const guardCell = (v: string) => (RISKY.test(v) ? `'${v}` : v);

/** Undoes the guard on import, so an exported file reads back as it was. */
export const unguardCell = (v: string) => (v.length > 1 && v[0] === "'" && RISKY.test(v.slice(1)) ? v.slice(1) : v);

/** Rows (already guarded where they hold text) as CSV lines, each ending in CRLF. */
export const csvLines = (rows: unknown[][]) => (rows.length ? Papa.unparse(rows, { newline: "\r\n" }) + "\r\n" : "");

/**
 * Reading a spreadsheet's CSV as the person saved it. Spreadsheet programs write UTF-8 with
 * or without a byte-order mark, UTF-16 ("Unicode text") and the system's legacy code page
 * (Windows-1252 on most Western machines), with a comma, semicolon (where the decimal mark is
 * a comma) or tab between cells. We never guess silently: the result names the encoding, how
 * it was decided, and the separator, so the preview can say so.
 *
 * Order (common practice; the WHATWG Encoding Standard's "decode" does the same BOM sniff):
 * 1. a byte-order mark (UTF-8 EF BB BF, UTF-16LE FF FE, UTF-16BE FE FF) decides;
 * 2. bytes that are valid UTF-8 are UTF-8 (a legacy file with any byte ≥ 0x80 almost never is);
 * 3. otherwise chardet (a port of ICU's detector) guesses, and iconv-lite decodes. ICU reports
 *    ISO-8859-1 for Western text; per the WHATWG Encoding Standard the labels "iso-8859-1"
 *    and "latin1" mean windows-1252, which is what spreadsheets on Windows write.
 */
import chardet from "chardet";
import iconv from "iconv-lite";
import Papa from "papaparse";

export type EncodingHow = "byte_order_mark" | "valid_utf8" | "detected" | "sent_as_text";
export interface DecodedText {
  text: string;
  /** WHATWG-style name: "utf-8", "utf-16le", "utf-16be", "windows-1252", … */
  encoding: string;
  how: EncodingHow;
  /** chardet's confidence (0–100) when it decided. */
  confidence: number | null;
}

/** WHATWG Encoding Standard: these labels all decode as windows-1252. */
const WINDOWS_1252_LABELS = new Set(["iso-8859-1", "iso8859-1", "latin1", "us-ascii", "ascii", "windows-1252"]);

const strict = new TextDecoder("utf-8", { fatal: true, ignoreBOM: true });

function isUtf8(bytes: Uint8Array) {
  try {
    strict.decode(bytes);
    return true;
  } catch {
    return false;
  }
}

/** UTF-16 without a mark: many zero bytes, nearly all in odd (LE) or even (BE) places. */
function utf16WithoutMark(bytes: Uint8Array): "utf-16le" | "utf-16be" | null {
  const n = Math.min(bytes.length - (bytes.length % 2), 4096);
  if (n < 4) return null;
  let evenZero = 0;
  let oddZero = 0;
  for (let i = 0; i < n; i += 2) {
    if (bytes[i] === 0) evenZero++;
    if (bytes[i + 1] === 0) oddZero++;
  }
  const pairs = n / 2;
  if (oddZero > pairs * 0.3 && evenZero < pairs * 0.05) return "utf-16le";
  if (evenZero > pairs * 0.3 && oddZero < pairs * 0.05) return "utf-16be";
  return null;
}

export function decodeCsvBytes(input: Uint8Array): DecodedText {
  const bytes = Buffer.from(input.buffer, input.byteOffset, input.byteLength);
  if (bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf)
    return { text: bytes.subarray(3).toString("utf8"), encoding: "utf-8", how: "byte_order_mark", confidence: null };
  if (bytes[0] === 0xff && bytes[1] === 0xfe)
    return {
      text: iconv.decode(bytes.subarray(2), "utf-16le"),
      encoding: "utf-16le",
      how: "byte_order_mark",
      confidence: null,
    };
  if (bytes[0] === 0xfe && bytes[1] === 0xff)
    return {
      text: iconv.decode(bytes.subarray(2), "utf-16be"),
      encoding: "utf-16be",
      how: "byte_order_mark",
      confidence: null,
    };
  const sixteen = utf16WithoutMark(bytes);
  if (sixteen) return { text: iconv.decode(bytes, sixteen), encoding: sixteen, how: "detected", confidence: null };
  if (isUtf8(bytes)) return { text: bytes.toString("utf8"), encoding: "utf-8", how: "valid_utf8", confidence: null };
  const guesses = chardet.analyse(bytes);
  const best = guesses.find((g) => iconv.encodingExists(g.name.toLowerCase()));
  let name = (best?.name ?? "windows-1252").toLowerCase();
  if (WINDOWS_1252_LABELS.has(name)) name = "windows-1252";
  return { text: iconv.decode(bytes, name), encoding: name, how: "detected", confidence: best?.confidence ?? null };
}

/** What a person typed or pasted (JSON {csv}): already text, only a leading BOM to drop. */
export const fromText = (text: string): DecodedText => ({
  text: text.replace(/^\uFEFF/, ""),
  encoding: "utf-8",
  how: "sent_as_text",
  confidence: null,
});

export const SEPARATORS = [",", ";", "\t", "|"] as const;
export type Separator = (typeof SEPARATORS)[number];

/**
 * The separator, by papaparse's own guess over the header line alone: the header is the one
 * line sure to have every column, and a short file's trailing empty line can no longer tip
 * the guess. Falls back to a comma (RFC 4180) when no candidate splits the line.
 */
export function guessSeparator(text: string): Separator {
  const headerLine = text.split(/\r\n|\n|\r/, 1)[0] ?? "";
  const r = Papa.parse<string[]>(headerLine, { delimitersToGuess: [...SEPARATORS], preview: 1 });
  const d = r.meta.delimiter as Separator;
  return SEPARATORS.includes(d) ? d : ",";
}

/**
 * Reading spreadsheet files: encodings against iconv-lite's own encoder and the WHATWG
 * Encoding Standard (a BOM decides; ISO-8859-1 means windows-1252), separators by
 * papaparse's guess on the header line, and which text a spreadsheet would convert
 * (common practice: LibreOffice Calc and Excel read 007 as 7, 1E5 as 100000, 3/4 and 1-2 as dates).
 */
import iconv from "iconv-lite";
import { describe, expect, it } from "vitest";
import { readTextCell, spreadsheetWouldConvert, textCell } from "../../server/csv";
import { decodeCsvBytes, guessSeparator } from "../../server/csv-read";
import { isTimeZone, localDateTime } from "../../src/domain/local-time";

const TEXT = "board;designation;maker\r\nMain;1-2;Établissements Vérin & Söhne, ½ scale, “quoted” — dash\r\n";

describe("decodeCsvBytes", () => {
  it.each([
    ["UTF-8 with BOM", Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(TEXT)]), "utf-8", "byte_order_mark"],
    ["UTF-8 without BOM", Buffer.from(TEXT), "utf-8", "valid_utf8"],
    [
      "UTF-16LE with BOM",
      Buffer.concat([Buffer.from([0xff, 0xfe]), iconv.encode(TEXT, "utf-16le")]),
      "utf-16le",
      "byte_order_mark",
    ],
    [
      "UTF-16BE with BOM",
      Buffer.concat([Buffer.from([0xfe, 0xff]), iconv.encode(TEXT, "utf-16be")]),
      "utf-16be",
      "byte_order_mark",
    ],
    ["UTF-16LE without BOM", iconv.encode(TEXT, "utf-16le"), "utf-16le", "detected"],
    ["Windows-1252", iconv.encode(TEXT, "windows-1252"), "windows-1252", "detected"],
  ])("%s reads back the same text", (_name, bytes, encoding, how) => {
    const d = decodeCsvBytes(bytes);
    expect(d.text).toBe(TEXT);
    expect(d.encoding).toBe(encoding);
    expect(d.how).toBe(how);
  });
  it("plain ASCII is valid UTF-8", () => {
    expect(decodeCsvBytes(Buffer.from("a,b\r\n1,2\r\n"))).toMatchObject({ encoding: "utf-8", how: "valid_utf8" });
  });
});

describe("guessSeparator", () => {
  it.each([
    ["board,designation,kind\r\nA,1,fuse\r\n", ","],
    ["board;designation;kind\r\nA;1,5;fuse\r\n\r\n", ";"], // a decimal comma in the data does not tip it
    ["board\tdesignation\tkind\n", "\t"],
    ["board|designation|kind", "|"],
    ["board", ","],
  ])("%j → %j", (text, sep) => expect(guessSeparator(text)).toBe(sep));
});

describe("text a spreadsheet would convert", () => {
  it.each(["007", "1E5", "12345678901234567", "3/4", "1-2", "2026-12-02", "10:30", "30%", "-5", "TRUE", "1-Dec"])(
    '%s is kept as text with ="…"',
    (v) => {
      expect(spreadsheetWouldConvert(v)).toBe(true);
      expect(textCell(v)).toBe(`="${v}"`);
      expect(readTextCell(textCell(v))).toBe(v);
    },
  );
  it.each(["KL-0042", "Q2-14", "MCCB", "Harlow & Breen", "M-1", ""])("%s stays as typed", (v) => {
    expect(spreadsheetWouldConvert(v)).toBe(false);
    expect(textCell(v)).toBe(v);
  });
  it("formula-like text keeps the CSV-injection guard and reads back (OWASP CSV Injection)", () => {
    expect(textCell("=HYPERLINK(1)")).toBe("'=HYPERLINK(1)");
    expect(readTextCell("'=HYPERLINK(1)")).toBe("=HYPERLINK(1)");
    expect(readTextCell('="a""b"')).toBe('a"b');
  });
});

describe("local time (IANA tz database via Intl)", () => {
  it.each([
    ["2026-07-01T12:00:00Z", "Europe/Lisbon", "2026-07-01 13:00:00"], // WEST, UTC+1
    ["2026-12-02T09:30:00Z", "Europe/Lisbon", "2026-12-02 09:30:00"], // WET, UTC+0
    ["2026-12-02T09:30:00Z", "America/Halifax", "2026-12-02 05:30:00"], // AST, UTC−4
    ["2026-07-01T12:00:00Z", "America/Halifax", "2026-07-01 09:00:00"], // ADT, UTC−3
    ["2026-12-31T23:59:59Z", "UTC", "2026-12-31 23:59:59"],
  ])("%s in %s is %s", (at, zone, want) => expect(localDateTime(at, zone)).toBe(want));
  it("knows zones", () => {
    expect(isTimeZone("Europe/Lisbon")).toBe(true);
    expect(isTimeZone("Mars/Olympus")).toBe(false);
    expect(localDateTime(null, "UTC")).toBe("");
  });
});

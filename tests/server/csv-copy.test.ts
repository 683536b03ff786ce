import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { CsvRecordEnds, inlineParameters } from "../../server/defects/csv";

// Rows with everything RFC 4180 quotes: commas, quotes, line breaks of both kinds, and empty fields.
const ROWS = [
  ["D-1", 'Terminal "L2", loose', "Line one\nline two", "", "yes"],
  ["D-2", "plain", 'a "quoted"\nword', "x\r\ny", "no"],
  ["D-3", '"', "\n", '""', ","],
  ["D-4", "Überhitzung — 45 °C", "naïve\ncafé", "", ""],
];

/** The CR-adding pass run over `text` cut into pieces at `cuts`, joined again. */
function convert(text: Buffer, cuts: number[]) {
  const ends = new CsvRecordEnds();
  const out: Buffer[] = [];
  let from = 0;
  for (const cut of [...cuts, text.length]) {
    out.push(ends.convert(text.subarray(from, cut)));
    from = cut;
  }
  return { text: Buffer.concat(out).toString("utf8"), records: ends.records };
}

describe("COPY's record ends made CRLF", () => {
  // The reference is papaparse (the writer of every other export here): the same rows written with LF
  // record ends (as COPY ends them) and with CRLF must differ only where a record ends.
  const lf = Buffer.from(Papa.unparse(ROWS, { newline: "\n" }) + "\n", "utf8");
  const crlf = Papa.unparse(ROWS, { newline: "\r\n" }) + "\r\n";

  it("adds CR before each LF that ends a record and leaves line breaks inside quoted fields alone", () => {
    expect(crlf).not.toBe(lf.toString("utf8"));
    const whole = convert(lf, []);
    expect(whole.text).toBe(crlf);
    expect(whole.records).toBe(ROWS.length);
    expect(Papa.parse<string[]>(whole.text.trimEnd(), { newline: "\r\n" }).data).toEqual(ROWS);
  });

  it("gives the same bytes however the stream is cut into chunks, a cut inside a character included", () => {
    for (let a = 0; a <= lf.length; a++) expect(convert(lf, [a]).text, `cut at ${a}`).toBe(crlf);
    for (let a = 1; a < lf.length; a += 3)
      for (let b = a; b < lf.length; b += 5) expect(convert(lf, [a, b]).text, `cuts at ${a}, ${b}`).toBe(crlf);
  });

  it("passes a chunk with no record end through untouched", () => {
    const ends = new CsvRecordEnds();
    const chunk = Buffer.from('"open, still\nopen');
    expect(ends.convert(chunk)).toBe(chunk);
    expect(ends.convert(Buffer.from('"\n')).toString()).toBe('"\r\n');
    expect(ends.records).toBe(1);
  });
});

describe("parameters written into a COPY statement", () => {
  it("writes each $n as a quoted literal, as pg sends parameters, and leaves quoted text alone", () => {
    expect(
      inlineParameters(`SELECT '$1', "a$2" FROM t WHERE a = $1 AND b = $2 AND c = $10`, [
        "it's",
        7,
        ...Array(7).fill(null),
        true,
      ]),
    ).toBe(`SELECT '$1', "a$2" FROM t WHERE a = 'it''s' AND b = '7' AND c = 'true'`);
  });

  it("escapes backslashes the way PostgreSQL reads them back (pg's escapeLiteral)", () => {
    expect(inlineParameters("x ILIKE $1", ["%a\\_b%"])).toBe("x ILIKE  E'%a\\\\_b%'");
  });

  it("refuses a value it cannot write as a literal, and a placeholder with no value", () => {
    expect(() => inlineParameters("a = $1", [[1, 2]])).toThrow(/cannot be written/);
    expect(() => inlineParameters("a = $1", [Number.NaN])).toThrow(/cannot be written/);
    expect(() => inlineParameters("a = $2", ["x"])).toThrow(/no parameter/);
    expect(inlineParameters("a IS $1", [null])).toBe("a IS NULL");
  });
});

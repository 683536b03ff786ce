/**
 * fast-check arbitraries for hostile input: the text PostgreSQL cannot store (NUL, lone
 * surrogates), impossible dates, integers beyond int4, formula-like and path-like text,
 * nested junk. Field names come from the shared request schemas, so generated bodies hit
 * real fields, not only unknown keys.
 */
import fc from "fast-check";
import { z } from "zod";
import * as account from "../../src/schemas/account";
import * as auth from "../../src/schemas/auth";
import * as defects from "../../src/schemas/defects";
import * as inventory from "../../src/schemas/inventory";
import * as invitations from "../../src/schemas/invitations";
import * as parts from "../../src/schemas/parts";
import * as photos from "../../src/schemas/photos";
import * as readings from "../../src/schemas/readings";
import * as sites from "../../src/schemas/sites";

export const SCHEMA_MODULES = { account, auth, defects, inventory, invitations, parts, photos, readings, sites };

/** Exported zod object schemas whose names say they read requests (…Body, …Query, …Patch, …Fields, …Params). */
export function requestSchemas(): Array<[string, z.ZodObject]> {
  const out: Array<[string, z.ZodObject]> = [];
  for (const [mod, exports] of Object.entries(SCHEMA_MODULES))
    for (const [name, v] of Object.entries(exports))
      if (v instanceof z.ZodObject && /(Body|Query|Patch|Fields|Params|Param)$/.test(name))
        out.push([`${mod}.${name}`, v]);
  return out;
}

export const FIELD_NAMES = [...new Set(requestSchemas().flatMap(([, s]) => Object.keys(s.shape)))].sort();

export const NASTY_STRINGS = [
  "\u0000",
  "ACB\u0000-1",
  "\ud800",
  "x\udfffy",
  "\udc00\ud800",
  "2026-13-45",
  "0000-01-01",
  "9999-99-99",
  "2026-02-30",
  "2026-12-02T25:61:00Z",
  "0000-12-02T06:00:00Z",
  '=HYPERLINK("http://x")',
  "+1",
  "-1",
  "@SUM(A1)",
  "../../etc/passwd",
  "%E0%A4%A",
  "'; DROP TABLE users; --",
  "<script>alert(1)</script>",
  "𝔘𝔫𝔦𝔠𝔬𝔡𝔢 ✓",
  "",
  " ",
  "a".repeat(5000),
  "00000000-0000-0000-0000-000000000000",
  "D-2147483648",
  "NaN",
  "Infinity",
  "true",
  "null",
];
export const NASTY_NUMBERS = [
  0,
  -1,
  1,
  0.5,
  -0,
  2147483647,
  2147483648,
  -2147483649,
  Number.MAX_SAFE_INTEGER + 1,
  1e21,
  1e308,
  -1e308,
  5e-324,
];

export const nastyString = fc.oneof(
  { weight: 3, arbitrary: fc.constantFrom(...NASTY_STRINGS) },
  { weight: 2, arbitrary: fc.string({ unit: "binary", maxLength: 40 }) },
  { weight: 1, arbitrary: fc.string({ maxLength: 40 }) },
);
export const nastyNumber = fc.oneof(fc.constantFrom(...NASTY_NUMBERS), fc.integer(), fc.double({ noNaN: false }));

export const nastyValue: fc.Arbitrary<unknown> = fc.letrec((tie) => ({
  value: fc.oneof(
    { depthSize: "small", withCrossShrink: true },
    nastyString,
    nastyNumber,
    fc.boolean(),
    fc.constant(null),
    fc.array(tie("value"), { maxLength: 3 }),
    fc.dictionary(fc.constantFrom(...FIELD_NAMES), tie("value"), { maxKeys: 3 }),
  ),
})).value;

/** A JSON body: known field names with hostile values, sometimes a whole valid-looking shape. */
export const nastyBody = fc.dictionary(
  fc.oneof(fc.constantFrom(...FIELD_NAMES), fc.string({ maxLength: 8 })),
  nastyValue,
  { maxKeys: 8 },
);

/** Percent-encodes UTF-8 bytes; a lone surrogate becomes the raw (invalid) bytes ED A0 80 as an attacker would send. */
export function encodeRaw(s: string): string {
  let out = "";
  for (const ch of s) {
    const cp = ch.codePointAt(0)!;
    if (cp >= 0xd800 && cp <= 0xdfff)
      out +=
        `%${(0xe0 | (cp >> 12)).toString(16)}%${(0x80 | ((cp >> 6) & 0x3f)).toString(16)}%${(0x80 | (cp & 0x3f)).toString(16)}`.toUpperCase();
    else out += encodeURIComponent(ch);
  }
  return out;
}

export const nastyQuery = fc
  .dictionary(
    fc.constantFrom(
      ...FIELD_NAMES,
      "q",
      "today",
      "page",
      "size",
      "sort",
      "dir",
      "status",
      "flag",
      "board",
      "limit",
      "offset",
    ),
    nastyString,
    { maxKeys: 4 },
  )
  .map((d) =>
    Object.entries(d)
      .map(([k, v]) => `${encodeURIComponent(k)}=${encodeRaw(v)}`)
      .join("&"),
  );

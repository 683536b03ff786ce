/**
 * The building blocks every request schema uses, so that input PostgreSQL cannot store
 * is refused once, here, with the field named — never as a 500 from the database.
 *
 * - Text: PostgreSQL's `text` cannot hold U+0000 (NUL), and a lone UTF-16 surrogate has no
 *   UTF-8 form (it arrives from JSON's `"\ud800"` escapes). Both are refused.
 * - Whole numbers: PostgreSQL's `integer` is 32-bit (−2147483648…2147483647); zod's `int32`
 *   checks exactly that range (versions, counts, grid cells, years).
 * - Dates: the calendar is checked (no 2026-13-45, no 31 April, 29 February only in leap
 *   years — zod's ISO date check), and the year must be 1800…9999: PostgreSQL has no year 0,
 *   and nothing a crew records predates the switchboards it restores.
 */
import { z } from "zod";

export const INT4_MIN = -2147483648;
export const INT4_MAX = 2147483647;
export const MIN_YEAR = 1800;
export const MAX_YEAR = 9999;

/** True when PostgreSQL's UTF-8 `text` can store the string as it is. */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;
export function isStorableText(s: string): boolean {
  return !s.includes("\u0000") && !LONE_SURROGATE.test(s);
}

export const TEXT_MESSAGE = "Contains a character that cannot be stored (a NUL byte or broken Unicode)";

/** A string PostgreSQL can store. Chain `.trim().min().max()` on it as on `z.string()`. */
export const text = (params?: { message?: string }) =>
  z.string(params).refine(isStorableText, { message: TEXT_MESSAGE, abort: true });

/** A whole number that fits PostgreSQL's `integer`. Chain `.min()`/`.max()` as usual. */
export const int = (params?: { message?: string }) => z.int32(params);

/** A whole number from a query string ("25"), within PostgreSQL's `integer`. */
export const queryInt = () => z.coerce.number().int().min(INT4_MIN).max(INT4_MAX);

const yearOk = (s: string) => {
  const y = Number(s.slice(0, 4));
  return y >= MIN_YEAR && y <= MAX_YEAR;
};
const yearMessage = `Use a year from ${MIN_YEAR} to ${MAX_YEAR}`;

/** A calendar date as YYYY-MM-DD that exists and that PostgreSQL's `date` stores. */
export const isoDate = (message = "A date as YYYY-MM-DD") =>
  z.iso.date({ message }).refine(yearOk, { message: yearMessage, abort: true });

/** A date and time in ISO 8601 (with an offset or Z) that exists and that `timestamptz` stores. */
export const isoDateTime = (message = "A date and time in ISO 8601") =>
  z.iso.datetime({ offset: true, message }).refine(yearOk, { message: yearMessage, abort: true });

/**
 * Keys for finding a position by what a person types on a phone in a dim machinery space.
 * Pure; the SQL in server/inventory/positions-repository.ts computes the
 * same key with regexp_replace, and tests/server/inventory-lookup.api.test.ts holds the two equal.
 */

/**
 * A loosely typed designation or tag: lower case, every character that is not a letter or digit
 * dropped, and the leading zeros of each number dropped — "KL 42", "kl-0042" and "KL0042" are one key.
 * (Tags are zero-padded on labels but read out without the zeros: common practice.)
 */
export function looseKey(typed: string): string {
  if (typeof typed !== "string") throw new RangeError("typed must be a string");
  return typed
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "")
    .replace(/(^|[^0-9])0+([0-9])/g, "$1$2");
}

/** The SQL twin of looseKey's regular expressions (PostgreSQL ARE syntax, same meaning). */
export const LOOSE_KEY_SQL = { strip: "[^a-z0-9]+", zeros: "(^|[^0-9])0+([0-9])", replacement: "\\1\\2" } as const;

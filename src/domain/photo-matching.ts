/**
 * Matching a photo's file name to a position after a shoot: photographers often name
 * files after the designation painted on the board ("2-14_front.jpg") or the tag on the
 * bag ("KL-0042.jpg"). Pure; no I/O.
 */
import type { PhotoKind } from "./vocab";

export interface MatchTarget {
  positionId: string;
  boardId: string;
  designation: string;
  tagNumber: string | null;
}

export type MatchResult =
  | { kind: "tag" | "designation"; positionId: string; matched: string }
  | { kind: "ambiguous"; candidates: string[]; matched: string }
  | { kind: "none" };

/** Separators a camera or a person uses interchangeably: - _ . space and / become "-". */
export function normalizeToken(s: string): string {
  return s
    .trim()
    .toLowerCase()
    .replace(/[\s_./\\-]+/g, "-");
}

/** The name without its extension, normalised; the token must stand alone (no letter or digit glued on). */
function containsToken(name: string, token: string): boolean {
  if (!token) return false;
  const escaped = token.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
  return new RegExp(`(^|[^a-z0-9])${escaped}($|[^a-z0-9])`).test(name);
}

/** A file name as the matching reads it: without its extension, normalised. */
const baseName = (fileName: string) => normalizeToken(fileName.replace(/\.[a-z0-9]{2,5}$/i, ""));

const ALNUM = /[a-z0-9]/;

/**
 * Every stretch of a file name that a designation or tag number could be: `containsToken` turned round (a
 * token stands alone, so it starts where the name starts or after a character that is not a letter or
 * digit, and ends likewise). The server looks these up by index (`name_token` in SQL), so a shoot is
 * matched against the whole site without sending the site's positions to the phone. Tokens longer than
 * `maxLength` are left out (designations and tag numbers are at most 40 characters).
 */
export function nameTokens(fileName: string, maxLength = 60): string[] {
  if (typeof fileName !== "string") throw new RangeError("fileName must be a string");
  const name = baseName(fileName);
  const starts: number[] = [];
  const ends: number[] = [];
  for (let i = 0; i < name.length; i++) {
    if (i === 0 || !ALNUM.test(name[i - 1])) starts.push(i);
    if (i === name.length - 1 || !ALNUM.test(name[i + 1])) ends.push(i + 1);
  }
  const out = new Set<string>();
  for (const s of starts) for (const e of ends) if (e > s && e - s <= maxLength) out.add(name.slice(s, e));
  return [...out];
}

/**
 * Tag numbers first (unique per site), then designations (unique per board only: the
 * same "1-1" on two boards is ambiguous unless a board is chosen). The longest match
 * wins, so "2-14" beats "2-1" and "14".
 * @param fileName e.g. "IMG 2-14 front.JPG"
 * @param boardId when given, only that board's designations count
 */
export function matchFileName(fileName: string, targets: MatchTarget[], boardId?: string): MatchResult {
  if (typeof fileName !== "string") throw new RangeError("fileName must be a string");
  const name = baseName(fileName);
  const tags = targets.filter((t) => t.tagNumber && containsToken(name, normalizeToken(t.tagNumber)));
  if (tags.length) {
    const best = longest(tags, (t) => normalizeToken(t.tagNumber!));
    return best.length === 1
      ? { kind: "tag", positionId: best[0].positionId, matched: best[0].tagNumber! }
      : { kind: "ambiguous", candidates: best.map((t) => t.positionId), matched: best[0].tagNumber! };
  }
  const pool = boardId ? targets.filter((t) => t.boardId === boardId) : targets;
  const des = pool.filter((t) => containsToken(name, normalizeToken(t.designation)));
  if (!des.length) return { kind: "none" };
  const best = longest(des, (t) => normalizeToken(t.designation));
  return best.length === 1
    ? { kind: "designation", positionId: best[0].positionId, matched: best[0].designation }
    : { kind: "ambiguous", candidates: best.map((t) => t.positionId), matched: best[0].designation };
}

function longest<T>(xs: T[], key: (x: T) => string): T[] {
  const max = Math.max(...xs.map((x) => key(x).length));
  return xs.filter((x) => key(x).length === max);
}

/** Finds positions by what the photographer types: exact designation or tag first, then prefixes. */
export function searchTargets<T extends MatchTarget>(typed: string, targets: T[], limit = 8): T[] {
  const q = normalizeToken(typed);
  if (!q) return [];
  const exact = targets.filter(
    (t) => normalizeToken(t.designation) === q || (t.tagNumber && normalizeToken(t.tagNumber) === q),
  );
  const prefix = targets.filter(
    (t) =>
      !exact.includes(t) &&
      (normalizeToken(t.designation).startsWith(q) || (t.tagNumber && normalizeToken(t.tagNumber).startsWith(q))),
  );
  return [...exact, ...prefix].slice(0, limit);
}

/**
 * Words in a file name that say which kind of shot it is: "2-14_nameplate.jpg" is a
 * nameplate shot. Tokens must stand alone ("plate" inside "template" does not count). The
 * vocabulary is common practice among survey photographers (invented examples in the tests);
 * when a name says two kinds, the one said last wins ("as-found_nameplate" → nameplate),
 * because a suffix is where people put the kind.
 */
const KIND_WORDS: ReadonlyArray<[PhotoKind, string[]]> = [
  ["as_found", ["as-found", "asfound", "found", "before"]],
  ["nameplate", ["nameplate", "name-plate", "plate", "rating-plate", "data-plate", "dataplate"]],
  ["damage", ["damage", "damaged", "dmg", "corrosion", "burn", "burnt"]],
  ["during_work", ["during", "during-work", "wip", "in-work", "teardown", "strip"]],
  ["after_work", ["after", "after-work", "afterwork", "done", "restored", "refit", "refitted"]],
  ["thermal", ["thermal", "ir", "thermo", "thermogram", "infrared"]],
];

export function kindFromFileName(fileName: string): PhotoKind | null {
  if (typeof fileName !== "string") throw new RangeError("fileName must be a string");
  const name = normalizeToken(fileName.replace(/\.[a-z0-9]{2,5}$/i, ""));
  let best: { kind: PhotoKind; at: number } | null = null;
  for (const [kind, words] of KIND_WORDS)
    for (const w of words) {
      const escaped = w.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
      const re = new RegExp(`(^|[^a-z0-9])${escaped}(?=$|[^a-z0-9])`, "g");
      for (const m of name.matchAll(re)) {
        const at = m.index + m[0].length;
        if (!best || at > best.at) best = { kind, at };
      }
    }
  return best?.kind ?? null;
}

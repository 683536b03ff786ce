/**
 * Reads a page makes whatever it shows (the session, the site, the board drawn), started by the entry as the page
 * starts: before the route's code, the feature's API module and its zod schemas have arrived and been evaluated,
 * which is when the page's own query would ask. `api.get` takes such an answer up once, by its exact URL, if it
 * was started less than FRESH_MS ago; otherwise it asks the server itself. Any write (sign-in, sign-out, a save)
 * drops every answer not yet taken, so a read started before it is never shown after it.
 */
const FRESH_MS = 10_000;
const started = new Map<string, { at: number; answer: Promise<Response> }>();

export function startRead(url: string): void {
  if (started.has(url)) return;
  const answer = fetch(url, { credentials: "same-origin" });
  answer.catch(() => undefined); // one never taken up must not surface as an unhandled rejection
  started.set(url, { at: Date.now(), answer });
}

/** The answer started for `url`, once; undefined when none was started or it is too old to use. */
export function takeRead(url: string): Promise<Response> | undefined {
  const read = started.get(url);
  if (!read) return undefined;
  started.delete(url);
  return Date.now() - read.at <= FRESH_MS ? read.answer : undefined;
}

export function forgetReads(): void {
  started.clear();
}

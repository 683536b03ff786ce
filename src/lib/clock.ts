/**
 * How every page writes a time (one convention, DEVELOPERS.md "Every page keeps one clock"): `stamp` for a record's
 * instant, "YYYY-MM-DD HH:MM"; `dateOf` for its day alone; `clockTime` where today's time alone is the answer (the
 * sync bar, a watch's next check); `shortDay` for a chart's axis, "5 Dec". All in the browser's own time zone.
 *
 * When something happened on this phone, as the sync bar says it: 24-hour "HH:MM" in the phone's own time zone
 * when it was today, "YYYY-MM-DD HH:MM" when it was another day, so a crew member offline in a machinery space
 * sees at once that the copy in hand is from yesterday. 24-hour time is how watch and test logs are kept (common
 * practice) and how the readings pages already write times (en-GB, h23); the ISO 8601 date cannot be misread as
 * day/month or month/day.
 *
 * Written by hand from the Date's local fields rather than through `Intl`: the page's first `Intl` formatter of any
 * kind loads the locale's data, 200–370 ms on a phone at 4 × CPU throttle (DEVELOPERS.md "Main-thread work on the
 * phone comes in pieces"), and the sync bar shows a time on every page behind sign-in. The result is checked against
 * `Intl.DateTimeFormat` (ICU) in tests/client/clock.test.ts.
 */
const two = (n: number) => (n < 10 ? `0${n}` : String(n));

/** The local calendar day of `d` as YYYY-MM-DD (ISO 8601). */
export const localDay = (d: Date) => `${d.getFullYear()}-${two(d.getMonth() + 1)}-${two(d.getDate())}`;

const parse = (at: string | number | Date | null | undefined): Date | null => {
  if (at == null) return null;
  const d = new Date(at);
  return Number.isNaN(d.getTime()) ? null : d;
};

/** "HH:MM" when `at` fell on `now`'s local day, else "YYYY-MM-DD HH:MM"; "never" for none. */
export function clockTime(at: string | number | null, now: number = Date.now()): string {
  const d = parse(at);
  if (!d) return "never";
  return localDay(d) === localDay(new Date(now)) ? stamp(d).slice(11) : stamp(d);
}

/** A record's instant as "YYYY-MM-DD HH:MM" on the local clock, 24-hour; `none` for none. */
export function stamp(at: string | number | Date | null | undefined, none = "—"): string {
  const d = parse(at);
  return d ? `${localDay(d)} ${two(d.getHours())}:${two(d.getMinutes())}` : none;
}

/** The local day of an instant as "YYYY-MM-DD" (not for DATE columns, which are days already). */
export function dateOf(at: string | number | Date | null | undefined, none = "—"): string {
  const d = parse(at);
  return d ? localDay(d) : none;
}

const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];
/** A chart axis's day: "5 Dec" (the day, then the month's three-letter English abbreviation). */
export function shortDay(at: string | number | Date): string {
  const d = parse(at);
  return d ? `${d.getDate()} ${MONTHS[d.getMonth()]}` : "";
}

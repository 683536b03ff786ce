/**
 * Wall-clock time in a site's IANA time zone, for files a person opens in a spreadsheet.
 * "2026-12-02 09:30:00" is ISO 8601's date and time with the space RFC 3339 §5.6 allows in
 * place of "T" and no offset: spreadsheets read it as a date and time (the "…T…Z" form stays
 * text in them). The zone is stated once, in the column's header. The zone rules are the
 * IANA tz database as shipped in the runtime's ICU (Intl.DateTimeFormat).
 */

/** True when the runtime knows the zone (IANA names such as "Europe/Lisbon", and "UTC"). */
export function isTimeZone(zone: string): boolean {
  if (!zone || zone.length > 64) return false;
  try {
    new Intl.DateTimeFormat("en-GB", { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

const formatters = new Map<string, Intl.DateTimeFormat>();
function formatter(zone: string) {
  let f = formatters.get(zone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-GB", {
      timeZone: zone,
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      second: "2-digit",
      hourCycle: "h23",
    });
    formatters.set(zone, f);
  }
  return f;
}

/** Wall-clock parts of `ms` in `zone` through Intl (ICU's copy of the IANA tz database). */
function partsOf(ms: number, zone: string) {
  const p = Object.fromEntries(
    formatter(zone)
      .formatToParts(ms)
      .map((x) => [x.type, x.value]),
  );
  return p as Record<"year" | "month" | "day" | "hour" | "minute" | "second", string>;
}

const HOUR_MS = 3_600_000;
/** Per zone: UTC hour → the zone's offset in ms for that whole hour, or null when an offset change falls inside it. */
const hourOffsets = new Map<string, Map<number, number | null>>();

/** The zone's offset (wall clock − UTC) at whole second `ms`, read through Intl. */
function offsetAt(ms: number, zone: string) {
  const p = partsOf(ms, zone);
  return Date.UTC(+p.year, +p.month - 1, +p.day, +p.hour, +p.minute, +p.second) - ms;
}

/**
 * The offset that holds for the whole UTC hour containing `ms`, or null. An hour whose first and last second
 * have the same offset has it throughout (zones change offset at most once within hours of each other), so one
 * pair of Intl calls serves every time in that hour (an export formats two times per row).
 */
function hourOffset(ms: number, zone: string): number | null {
  let byHour = hourOffsets.get(zone);
  if (!byHour) hourOffsets.set(zone, (byHour = new Map()));
  const hour = Math.floor(ms / HOUR_MS);
  let off = byHour.get(hour);
  if (off === undefined) {
    const start = hour * HOUR_MS;
    const a = offsetAt(start, zone);
    off = a === offsetAt(start + HOUR_MS - 1000, zone) ? a : null;
    if (byHour.size > 50_000) byHour.clear(); // a long-running server meets new hours for ever
    byHour.set(hour, off);
  }
  return off;
}

const two = (n: number) => (n < 10 ? `0${n}` : String(n));

/** "YYYY-MM-DD HH:mm:ss" in `zone`; "" for no time. */
export function localDateTime(at: Date | string | null | undefined, zone: string): string {
  if (at === null || at === undefined || at === "") return "";
  const d = typeof at === "string" ? new Date(at) : at;
  const ms = d.getTime();
  if (Number.isNaN(ms)) return "";
  const whole = Math.floor(ms / 1000) * 1000;
  const off = hourOffset(whole, zone);
  const w = off === null ? null : new Date(whole + off);
  if (w && w.getUTCFullYear() >= 1000 && w.getUTCFullYear() <= 9999)
    return `${w.getUTCFullYear()}-${two(w.getUTCMonth() + 1)}-${two(w.getUTCDate())} ${two(w.getUTCHours())}:${two(w.getUTCMinutes())}:${two(w.getUTCSeconds())}`;
  const p = partsOf(ms, zone);
  return `${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}:${p.second}`;
}

/** The calendar day "YYYY-MM-DD" of `at` in `zone`: a site's "today" (a qualification's last day, a file's date). */
export const localDate = (at: Date | string, zone: string) => localDateTime(at, zone).slice(0, 10);

/** "YYYY-MM-DD HH:mm" of `at` in `zone`: a time as messages and the report write it (the zone named beside it). */
export const localMinute = (at: Date | string, zone: string) => localDateTime(at, zone).slice(0, 16);

/** The header of a local-time column: `inspected_at (Europe/Lisbon)`. */
export const localHeader = (column: string, zone: string) => `${column} (${zone})`;

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

/** "YYYY-MM-DD HH:mm:ss" in `zone`; "" for no time. */
export function localDateTime(at: Date | string | null | undefined, zone: string): string {
  if (at === null || at === undefined || at === "") return "";
  const d = typeof at === "string" ? new Date(at) : at;
  if (Number.isNaN(d.getTime())) return "";
  const p = Object.fromEntries(
    formatter(zone)
      .formatToParts(d)
      .map((x) => [x.type, x.value]),
  );
  return `${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}:${p.second}`;
}

/** The header of a local-time column: `inspected_at (Europe/Lisbon)`. */
export const localHeader = (column: string, zone: string) => `${column} (${zone})`;

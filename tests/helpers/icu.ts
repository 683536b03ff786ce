/**
 * The reference for "which day and minute is this instant in that zone": ICU's copy of the IANA tz database, read
 * through `Intl.DateTimeFormat` (en-GB, 24-hour), part by part. Tests of the product's own time code compare with it.
 */
const formatters = new Map<string, Intl.DateTimeFormat>();

function parts(at: Date | string, zone: string) {
  let f = formatters.get(zone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-GB", {
      timeZone: zone,
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      hourCycle: "h23",
    });
    formatters.set(zone, f);
  }
  return Object.fromEntries(f.formatToParts(new Date(at)).map((x) => [x.type, x.value])) as Record<string, string>;
}

/** "YYYY-MM-DD": the instant's day in `zone`. */
export function icuDay(at: Date | string, zone: string): string {
  const p = parts(at, zone);
  return `${p.year}-${p.month}-${p.day}`;
}

/** "YYYY-MM-DD HH:MM": the instant's minute in `zone`, 24-hour. */
export function icuMinute(at: Date | string, zone: string): string {
  const p = parts(at, zone);
  return `${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}`;
}

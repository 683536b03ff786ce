/**
 * localDateTime's fast path (one Intl call pair per UTC hour, then plain arithmetic) against Intl.DateTimeFormat
 * itself — ICU's copy of the IANA tz database, the general-purpose reference — second by second around offset
 * changes and at random instants. The zones are picked for their odd rules (IANA tz database): 30-minute daylight
 * time (Australia/Lord_Howe), 45-minute offsets (Pacific/Chatham, Asia/Kathmandu), a half-hour zone
 * (America/St_Johns), a zone that leaves daylight time for Ramadan (Africa/Casablanca), local mean time with
 * seconds (Africa/Monrovia until 1972: UTC−0:44:30; Dublin Mean Time until 1916), and a skipped calendar day
 * (Pacific/Apia, 30 Dec 2011). Each window is checked to hold an offset change, so none passes for want of one.
 */
import { describe, expect, it } from "vitest";
import { localDate, localDateTime, localMinute } from "../../src/domain/local-time";
import { icuDay, icuMinute } from "../helpers/icu";

const formats = new Map<string, Intl.DateTimeFormat>();
const format = (zone: string, opts: Intl.DateTimeFormatOptions) => {
  const key = `${zone} ${JSON.stringify(opts)}`;
  if (!formats.has(key)) formats.set(key, new Intl.DateTimeFormat("en-GB", { timeZone: zone, ...opts }));
  return formats.get(key)!;
};

/** The reference: every field of every instant straight from Intl. */
function viaIntl(ms: number, zone: string) {
  const p = Object.fromEntries(
    format(zone, {
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      second: "2-digit",
      hourCycle: "h23",
    })
      .formatToParts(ms)
      .map((x) => [x.type, x.value]),
  );
  return `${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}:${p.second}`;
}
const offsetName = (ms: number, zone: string) =>
  format(zone, { timeZoneName: "longOffset" })
    .formatToParts(ms)
    .find((x) => x.type === "timeZoneName")!.value;

const AROUND: Array<[string, string]> = [
  ["America/Halifax", "2026-03-08T06:00:00Z"],
  ["America/Halifax", "2026-11-01T05:00:00Z"],
  ["Europe/Lisbon", "2026-03-29T01:00:00Z"],
  ["Europe/Lisbon", "2026-10-25T01:00:00Z"],
  ["Australia/Lord_Howe", "2026-04-04T15:00:00Z"],
  ["Australia/Lord_Howe", "2026-10-03T15:30:00Z"],
  ["Pacific/Chatham", "2026-04-04T14:00:00Z"],
  ["America/St_Johns", "2026-11-01T04:30:00Z"],
  ["Africa/Casablanca", "2026-02-15T02:00:00Z"],
  ["Africa/Monrovia", "1972-01-07T00:44:30Z"],
  ["Europe/Dublin", "1916-10-01T02:25:21Z"],
  ["Pacific/Apia", "2011-12-30T10:00:00Z"],
  ["Asia/Kathmandu", "1986-01-01T00:00:00Z"],
];

describe("localDateTime equals Intl's wall-clock time", () => {
  it.each(AROUND)("every 7 s for 6 hours either side of an offset change in %s near %s", (zone, near) => {
    const mid = Date.parse(near);
    expect(offsetName(mid - 6 * 3_600_000, zone)).not.toBe(offsetName(mid + 6 * 3_600_000, zone));
    for (let ms = mid - 6 * 3_600_000; ms <= mid + 6 * 3_600_000; ms += 7_000)
      expect(localDateTime(new Date(ms), zone)).toBe(viaIntl(ms, zone));
  });

  it("at 5,000 random instants from 1900 to 2100 in many zones, milliseconds included", () => {
    const zones = [...new Set(AROUND.map(([z]) => z)), "UTC", "Asia/Kolkata", "America/Sao_Paulo", "Asia/Tehran"];
    let seed = 42;
    const rand = () => (seed = (seed * 1_103_515_245 + 12_345) % 2_147_483_648) / 2_147_483_648;
    const from = Date.UTC(1900, 0, 1);
    const to = Date.UTC(2100, 0, 1);
    for (let i = 0; i < 5_000; i++) {
      const ms = Math.floor(from + rand() * (to - from));
      const zone = zones[i % zones.length];
      expect(localDateTime(new Date(ms), zone)).toBe(viaIntl(ms, zone));
    }
  });

  it("reads ISO strings as instants and leaves years outside 1000–9999 to Intl", () => {
    expect(localDateTime("2026-12-02T09:30:00.999Z", "America/Halifax")).toBe("2026-12-02 05:30:00");
    const early = Date.UTC(999, 5, 1, 12);
    expect(localDateTime(new Date(early), "UTC")).toBe(viaIntl(early, "UTC"));
  });
});

describe("localDate and localMinute, the site's day and minute", () => {
  it("equal ICU's day and minute across the date line and a 45-minute zone, hourly over a year", () => {
    const zones = ["UTC", "Pacific/Kiritimati", "Pacific/Pago_Pago", "Pacific/Chatham", "America/Halifax"];
    const start = Date.UTC(2026, 0, 1);
    for (let ms = start; ms < start + 366 * 86_400_000; ms += 3_600_000)
      for (const zone of zones) {
        expect(localDate(new Date(ms), zone)).toBe(icuDay(new Date(ms), zone));
        expect(localMinute(new Date(ms), zone)).toBe(icuMinute(new Date(ms), zone));
      }
  });
});

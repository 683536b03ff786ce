/**
 * The sync bar's clock (src/lib/clock.ts) against ICU: Intl.DateTimeFormat with a 24-hour cycle ("h23") in the
 * zone named (tests/helpers/icu.ts), read part by part, is the reference for every instant checked. The zones are set on the process
 * (Node applies a new `process.env.TZ` at once) and include daylight-saving changes and a half-hour offset.
 * The pages' record times (`stamp`, `dateOf`) and a chart's axis day (`shortDay`) are checked the same way; the
 * axis's month against ICU's en-US short month names ("Sep", where en-GB now writes "Sept").
 */
import { afterAll, describe, expect, it } from "vitest";
import { clockTime, dateOf, localDay, shortDay, stamp } from "../../src/lib/clock";
import { icuMinute } from "../helpers/icu";

const ZONES = ["UTC", "Europe/Lisbon", "America/New_York", "Asia/Kolkata", "Australia/Adelaide"];
const before = process.env.TZ;
afterAll(() => {
  if (before === undefined) delete process.env.TZ;
  else process.env.TZ = before;
});

/** ICU's reading of the instant in `zone` (tests/helpers/icu.ts), part by part. */
const reference = (zone: string) => (ms: number) => {
  const [day, time] = icuMinute(new Date(ms), zone).split(" ");
  const [y, mo, d] = day.split("-");
  const [hour, minute] = time.split(":");
  return { year: y, month: mo, day: d, hour, minute };
};

describe.each(ZONES)("clockTime in %s", (zone) => {
  it("writes HH:MM on the same local day and YYYY-MM-DD HH:MM on another, as ICU reads the local fields", () => {
    process.env.TZ = zone;
    const parts = reference(zone);
    // Every 97 minutes over a year: every hour of the day is met, and any daylight-saving change of the zone.
    const start = Date.UTC(2026, 0, 1);
    for (let ms = start; ms < start + 366 * 86_400_000; ms += 97 * 60_000) {
      const p = parts(ms);
      const hm = `${p.hour}:${p.minute}`;
      expect(clockTime(ms, ms)).toBe(hm);
      expect(localDay(new Date(ms))).toBe(`${p.year}-${p.month}-${p.day}`);
      expect(clockTime(ms, ms + 2 * 86_400_000)).toBe(`${p.year}-${p.month}-${p.day} ${hm}`);
    }
  });

  it("takes ISO strings as the outbox and the query cache keep them; midnight is 00; says never for none", () => {
    process.env.TZ = zone;
    const parts = reference(zone);
    const iso = "2026-12-04T17:21:09.000Z";
    const p = parts(Date.parse(iso));
    expect(clockTime(iso, Date.parse(iso))).toBe(`${p.hour}:${p.minute}`);
    const midnight = new Date(2026, 11, 4, 0, 5).getTime();
    expect(clockTime(midnight, midnight)).toBe("00:05");
    expect(clockTime(new Date(2026, 11, 4, 23, 59).getTime(), midnight)).toBe("23:59");
    expect(clockTime(midnight, new Date(2026, 11, 5, 9, 0).getTime())).toBe("2026-12-04 00:05");
    expect(clockTime(null)).toBe("never");
    expect(clockTime("not a time")).toBe("never");
  });
});

describe.each(ZONES)("stamp, dateOf and shortDay in %s", (zone) => {
  it("write a record's instant as YYYY-MM-DD HH:MM and its day as YYYY-MM-DD, as ICU reads the local fields", () => {
    process.env.TZ = zone;
    const parts = reference(zone);
    const axis = new Intl.DateTimeFormat("en-US", { day: "numeric", month: "short" });
    const start = Date.UTC(2026, 0, 1);
    for (let ms = start; ms < start + 366 * 86_400_000; ms += 97 * 60_000) {
      const p = parts(ms);
      expect(stamp(ms)).toBe(`${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}`);
      expect(stamp(new Date(ms).toISOString())).toBe(stamp(ms));
      expect(dateOf(ms)).toBe(`${p.year}-${p.month}-${p.day}`);
      const a = Object.fromEntries(axis.formatToParts(ms).map((x) => [x.type, x.value]));
      expect(shortDay(ms)).toBe(`${a.day} ${a.month}`);
    }
  });

  it("say a dash (or what the page asks) for no time or a broken one", () => {
    process.env.TZ = zone;
    expect(stamp(null)).toBe("—");
    expect(stamp(undefined, "")).toBe("");
    expect(stamp("not a time")).toBe("—");
    expect(dateOf(null)).toBe("—");
    expect(shortDay("not a time")).toBe("");
  });
});

import { describe, expect, it } from "vitest";
import { clockNote, judgeDeviceTime, skewWords } from "../../src/domain/device-clock";

// Thresholds are this product's choices (src/domain/device-clock.ts); the arithmetic is checked
// against plain Date differences (ECMAScript time values, milliseconds since the epoch).
const server = new Date("2026-12-03T10:00:00Z");
const at = (iso: string) => new Date(iso);
const min = 60_000;

describe("a time given by a phone, judged by the server's clock", () => {
  it.each([
    // [what, deviceAt, deviceNow, expected at, skewS, corrected]
    ["right clock, sent at once", "2026-12-03T09:59:30Z", "2026-12-03T10:00:00Z", "2026-12-03T09:59:30Z", 0, false],
    ["right clock, kept 3 h", "2026-12-03T07:00:00Z", "2026-12-03T10:00:01Z", "2026-12-03T07:00:00Z", 1, false],
    [
      "90 s of drift and transit: left alone",
      "2026-12-03T09:00:00Z",
      "2026-12-03T10:01:30Z",
      "2026-12-03T09:00:00Z",
      90,
      false,
    ],
    ["25 min fast: corrected", "2026-12-03T09:55:00Z", "2026-12-03T10:25:00Z", "2026-12-03T09:30:00Z", 1500, true],
    ["2 h slow: corrected", "2026-12-03T06:00:00Z", "2026-12-03T08:00:00Z", "2026-12-03T08:00:00Z", -7200, true],
  ] as const)("%s", (_, deviceAt, deviceNow, want, skewS, corrected) => {
    const r = judgeDeviceTime({ deviceAt: at(deviceAt), deviceNow: at(deviceNow), serverNow: server });
    expect(r).toEqual({ ok: true, at: at(want), skewS, corrected });
  });

  it("no header: the given time stands, none: the server's now", () => {
    expect(judgeDeviceTime({ deviceAt: at("2026-12-03T09:00:00Z"), deviceNow: null, serverNow: server })).toEqual({
      ok: true,
      at: at("2026-12-03T09:00:00Z"),
      skewS: null,
      corrected: false,
    });
    expect(judgeDeviceTime({ deviceAt: null, deviceNow: null, serverNow: server })).toMatchObject({ at: server });
  });

  it("refuses the future, a clock set a day out, and a time before what it observes began", () => {
    expect(
      judgeDeviceTime({ deviceAt: new Date(server.getTime() + 3 * min), deviceNow: server, serverNow: server }),
    ).toMatchObject({ ok: false, code: "future" });
    // A fast clock's "now" is not the future once corrected.
    expect(
      judgeDeviceTime({
        deviceAt: new Date(server.getTime() + 30 * min),
        deviceNow: new Date(server.getTime() + 30 * min),
        serverNow: server,
      }),
    ).toMatchObject({ ok: true, at: server, corrected: true });
    expect(
      judgeDeviceTime({
        deviceAt: at("2026-12-01T10:00:00Z"),
        deviceNow: at("2026-12-01T10:00:00Z"),
        serverNow: server,
      }),
    ).toMatchObject({ ok: false, code: "clock_off" });
    expect(
      judgeDeviceTime({
        deviceAt: at("2026-12-03T08:00:00Z"),
        deviceNow: server,
        serverNow: server,
        notBefore: at("2026-12-03T09:00:00Z"),
      }),
    ).toMatchObject({ ok: false, code: "before_start" });
  });

  it("says the difference in words a person reads", () => {
    expect(skewWords(1500)).toBe("25 min ahead");
    expect(skewWords(-7200)).toBe("2 h behind");
    expect(skewWords(-3 * 86400)).toBe("3 days behind");
  });

  it("notes a corrected clock and a late arrival in the log, nothing for a check sent at once", () => {
    const hm = (iso: string) => iso.slice(11, 16);
    const base = { at: "2026-12-03T09:30:00.000Z" };
    expect(
      clockNote({ ...base, clock: { deviceAt: base.at, receivedAt: "2026-12-03T09:30:05.000Z", skewS: 0 } }, hm),
    ).toBe("");
    expect(
      clockNote(
        {
          ...base,
          clock: { deviceAt: "2026-12-03T09:55:00.000Z", receivedAt: "2026-12-03T10:00:00.000Z", skewS: 1500 },
        },
        hm,
      ),
    ).toBe("phone's clock 25 min ahead: it said 09:55, shown on the server's clock; kept on the phone, received 10:00");
    expect(clockNote(base, hm)).toBe("");
  });
});

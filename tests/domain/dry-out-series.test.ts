import { describe, expect, it } from "vitest";
import { dryOutSeries, forecastWords, logTicks } from "../../src/domain/dry-out-series";
import type { InsulationReading } from "../../src/schemas/readings";

const HOUR = 3_600_000;
const T0 = Date.UTC(2026, 10, 10, 8);
/** Only the fields the chart reads; the rest of a reading does not matter here. */
const reading = (hours: number, corrected: number | null, minimum = 100) =>
  ({
    measuredAt: new Date(T0 + hours * HOUR).toISOString(),
    judgement: { correctedMegohms: corrected, baseTemperatureC: 20, minimum: { megohms: minimum } },
  }) as unknown as InsulationReading;

describe("dryOutSeries", () => {
  it("extends the fitted trend from the last reading to the minimum (constructed R = 5·2^(t/10 h))", () => {
    // forecastDryOut: from 40 MΩ at 30 h to 100 MΩ takes 10·log2(2.5) = 13.219 h (see insulation-dry-out.test.ts).
    const s = dryOutSeries([reading(30, 40), reading(0, 5), reading(20, 20), reading(10, 10)])!;
    expect(s.points.map((p) => p.y)).toEqual([5, 10, 20, 40]);
    expect(s.extension![0]).toEqual({ t: T0 + 30 * HOUR, y: 40 });
    expect((s.extension![1].t - T0) / HOUR).toBeCloseTo(30 + 13.219280949, 6);
    expect(s.extension![1].y).toBe(100);
    expect(s.yDomain).toEqual([1, 1000]);
    // whole hours (no false precision); an exact fit has no spread, so no range is printed
    expect(forecastWords(s)).toMatch(/^Estimate, not a promise: .*about 13 h after the last reading\. Re-test/);
  });

  it("draws no extension when the minimum is met, the trend falls, or a reading could not be corrected", () => {
    expect(dryOutSeries([reading(0, 50), reading(10, 80), reading(20, 120)])!.extension).toBeNull();
    const falling = dryOutSeries([reading(0, 50), reading(10, 40), reading(20, 30)])!;
    expect(falling.extension).toBeNull();
    expect(forecastWords(falling)).toMatch(/^No estimate/);
    expect(dryOutSeries([reading(0, null)])).toBeNull();
  });

  it("does not draw an estimate more than 60 days out", () => {
    // 1 → 1.5 MΩ over 40 days: rising (the window changes 50 %), doubling about every 68 days.
    const slow = dryOutSeries([reading(0, 1), reading(480, 1.22), reading(960, 1.5)])!;
    expect(slow.extension).toBeNull();
    expect(forecastWords(slow)).toContain("more than 60 days");
  });

  it("a series flattening below the minimum says so instead of promising it", () => {
    const flat = dryOutSeries([reading(0, 1), reading(240, 1.01), reading(480, 1.02)])!;
    expect(flat.extension).toBeNull();
    expect(forecastWords(flat)).toMatch(/^Levelling off below the minimum: drying alone may not get there/);
  });

  it("readings not valid for judging are drawn apart and left out of the trend", () => {
    const bad = {
      ...reading(5, 300),
      judgement: { ...reading(5, 300).judgement, validForJudging: false },
    } as InsulationReading;
    const s = dryOutSeries([reading(0, 5), reading(10, 10), reading(20, 20), bad])!;
    expect(s.points.map((p) => p.y)).toEqual([5, 10, 20]);
    expect(s.excluded.map((p) => p.y)).toEqual([300]);
    expect(forecastWords(s)).toMatch(/1 reading not valid for judging/);
  });
});

describe("logTicks", () => {
  it.each([
    [1, 1000, [1, 10, 100, 1000]],
    [10, 1000, [10, 20, 50, 100, 200, 500, 1000]],
  ])("%f…%f → %j", (lo, hi, ticks) => {
    expect(logTicks(lo, hi).map((x) => Number(x.toPrecision(6)))).toEqual(ticks);
  });
});

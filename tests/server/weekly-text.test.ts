import { describe, expect, it } from "vitest";
import { buildWeeklySummary, LIST_LIMIT, type WeeklyInput } from "../../server/notifications/weekly-text";

// The wording of the weekly summary from counts already made. The counts themselves are
// tested against rows in notifications.api.test.ts; these are plain arithmetic ('common practice').
const base: WeeklyInput = {
  siteName: "MV Test <Tender>",
  timeZone: "UTC",
  from: new Date("2030-03-03T07:00:00Z"),
  to: new Date("2030-03-10T07:00:00Z"),
  siteUrl: "http://t.example/sites/s1",
  accountUrl: "http://t.example/account",
  inspections: { total: 0, positions: 0, byBoard: [] },
  opened: { count: 0, items: [] },
  closed: { count: 0, items: [] },
  blockers: { count: 0, items: [] },
};
const line = (i: number) => ({ title: `Defect ${i}`, board: "Main", designation: `1-${i}` });

describe("buildWeeklySummary", () => {
  it("a quiet week says so, and says that no blocker is not a statement of safety", () => {
    const m = buildWeeklySummary(base);
    expect(m.text).toContain("No inspections were logged and no defects were opened or closed this week.");
    expect(m.text).toContain("That is not a statement that any board is safe to energise");
    expect(m.subject).toBe("Tideline weekly: MV Test <Tender>, 2030-03-03 to 2030-03-10");
  });

  it.each([
    [1, 1, "Surveyed: 1 inspection logged on 1 position"],
    [5, 3, "Surveyed: 5 inspections logged on 3 positions"],
  ])("%i inspections on %i positions read as '%s'", (total, positions, expected) => {
    expect(buildWeeklySummary({ ...base, inspections: { total, positions, byBoard: [] } }).text).toContain(expected);
  });

  it(`lists at most ${LIST_LIMIT} items and counts the rest`, () => {
    const items = Array.from({ length: LIST_LIMIT }, (_, i) => line(i));
    const m = buildWeeklySummary({ ...base, opened: { count: 14, items } });
    expect(m.text).toContain("Defects opened: 14");
    expect(m.text).toContain("- Defect 9 — Main 1-9");
    expect(m.text).toContain("…and 4 more");
  });

  it("names why each blocker blocks, its status, and puts the count in the subject", () => {
    const m = buildWeeklySummary({
      ...base,
      blockers: {
        count: 1,
        items: [{ ...line(1), status: "under_repair", safetyCritical: true, blocksEnergisation: true }],
      },
    });
    expect(m.text).toContain("- Defect 1 — Main 1-1 (blocks re-energisation, safety-critical; under repair)");
    expect(m.subject).toMatch(/ — 1 blocker$/);
  });

  it("the HTML part says the same, with names escaped", () => {
    const m = buildWeeklySummary({
      ...base,
      opened: { count: 1, items: [{ title: "Lug <loose> & hot", board: "Main", designation: null }] },
    });
    expect(m.html).toContain("Lug &lt;loose&gt; &amp; hot — Main");
    expect(m.html).not.toContain("<loose>");
    expect(m.html).toContain('href="http://t.example/sites/s1"');
    expect(m.text).toContain("Lug <loose> & hot — Main");
  });
});

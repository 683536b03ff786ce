import { describe, expect, it } from "vitest";
import { insulationReadingBody } from "../../src/schemas/readings";

// The words a volunteer reads beside a field: Tideline's own (no standard), checked as they read.
describe("a reading's number fields say what is wrong in words", () => {
  const base = {
    componentId: null,
    circuit: "Steering gear",
    conductors: "A-G",
    testVoltsDc: 1000,
    equipmentTempC: 20,
    measuredAt: "2026-12-05T22:00:00.000Z",
  };
  const fieldMessage = (body: Record<string, unknown>, field: string) => {
    const r = insulationReadingBody.safeParse({ ...base, ...body });
    expect(r.success).toBe(false);
    return r.error!.issues.find((i) => i.path[0] === field)?.message;
  };
  it("a blank reading asks for it; one that is not a number says so", () => {
    expect(fieldMessage({ megohms: null }, "megohms")).toBe("Enter the reading");
    expect(fieldMessage({ megohms: Number.NaN }, "megohms")).toBe("Reading must be a number");
    expect(fieldMessage({ megohms: -5 }, "megohms")).toBe("Reading must be at least 0 MΩ");
  });
});

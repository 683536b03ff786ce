import { describe, expect, it } from "vitest";
import type { z } from "zod";
import { FIELD_LABELS, fieldLabel, valueWords } from "../../src/schemas/field-labels";
import { createDefectBody, patchDefectBody, transitionBody } from "../../src/schemas/defects";
import { createInspectionBody, custodyBody } from "../../src/schemas/inventory";
import {
  contactReadingBody,
  groundCheckBody,
  groundHuntBody,
  insulationReadingBody,
  stepVoltageBody,
  thermalScanBody,
  tripTestBody,
} from "../../src/schemas/readings";
import { watchCheckBody } from "../../src/schemas/return-to-service";

/** Each kind the outbox sends, with the body it sends (the request schema the server parses). */
const BODIES: Array<[string, z.ZodObject]> = [
  ["defect", createDefectBody],
  ["defect_edit", patchDefectBody],
  ["defect_status", transitionBody],
  ["inspection", createInspectionBody],
  ["custody", custodyBody],
  ["insulation", insulationReadingBody],
  ["contact", contactReadingBody],
  ["thermal", thermalScanBody],
  ["ground", groundCheckBody],
  ["trip", tripTestBody],
  ["step", stepVoltageBody],
  ["hunt", groundHuntBody],
  ["watch_check", watchCheckBody],
];

describe("field labels of the records the phone sends", () => {
  it.each(BODIES)("every field of a %s has words a person reads", (kind, schema) => {
    const missing = Object.keys(schema.shape).filter((k) => !FIELD_LABELS[kind]?.[k]);
    expect(missing).toEqual([]);
  });

  /** The options of a field that is a choice (through optional/nullable/default/array wrappers), or none. */
  function choices(t: unknown): string[] | null {
    let z = t as {
      options?: unknown;
      unwrap?: () => unknown;
      element?: unknown;
      _zod?: { def?: { innerType?: unknown } };
    };
    for (let i = 0; i < 6; i++) {
      if (Array.isArray(z.options) && z.options.every((o) => typeof o === "string")) return z.options as string[];
      const inner = z._zod?.def?.innerType ?? z.element;
      if (!inner) return null;
      z = inner as typeof z;
    }
    return null;
  }

  it.each(BODIES)("every choice of a %s reads as the form says it, not as stored", (kind, schema) => {
    const raw: string[] = [];
    for (const [k, t] of Object.entries(schema.shape))
      for (const v of choices(t) ?? [])
        if (valueWords(kind, k, v) === v && /[a-z]_[a-z]/.test(v)) raw.push(`${k}=${v}`);
    expect(raw).toEqual([]);
  });

  it("shows the words of a stored value", () => {
    expect(valueWords("defect_edit", "partsState", "none_needed")).toBe("No parts needed");
    expect(valueWords("defect_status", "status", "awaiting_retest")).not.toBe("awaiting_retest");
    expect(valueWords("watch_check", "lamps", "one_dark")).toBe("One dark");
    expect(valueWords("defect_edit", "title", "Lug scorched")).toBe("Lug scorched");
  });

  it("names a known field by its label, not its key", () => {
    expect(fieldLabel("defect_edit", "blocksEnergisation")).toBe("Blocks energising its section");
    expect(fieldLabel("custody", "tagNumber")).toBe("Tag number on the bag");
  });

  it("spells out a key no map knows instead of showing it raw", () => {
    expect(fieldLabel("parts", "heritageAfter")).toBe("Heritage after");
    expect(fieldLabel("defect", "sparePartNo")).toBe("Spare part no");
    expect(fieldLabel("unknown", "thermalPositionId")).toBe("Thermal position");
  });
});

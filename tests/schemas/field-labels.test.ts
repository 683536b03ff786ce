import { describe, expect, it } from "vitest";
import type { z } from "zod";
import { FIELD_LABELS, fieldLabel } from "../../src/schemas/field-labels";
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

/**
 * Label sheet geometry (src/domain/label-sheets.ts). The sheet figures are from memory of
 * the common stationers' layouts (common practice); these checks hold them to the page
 * they are printed on, and the QR/tag parsing to the URL format the labels carry.
 */
import QRCode from "qrcode";
import { describe, expect, it } from "vitest";
import { LABEL_SHEETS, labelSheet, labelSlots, sheetFits, tagFromScan, tagUrl } from "../../src/domain/label-sheets";

describe("label sheets", () => {
  it.each(LABEL_SHEETS.map((s) => [s.id, s] as const))(
    "%s: every label lies on the page and none overlap",
    (_id, s) => {
      expect(sheetFits(s)).toBe(true);
    },
  );

  it.each([
    // id, page (mm), labels per sheet — A4 is 210 × 297 mm (ISO 216); US Letter 8.5 × 11 in = 215.9 × 279.4 mm (ANSI/ASME Y14.1)
    ["a4-21", 210, 297, 21],
    ["a4-24", 210, 297, 24],
    ["letter-30", 215.9, 279.4, 30],
    ["letter-10", 215.9, 279.4, 10],
    ["thermal-50x25", 50, 25, 1],
  ] as const)("%s is on a %s × %s mm page with %s labels", (id, w, h, n) => {
    const s = labelSheet(id);
    expect(s.pageWidth).toBeCloseTo(w, 6);
    expect(s.pageHeight).toBeCloseTo(h, 6);
    expect(s.cols * s.rows).toBe(n);
  });

  it("the A4 21-up sheet's margins are equal left and right, top and bottom (a symmetric layout, as sold)", () => {
    const s = labelSheet("a4-21");
    const right = s.pageWidth - (s.left + (s.cols - 1) * s.pitchX + s.labelWidth);
    const bottom = s.pageHeight - (s.top + (s.rows - 1) * s.pitchY + s.labelHeight);
    expect(right).toBeCloseTo(s.left, 0);
    expect(bottom).toBeCloseTo(s.top, 1);
  });

  it("starting at label 5 of a 21-up sheet skips four labels, then fills the next sheet from label 1", () => {
    const s = labelSheet("a4-21");
    const slots = labelSlots(s, 20, 5);
    expect(slots[0]).toEqual({ page: 0, number: 5, x: s.left + 1 * s.pitchX, y: s.top + 1 * s.pitchY });
    expect(slots[16]).toMatchObject({ page: 0, number: 21 });
    expect(slots[17]).toMatchObject({ page: 1, number: 1, x: s.left, y: s.top });
    expect(slots).toHaveLength(20);
  });

  it("refuses a start outside the sheet", () => {
    expect(() => labelSlots(labelSheet("letter-30"), 1, 31)).toThrow(RangeError);
    expect(() => labelSlots(labelSheet("letter-30"), 1, 0)).toThrow(RangeError);
  });
});

describe("tag URLs and scans", () => {
  it("a tag's short URL round-trips through tagFromScan, whatever the host", () => {
    for (const tag of ["KL-0401", "T-0001", "A.12_b"]) {
      expect(tagFromScan(tagUrl("https://tideline.example.org/", tag))).toBe(tag);
      expect(tagFromScan(tagUrl("http://127.0.0.1:3000", tag))).toBe(tag);
    }
    expect(tagFromScan("/t/KL-0401?from=label")).toBe("KL-0401");
    expect(tagFromScan("  KL-0401 ")).toBe("KL-0401");
  });

  it("text that is neither a tag URL nor a tag number is not a tag", () => {
    expect(tagFromScan("https://example.org/some/other/page")).toBeNull();
    expect(tagFromScan("WIFI:S:net;T:WPA;P:secret;;")).toBeNull();
    expect(tagFromScan("")).toBeNull();
  });

  it("the URL fits a small QR code: version 3 at level M (qrcode package) for a typical crew address", () => {
    const qr = QRCode.create(tagUrl("http://192.168.1.20:3000", "KL-0401"), { errorCorrectionLevel: "M" });
    expect(qr.version).toBeLessThanOrEqual(3);
  });
});

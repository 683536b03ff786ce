import { describe, expect, it } from "vitest";
import { currencySymbol, formatMoney, isCurrency, minorUnits, moneyLabel } from "../../src/domain/money";

// Minor units are ISO 4217's own table (List One, "Minor unit" column: USD 2, EUR 2, JPY 0,
// KWD 3, NOK 2); the formatting is the runtime's ICU (Intl.NumberFormat, a general-purpose
// reference library), checked here against those published digits and CLDR's en-US / de-DE patterns.
describe("minorUnits follows ISO 4217's minor unit column", () => {
  it.each([
    ["USD", 2],
    ["EUR", 2],
    ["GBP", 2],
    ["NOK", 2],
    ["JPY", 0],
    ["KWD", 3],
  ])("%s has %i decimals", (code, n) => expect(minorUnits(code)).toBe(n));
});

describe("formatMoney", () => {
  it.each([
    [1234.5, "USD", "en-US", "$1,234.50"],
    [185, "USD", "en-US", "$185.00"],
    [1234.5, "EUR", "en-US", "€1,234.50"],
    [1234.5, "JPY", "en-US", "¥1,235"],
    [1.2345, "KWD", "en-US", "KWD 1.235"],
  ])("%f %s in %s is %s", (v, code, locale, out) =>
    expect(formatMoney(v, code, { locale }).replace(/\u00a0/g, " ")).toBe(out),
  );

  it("writes the German grouping and the symbol after the figure (CLDR de-DE)", () => {
    expect(formatMoney(1234.5, "EUR", { locale: "de-DE" }).replace(/\u00a0/g, " ")).toBe("1.234,50 €");
  });

  it("rounds to whole units when asked", () => {
    expect(formatMoney(1234.5, "USD", { locale: "en-US", whole: true })).toBe("$1,235");
  });

  it.each([null, undefined, NaN])("shows a dash for %s", (v) => expect(formatMoney(v, "USD")).toBe("—"));

  it("two figures side by side never run together", () => {
    const [a, b] = [formatMoney(185, "USD", { locale: "en-US" }), formatMoney(170, "USD", { locale: "en-US" })];
    expect(`${a}${b}`).toBe("$185.00$170.00");
  });
});

describe("isCurrency", () => {
  it.each(["USD", "EUR", "NOK", "CAD", "JPY"])("knows %s", (c) => expect(isCurrency(c)).toBe(true));
  it.each(["usd", "EURO", "", "X1Z", "ZZZ"])("refuses %s", (c) => expect(isCurrency(c)).toBe(false));
});

describe("labels and symbols", () => {
  it("labels a field with the code (a $ alone names many currencies)", () =>
    expect(moneyLabel("Cost", "CAD")).toBe("Cost (CAD)"));
  it.each([
    ["EUR", "€"],
    ["GBP", "£"],
    ["USD", "$"],
  ])("%s's symbol in en-US is %s", (c, s) => expect(currencySymbol(c, "en-US")).toBe(s));
});

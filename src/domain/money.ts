/**
 * Money in a site's currency. A site stores an ISO 4217 alphabetic code
 * (`sites.currency`, "USD" until a curator sets it); every figure is formatted by the runtime's
 * ICU through Intl.NumberFormat, which carries ISO 4217's minor units (2 decimals for EUR and
 * USD, none for JPY, 3 for KWD) and each locale's symbol and grouping. Amounts are stored as
 * plain numbers in that currency; changing the site's currency relabels them, it never converts.
 */

const supported = (): readonly string[] =>
  typeof Intl.supportedValuesOf === "function" ? Intl.supportedValuesOf("currency") : [];

/** True for an ISO 4217 alphabetic code the runtime knows ("EUR", "NOK"); false for "eur", "XYZ1". */
export function isCurrency(code: string): boolean {
  if (!/^[A-Z]{3}$/.test(code)) return false;
  const known = supported();
  if (known.length) return known.includes(code);
  try {
    new Intl.NumberFormat("en", { style: "currency", currency: code });
    return true;
  } catch {
    return false;
  }
}

/** Every code the runtime knows, for the curator's choice (sorted, as ICU lists them). */
export const currencyCodes = (): string[] => [...supported()];

const cache = new Map<string, Intl.NumberFormat>();
function formatter(currency: string, locale: string | undefined, whole: boolean) {
  const key = `${locale ?? ""}|${currency}|${whole}`;
  let f = cache.get(key);
  if (!f) {
    f = new Intl.NumberFormat(locale, {
      style: "currency",
      currency,
      currencyDisplay: "narrowSymbol",
      ...(whole ? { maximumFractionDigits: 0, minimumFractionDigits: 0 } : {}),
    });
    cache.set(key, f);
  }
  return f;
}

export interface MoneyOptions {
  /** BCP 47 locale; the reader's own when left out. */
  locale?: string;
  /** Round to whole units (plans and estimates where cents would be false precision). */
  whole?: boolean;
}

/** "$1,234.50", "€1,234.50", "¥1,235"; "—" for no amount. */
export function formatMoney(v: number | null | undefined, currency: string, o: MoneyOptions = {}): string {
  if (v == null || !Number.isFinite(v)) return "—";
  return formatter(currency, o.locale, o.whole ?? false).format(v);
}

/** The symbol a reader of `locale` sees for the currency ("€", "$", "kr"). */
export function currencySymbol(currency: string, locale?: string): string {
  return (
    formatter(currency, locale, false)
      .formatToParts(0)
      .find((p) => p.type === "currency")?.value ?? currency
  );
}

/** Decimal places ISO 4217 gives the currency (the step of a money input). */
export function minorUnits(currency: string): number {
  return formatter(currency, "en", false).resolvedOptions().maximumFractionDigits ?? 2;
}

/** A money field's label: "Estimated unit cost (EUR)". The code, not the symbol: "$" is many currencies. */
export const moneyLabel = (label: string, currency: string) => `${label} (${currency})`;

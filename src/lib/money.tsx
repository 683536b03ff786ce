import { createContext, useContext, useMemo, type ReactNode } from "react";
import { currencySymbol, formatMoney, minorUnits, moneyLabel, type MoneyOptions } from "../domain/money";

/**
 * The site's currency for every money figure and field under a site's pages: SiteLayout
 * provides it from `site.currency`; features read it with `useMoney()` and never hard-code one.
 */
const CurrencyContext = createContext<string>("USD");

export function CurrencyProvider({ currency, children }: { currency: string; children: ReactNode }) {
  return <CurrencyContext.Provider value={currency}>{children}</CurrencyContext.Provider>;
}

export interface Money {
  currency: string;
  /** "$1,234.50" in the reader's locale; "—" for no amount. */
  format: (v: number | null | undefined, o?: Omit<MoneyOptions, "locale">) => string;
  /** A money field's label, "Cost (EUR)". */
  label: (text: string) => string;
  symbol: string;
  /** The `step` of a money input: 0.01 for EUR, 1 for JPY. */
  step: number;
}

export function useMoney(): Money {
  const currency = useContext(CurrencyContext);
  return useMemo(
    () => ({
      currency,
      format: (v, o) => formatMoney(v, currency, o),
      label: (text) => moneyLabel(text, currency),
      symbol: currencySymbol(currency),
      step: 10 ** -minorUnits(currency),
    }),
    [currency],
  );
}

/** One amount in the site's currency, as a component (table cells, lists). */
export function Money({ value, whole }: { value: number | null | undefined; whole?: boolean }) {
  return <>{useMoney().format(value, { whole })}</>;
}

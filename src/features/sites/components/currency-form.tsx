import { useMemo } from "react";
import { currencyCodes } from "../../../domain/money";
import { siteCurrencyBody } from "../../../schemas/sites";
import { useSetCurrency } from "../api";
import { SiteSettingForm } from "./site-setting-form";

/** Codes the browser knows (ISO 4217 in its ICU), with their names in the reader's language. */
function options(current: string) {
  const names = typeof Intl.DisplayNames === "function" ? new Intl.DisplayNames(undefined, { type: "currency" }) : null;
  return [...new Set([current, ...currencyCodes()])]
    .sort()
    .map((code) => ({ value: code, label: `${code} · ${names?.of(code) ?? code}` }));
}

/** "Costs are in …": the site's currency, which the curator can change (amounts are not converted). */
export function CurrencyForm({ siteId, currency, canEdit }: { siteId: string; currency: string; canEdit: boolean }) {
  const m = useSetCurrency(siteId);
  const choices = useMemo(() => options(currency), [currency]);
  return (
    <SiteSettingForm
      current={currency}
      canEdit={canEdit}
      readOnly={
        <>
          Costs on this site are in <span className="font-mono">{currency}</span>.
        </>
      }
      label="Site currency (every cost is shown and entered in it)"
      choices={choices}
      check={siteCurrencyBody.shape.currency}
      // `from` is the currency the form was showing: a change made meanwhile by someone else is refused (409).
      save={(value) => m.mutateAsync({ currency: value, from: currency })}
      pending={m.isPending}
      submitLabel="Save currency"
      savedNote="Saved. Amounts keep their numbers; they now read in this currency."
      labelClassName="min-w-0 max-w-full"
      selectClassName="w-full max-w-80"
    />
  );
}

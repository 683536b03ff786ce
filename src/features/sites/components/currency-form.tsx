import { useId, useMemo, useState } from "react";
import { Button } from "../../../components/button";
import { currencyCodes } from "../../../domain/money";
import { ApiError } from "../../../lib/api-client";
import { useSetCurrency } from "../api";

/** Codes the browser knows (ISO 4217 in its ICU), with their names in the reader's language. */
function options(current: string) {
  const names = typeof Intl.DisplayNames === "function" ? new Intl.DisplayNames(undefined, { type: "currency" }) : null;
  return [...new Set([current, ...currencyCodes()])].sort().map((code) => ({ code, name: names?.of(code) ?? code }));
}

/** "Costs are in …": the site's currency, which the curator can change (amounts are not converted). */
export function CurrencyForm({ siteId, currency, canEdit }: { siteId: string; currency: string; canEdit: boolean }) {
  const id = useId();
  const [value, setValue] = useState(currency);
  const m = useSetCurrency(siteId);
  const list = useMemo(() => options(currency), [currency]);
  if (!canEdit)
    return (
      <p className="text-sm text-mist">
        Costs on this site are in <span className="font-mono">{currency}</span>.
      </p>
    );
  return (
    <form
      className="flex flex-wrap items-end gap-2 text-sm"
      onSubmit={(e) => {
        e.preventDefault();
        m.mutate({ currency: value, from: currency });
      }}
    >
      <label htmlFor={id} className="flex min-w-0 max-w-full flex-col gap-1">
        <span>Site currency (every cost is shown and entered in it)</span>
        <select
          id={id}
          value={value}
          onChange={(e) => setValue(e.target.value)}
          className="min-h-11 w-full max-w-80 rounded-md border border-hull-500 bg-hull-900 px-2"
        >
          {list.map((c) => (
            <option key={c.code} value={c.code}>
              {c.code} · {c.name}
            </option>
          ))}
        </select>
      </label>
      <Button type="submit" tone="quiet" disabled={value === currency || m.isPending}>
        Save currency
      </Button>
      <span role="status" className="min-h-5">
        {m.isSuccess && value === currency && "Saved. Amounts keep their numbers; they now read in this currency."}
        {m.error instanceof ApiError && <span className="text-flare-300">{m.error.message}</span>}
      </span>
    </form>
  );
}

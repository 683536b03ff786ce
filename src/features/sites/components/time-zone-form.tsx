import { useId, useMemo, useState } from "react";
import { Button } from "../../../components/button";
import { ApiError } from "../../../lib/api-client";
import { useSetTimeZone } from "../api";

/** Zones the browser knows (the IANA tz database in its ICU); the current one is always offered. */
function zones(current: string) {
  const all = typeof Intl.supportedValuesOf === "function" ? Intl.supportedValuesOf("timeZone") : [];
  return [...new Set(["UTC", current, ...all])].sort();
}

/** "Times in exports are in …": the site's time zone, which the curator can change. */
export function TimeZoneForm({ siteId, timeZone, canEdit }: { siteId: string; timeZone: string; canEdit: boolean }) {
  const id = useId();
  const [value, setValue] = useState(timeZone);
  const m = useSetTimeZone(siteId);
  const options = useMemo(() => zones(timeZone), [timeZone]);
  if (!canEdit)
    return (
      <p className="text-sm text-mist">
        Times in exports are the site's local time, <span className="font-mono">{timeZone}</span>.
      </p>
    );
  return (
    <form
      className="flex flex-wrap items-end gap-2 text-sm"
      onSubmit={(e) => {
        e.preventDefault();
        m.mutate(value);
      }}
    >
      <label htmlFor={id} className="flex flex-col gap-1">
        <span>Site time zone (times in exports are written in it)</span>
        <select
          id={id}
          value={value}
          onChange={(e) => setValue(e.target.value)}
          className="min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2 font-mono"
        >
          {options.map((z) => (
            <option key={z}>{z}</option>
          ))}
        </select>
      </label>
      <Button type="submit" tone="quiet" disabled={value === timeZone || m.isPending}>
        Save time zone
      </Button>
      <span role="status" className="min-h-5">
        {m.isSuccess && value === timeZone && "Saved."}
        {m.error instanceof ApiError && <span className="text-flare-300">{m.error.message}</span>}
      </span>
    </form>
  );
}

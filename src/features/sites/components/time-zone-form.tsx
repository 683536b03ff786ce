import { useMemo } from "react";
import { siteTimeZoneBody } from "../../../schemas/sites";
import { useSetTimeZone } from "../api";
import { SiteSettingForm } from "./site-setting-form";

/** Zones the browser knows (the IANA tz database in its ICU); the current one is always offered. */
function zones(current: string) {
  const all = typeof Intl.supportedValuesOf === "function" ? Intl.supportedValuesOf("timeZone") : [];
  return [...new Set(["UTC", current, ...all])].sort().map((z) => ({ value: z, label: z }));
}

/** The site's clock: the time zone its files, report and e-mails write, which the curator can change. */
export function TimeZoneForm({ siteId, timeZone, canEdit }: { siteId: string; timeZone: string; canEdit: boolean }) {
  const m = useSetTimeZone(siteId);
  const choices = useMemo(() => zones(timeZone), [timeZone]);
  return (
    <SiteSettingForm
      current={timeZone}
      canEdit={canEdit}
      readOnly={
        <>
          The site&apos;s clock is <span className="font-mono">{timeZone}</span>: exports, the survey report and e-mails
          write times in it, and a qualification&apos;s last day is counted by it.
        </>
      }
      label="Site time zone (exports, the report, e-mails and qualification days follow it)"
      choices={choices}
      check={siteTimeZoneBody.shape.timeZone}
      save={(value) => m.mutateAsync(value)}
      pending={m.isPending}
      submitLabel="Save time zone"
      savedNote="Saved."
      selectClassName="font-mono"
    />
  );
}

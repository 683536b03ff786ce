import { useState, type ReactNode } from "react";
import { Button } from "../../../components/button";
import { ApiError } from "../../../lib/api-client";
import type { DefectDetail } from "../../../schemas/defects";
import { useEvidence, useLinkReading } from "../api";
import { dateOf, stamp } from "../../../lib/clock";

const VERDICT_WORDS: Record<string, string> = {
  meets: "✓ meets the recorded criterion",
  below_minimum: "✕ below the minimum",
  investigate: "△ investigate",
};

/**
 * What proves the repair: the reading it was raised from, the re-test readings
 * linked to it (judged now), and the after-work photos; closing needs a re-test meeting its
 * criterion or an after-work photo. `photos` is the route's slot for the photo upload.
 */
export function EvidencePanel({
  siteId,
  detail,
  canLink,
  photos,
}: {
  siteId: string;
  detail: DefectDetail;
  canLink: boolean;
  photos?: ReactNode;
}) {
  const d = detail.defect;
  const q = useEvidence(siteId, d.id);
  const link = useLinkReading(siteId, d.id);
  const [pick, setPick] = useState("");
  const ev = q.data;
  const ready = ev && (ev.retestsMeeting > 0 || ev.afterPhotos > 0);
  return (
    <section
      aria-labelledby="ev-title"
      className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
      data-testid="evidence"
    >
      <h2 id="ev-title" className="text-lg font-bold">
        Evidence of the repair
      </h2>
      {ev && (
        <p className={`mt-1 text-sm ${ready ? "text-kelp-300" : "text-mist"}`}>
          {ready
            ? `Ready to close: ${ev.retestsMeeting} re-test${ev.retestsMeeting === 1 ? "" : "s"} meeting the criterion, ${ev.afterPhotos} after-work photo${ev.afterPhotos === 1 ? "" : "s"}.`
            : "Closing needs a re-test reading that meets its criterion, or an after-work photo filed here."}
        </p>
      )}
      {ev && ev.linked.length > 0 && (
        <ul className="mt-2 space-y-1 text-sm">
          {ev.linked.map((l) => (
            <li key={l.id} className="border-l-2 border-hull-500 pl-2">
              <span className="font-semibold">{l.role === "raised_from" ? "Raised from" : "Re-test"}:</span> {l.summary}{" "}
              · {stamp(l.measuredAt)} · {VERDICT_WORDS[l.verdict] ?? l.verdict}
            </li>
          ))}
        </ul>
      )}
      {canLink && ev && ev.candidates.length > 0 && (
        <div className="mt-3 flex flex-wrap items-end gap-2">
          <label className="min-w-0 flex-1 text-sm font-semibold text-mist">
            Link a re-test reading of this component
            <select
              value={pick}
              onChange={(e) => setPick(e.target.value)}
              className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
            >
              <option value="">Choose a reading…</option>
              {ev.candidates.map((c) => (
                <option key={`${c.readingKind}:${c.readingId}`} value={`${c.readingKind}:${c.readingId}`}>
                  {dateOf(c.measuredAt)} · {c.summary} · {VERDICT_WORDS[c.verdict] ?? c.verdict}
                </option>
              ))}
            </select>
          </label>
          <Button
            disabled={!pick || link.isPending}
            onClick={() => {
              const [readingKind, readingId] = pick.split(":") as [
                "insulation" | "contact" | "thermal" | "ground",
                string,
              ];
              link.mutate(
                { readingKind, readingId, role: "retest" },
                {
                  onSuccess: () => {
                    setPick("");
                    void q.refetch();
                  },
                },
              );
            }}
          >
            Link as re-test
          </Button>
        </div>
      )}
      {link.error && (
        <p role="alert" className="mt-2 text-flare-300">
          {link.error instanceof ApiError ? link.error.message : "That did not work."}
        </p>
      )}
      {photos && <div className="mt-3">{photos}</div>}
    </section>
  );
}

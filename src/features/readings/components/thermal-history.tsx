import type { ReactNode } from "react";
import type { ThermalScan } from "../../../schemas/readings";
import { sig, when } from "../format";
import { ReadingDefects } from "./reading-defects";
import { SourceDetails } from "./source-details";

const rise = (v: number | null, what: string) => (v == null ? null : `${v >= 0 ? "+" : ""}${sig(v)} °C over ${what}`);

/** `image` draws a scan's thermal image (the page composes it from the photos feature). */
export function ThermalHistory({
  scans,
  image,
}: {
  scans: ThermalScan[];
  image?: (photoId: string, scan: ThermalScan) => ReactNode;
}) {
  if (scans.length === 0) return <p className="text-mist">No thermal scans yet.</p>;
  return (
    <ul className="space-y-2" aria-label="Thermal findings">
      {scans.map((s) => (
        <li key={s.id} className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700">
          <div className="flex flex-wrap items-baseline justify-between gap-2">
            <span className="font-mono font-semibold">{s.designation}</span>
            <span className="text-sm text-mist">{when(s.measuredAt)}</span>
          </div>
          <p className="mt-1">
            <span
              className="mr-2 inline-block rounded bg-hull-700 px-2 py-0.5 font-mono font-bold"
              data-testid="thermal-level"
            >
              Level {s.judgement.level} of 4
            </span>
            <strong>{s.judgement.action}</strong>
          </p>
          <p className="text-sm text-mist">
            Measured: {sig(s.componentTempC)} °C ·{" "}
            {[rise(s.judgement.overSimilarC, "a similar component"), rise(s.judgement.overAmbientC, "ambient")]
              .filter(Boolean)
              .join(" · ")}
            {s.loadPercent != null && ` · load ${sig(s.loadPercent)} %`}
            {s.loadAmps != null && ` · load ${sig(s.loadAmps)} A`}
            {` · level ${s.judgement.measuredLevel} as measured`}
          </p>
          {s.judgement.scaledLevel != null && (
            <p className="text-sm" data-testid="thermal-scaled">
              Scaled to rated load:{" "}
              {[
                rise(s.judgement.scaledOverSimilarC, "a similar component"),
                rise(s.judgement.scaledOverAmbientC, "ambient"),
              ]
                .filter(Boolean)
                .join(" · ")}{" "}
              · level {s.judgement.scaledLevel}
            </p>
          )}
          {s.judgement.warnings.map((w) => (
            <p key={w} className="text-sm text-rust-300">
              <span aria-hidden="true">⚠ </span>
              {w}
            </p>
          ))}
          {s.photoId && (
            <figure className="mt-2">
              {image?.(s.photoId, s)}
              <figcaption className="text-xs text-mist">Thermal image of this scan</figcaption>
            </figure>
          )}
          <ReadingDefects kind="thermal" reading={s} />
          <SourceDetails sources={[{ title: "Temperature-rise bands", source: s.judgement.source }]} />
          {s.notes && <p className="text-sm text-mist">{s.notes}</p>}
        </li>
      ))}
    </ul>
  );
}

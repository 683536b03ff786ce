import { COMPONENT_KIND_LABELS } from "../../../domain/vocab";
import type { PartLine } from "../../../schemas/parts";
import { Money } from "../../../lib/money";
import { HeritageRuleBadge, PartStatusBadge } from "./badges";

const FIELD_LABELS: Record<string, string> = {
  ratingAmps: "Rating",
  poles: "Poles",
  voltageRating: "Voltage",
  frame: "Frame / type",
  mounting: "Mounting",
  maker: "Maker",
  model: "Model",
};

export function LineSummary({ line }: { line: PartLine }) {
  const spec: Array<[string, string]> = [
    ["Kind", COMPONENT_KIND_LABELS[line.kind]],
    ["Rating", line.ratingAmps != null ? `${line.ratingAmps} A` : "—"],
    ["Poles", line.poles != null ? String(line.poles) : "—"],
    ["Voltage", line.voltageRating != null ? `${line.voltageRating} V` : "—"],
    ["Frame / type", line.frame || "—"],
    ["Mounting", line.mounting || "—"],
    ["Maker", line.maker || "—"],
    ["Model", line.model || "—"],
  ];
  return (
    <section aria-labelledby="line-title" className="space-y-3">
      <p className="text-sm text-mist">
        Line <span className="font-mono text-chalk">{line.ref}</span> ·{" "}
        {line.origin === "manual" ? "added by hand" : "from the register"}
      </p>
      <h1 id="line-title" className="text-2xl font-bold">
        {line.title}
      </h1>
      <div className="flex flex-wrap items-center gap-3">
        <HeritageRuleBadge rule={line.heritageRule} large />
        <PartStatusBadge status={line.status} />
        <span className="font-semibold">Qty {line.qty}</span>
      </div>
      {line.status === "cancelled" && <p className="text-mist">Cancelled: {line.cancelReason}</p>}
      <dl className="grid grid-cols-2 gap-x-4 gap-y-1 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 wrap-anywhere sm:grid-cols-4">
        {spec.map(([k, v]) => (
          <div key={k}>
            <dt className="text-xs uppercase tracking-wide text-fog">{k}</dt>
            <dd className="font-mono">{v}</dd>
          </div>
        ))}
        {line.need && (
          <div className="col-span-2 sm:col-span-4">
            <dt className="text-xs uppercase tracking-wide text-fog">Part wanted</dt>
            <dd>{line.need}</dd>
          </div>
        )}
        <div className="col-span-2 sm:col-span-4">
          <dt className="text-xs uppercase tracking-wide text-fog">Must match</dt>
          <dd>
            {line.mustMatch ? ["Kind", ...line.mustMatch.map((f) => FIELD_LABELS[f])].join(", ") : "Every field above"}
          </dd>
        </div>
        <div>
          <dt className="text-xs uppercase tracking-wide text-fog">Estimated</dt>
          <dd className="font-mono">
            <Money value={line.estimated} />
          </dd>
        </div>
        <div>
          <dt className="text-xs uppercase tracking-wide text-fog">Spent</dt>
          <dd className="font-mono">
            <Money value={line.spent} />
          </dd>
        </div>
      </dl>
    </section>
  );
}

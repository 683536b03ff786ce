import type { GroundCheck } from "../../../schemas/readings";
import { sig, when } from "../format";
import { LampRow } from "./lamp-row";
import { SourceDetails } from "./source-details";
import { VerdictBadge } from "./verdict-badge";

export function GroundCheckCard({ check }: { check: GroundCheck }) {
  return (
    <div className="space-y-2">
      <p className="text-sm text-mist">
        {when(check.measuredAt)}
        {check.energisation && ` · ${check.energisation}`} · {sig(check.lineVolts)} V line
      </p>
      <LampRow check={check} />
      <p className="font-semibold" data-testid="ground-words">
        {check.judgement.words}
      </p>
      <VerdictBadge verdict={check.judgement.verdict} />
      <SourceDetails sources={[{ title: "How the lamps are read", source: check.judgement.source }]} />
      {check.notes && <p className="text-sm text-mist">{check.notes}</p>}
    </div>
  );
}

export function GroundCheckHistory({ checks }: { checks: GroundCheck[] }) {
  if (checks.length === 0) return <p className="text-mist">No ground-lamp checks yet.</p>;
  return (
    <ul className="space-y-2" aria-label="Ground-lamp checks">
      {checks.map((c) => (
        <li key={c.id} className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700">
          <GroundCheckCard check={c} />
        </li>
      ))}
    </ul>
  );
}

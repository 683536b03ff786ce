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
      {check.judgement.faultRange && <FaultRange check={check} />}
      <VerdictBadge verdict={check.judgement.verdict} />
      <SourceDetails sources={[{ title: "How the lamps are read", source: check.judgement.source }]} />
      {check.notes && <p className="text-sm text-mist">{check.notes}</p>}
    </div>
  );
}

/** The fault-resistance estimate as a range: the lamp model with the phases' capacitance when the crew gave it. */
function FaultRange({ check }: { check: GroundCheck }) {
  const r = check.judgement.faultRange!;
  const ohms = (v: number | null) => (v === null ? "—" : `${sig(v)} Ω`);
  return (
    <p className="text-sm" data-testid="fault-range">
      Estimated fault resistance {ohms(r.lowOhms)} to {ohms(r.highOhms)}
      {r.centralOhms !== null && ` (central ${ohms(r.centralOhms)})`}.{" "}
      <span className="text-mist">
        {r.capacitanceNeglected
          ? "Capacitance to ground not given: neglecting it overstates the resistance (by about 45 % at 1 µF per phase), so the range is wide."
          : `With ${sig(check.capacitanceMicroF ?? 0)} µF per phase to ground.`}
      </span>
    </p>
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

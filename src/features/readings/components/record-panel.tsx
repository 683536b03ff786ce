import { useState } from "react";
import { ContactForm } from "./contact-form";
import type { TargetOption } from "./form-bits";
import { GroundCheckForm } from "./ground-check-form";
import { InsulationForm } from "./insulation-form";
import { ThermalForm } from "./thermal-form";

const KINDS = {
  insulation: "Insulation",
  contact: "Contact resistance",
  thermal: "Thermal scan",
  ground: "Ground lamps",
} as const;
type Kind = keyof typeof KINDS;

/** One place at the board to record any reading; big buttons for gloved fingers. */
export function RecordPanel({
  siteId,
  boardId,
  lineVolts,
  options,
  componentId,
  kinds = Object.keys(KINDS) as Kind[],
}: {
  siteId: string;
  boardId: string;
  lineVolts: number;
  options: TargetOption[];
  componentId?: string;
  kinds?: Kind[];
}) {
  const [kind, setKind] = useState<Kind>(kinds[0]);
  return (
    <section aria-labelledby="record-title" className="space-y-3">
      <h2 id="record-title" className="text-xl font-bold">
        Record a reading
      </h2>
      <div role="group" aria-label="Kind of reading" className="grid grid-cols-2 gap-2 sm:flex">
        {kinds.map((k) => (
          <button
            key={k}
            type="button"
            aria-pressed={kind === k}
            onClick={() => setKind(k)}
            className={`min-h-11 rounded-md px-3 font-semibold ring-1 ${kind === k ? "bg-brass-400 text-hull-950 ring-brass-300" : "bg-hull-800 text-chalk ring-hull-600"}`}
          >
            {KINDS[k]}
          </button>
        ))}
      </div>
      {kind === "insulation" && (
        <InsulationForm siteId={siteId} boardId={boardId} options={options} defaultComponentId={componentId} />
      )}
      {kind === "contact" && <ContactForm siteId={siteId} options={options} defaultComponentId={componentId} />}
      {kind === "thermal" && <ThermalForm siteId={siteId} options={options} defaultComponentId={componentId} />}
      {kind === "ground" && <GroundCheckForm siteId={siteId} boardId={boardId} lineVolts={lineVolts} />}
    </section>
  );
}

import { useState, type ReactNode } from "react";
import type { GroundHunt, PhaseComparison } from "../../../schemas/readings";
import { ContactForm } from "./contact-form";
import type { TargetOption } from "./form-bits";
import { GroundCheckForm } from "./ground-check-form";
import { GroundHuntForm, type FeederOption } from "./ground-hunt-form";
import { InsulationForm } from "./insulation-form";
import { PhaseSetForm } from "./phase-set-form";
import { StepVoltageForm } from "./step-voltage-form";
import { ThermalForm } from "./thermal-form";
import { TripTestForm } from "./trip-test-form";

const KINDS = {
  insulation: "Insulation",
  phases: "Phase comparison",
  step: "Step voltage",
  contact: "Contact resistance",
  trip: "Trip test",
  thermal: "Thermal scan",
  ground: "Ground lamps",
  hunt: "Ground hunt",
} as const;
export type ReadingKind = keyof typeof KINDS;
export const BOARD_KINDS = Object.keys(KINDS) as ReadingKind[];

/** One place at the board to record any reading; big buttons for gloved fingers. */
export function RecordPanel({
  siteId,
  boardId,
  lineVolts,
  options,
  breakerOptions = options,
  feeders = [],
  hunts = [],
  comparisons = [],
  componentId,
  kinds = BOARD_KINDS,
  thermalPhotoPicker,
}: {
  siteId: string;
  boardId: string;
  lineVolts: number;
  options: TargetOption[];
  /** The components a trip test can be recorded on (breakers). */
  breakerOptions?: TargetOption[];
  /** The positions a ground hunt opens one at a time. */
  feeders?: FeederOption[];
  hunts?: GroundHunt[];
  comparisons?: PhaseComparison[];
  componentId?: string;
  kinds?: ReadingKind[];
  /** The page's thermal-image picker for the thermal form (from the photos feature). */
  thermalPhotoPicker?: (target: TargetOption, error?: string) => ReactNode;
}) {
  const [kind, setKind] = useState<ReadingKind>(kinds[0]);
  return (
    <section aria-labelledby="record-title" className="space-y-3">
      <h2 id="record-title" className="text-xl font-bold">
        Record a reading
      </h2>
      <div role="group" aria-label="Kind of reading" className="grid grid-cols-2 gap-2 sm:flex sm:flex-wrap">
        {kinds.map((k) => (
          <button
            key={k}
            type="button"
            aria-pressed={kind === k}
            onClick={() => setKind(k)}
            className={`min-h-12 rounded-md px-3 font-semibold ring-1 ${kind === k ? "bg-brass-400 text-hull-950 ring-brass-300" : "bg-hull-800 text-chalk ring-hull-600"}`}
          >
            {kind === k && <span aria-hidden="true">✓ </span>}
            {KINDS[k]}
          </button>
        ))}
      </div>
      {kind === "insulation" && (
        <InsulationForm siteId={siteId} boardId={boardId} options={options} defaultComponentId={componentId} />
      )}
      {kind === "phases" && (
        <PhaseSetForm
          siteId={siteId}
          boardId={boardId}
          options={options}
          comparisons={comparisons}
          defaultComponentId={componentId}
        />
      )}
      {kind === "step" && (
        <StepVoltageForm siteId={siteId} boardId={boardId} options={options} defaultComponentId={componentId} />
      )}
      {kind === "contact" && <ContactForm siteId={siteId} options={options} defaultComponentId={componentId} />}
      {kind === "trip" && (
        <TripTestForm
          siteId={siteId}
          options={breakerOptions}
          systemVolts={lineVolts}
          defaultComponentId={componentId}
        />
      )}
      {kind === "thermal" && (
        <ThermalForm
          siteId={siteId}
          options={options}
          defaultComponentId={componentId}
          photoPicker={thermalPhotoPicker}
        />
      )}
      {kind === "ground" && <GroundCheckForm siteId={siteId} boardId={boardId} lineVolts={lineVolts} />}
      {kind === "hunt" && <GroundHuntForm siteId={siteId} boardId={boardId} feeders={feeders} hunts={hunts} />}
    </section>
  );
}

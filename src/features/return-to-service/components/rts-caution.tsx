import { SafetyNotice } from "../../../components/safety-notice";

/**
 * The caution on every return-to-service screen: the shared safety notice, plus what this
 * part of Tideline is and is not. It records and computes; it never authorises energisation.
 */
export function RtsCaution({ compact = false }: { compact?: boolean }) {
  return (
    <div className="space-y-2" data-testid="rts-caution">
      <SafetyNotice compact={compact} />
      <p className="rounded-md bg-hull-800 p-3 text-sm">
        Tideline records the plan, the evidence and who signed what, and shows which recorded hold points are met. It
        never authorises energisation: NFPA 70E, local codes and the qualified person decide every step.
      </p>
    </div>
  );
}

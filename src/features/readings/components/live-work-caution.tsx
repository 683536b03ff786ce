import { Link } from "react-router";
import { paths } from "../../../config/paths";

/**
 * The caution for one kind of test, shown above its form (the page's SafetyNotice covers the
 * board as a whole). Tideline's own words; each defers to NFPA 70E, local codes and the
 * qualified person in charge. It records and computes; it never says equipment is safe.
 */
const WORDS = {
  trip: [
    "Primary injection drives many times the breaker's rating through it: only qualified people run the test set.",
    "Test the breaker isolated from the board, or with the board de-energised and locked out; the injection leads and the breaker get hot.",
  ],
  step: [
    "The test set puts a high DC voltage on the conductors: isolate and lock out the circuit, keep everyone clear of both ends, and stop at the equipment's rating.",
    "Insulation holds a charge after each step: ground the conductors through the set's discharge before anyone touches them (common practice).",
  ],
  hunt: [
    "A ground hunt is done with the board energised: shock and arc-flash hazard. Only a qualified person operates breakers, in the PPE the board's arc-flash label or the NFPA 70E tables call for, standing to the side.",
    "Close nothing back onto a suspected ground before an insulation test says what it is.",
  ],
  phases: [
    "Insulation tests put a high DC voltage on the conductors: isolate and lock out, keep everyone clear, and discharge each phase to ground before touching it (common practice).",
  ],
} as const;

export type CautionKind = keyof typeof WORDS;

export function LiveWorkCaution({ kind }: { kind: CautionKind }) {
  return (
    <aside
      role="note"
      aria-label="Caution for this test"
      className="rounded-md border-l-4 border-flare-400 bg-hull-900 p-3 text-sm text-chalk sm:col-span-2"
    >
      <p className="font-semibold text-flare-300">⚠ Before you start</p>
      <ul className="mt-1 list-disc space-y-1 pl-5">
        {WORDS[kind].map((w) => (
          <li key={w}>{w}</li>
        ))}
      </ul>
      <p className="mt-1 text-mist">
        Follow NFPA 70E (or your jurisdiction's equivalent), lockout/tagout and local codes; a qualified, licensed
        person decides every test and energisation.{" "}
        <Link to={paths.safety.href()} className="underline">
          Safety notice
        </Link>
      </p>
    </aside>
  );
}

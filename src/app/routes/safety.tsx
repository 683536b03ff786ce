import { Link } from "react-router";

export default function SafetyPage() {
  return (
    <main id="main" className="mx-auto max-w-2xl p-6 leading-relaxed">
      <h1 className="text-2xl font-bold">Safety notice</h1>
      <p className="mt-3">
        Testing and re-energising switchgear that has been under water is hazardous work. Water, silt and salt leave
        conducting paths across insulation; a board that looks dry can fail under test voltage or on energisation, with
        electric shock and arc flash as the result. Flooded spaces add their own dangers: slippery decks, contaminated
        water, poor air and darkness.
      </p>
      <ul className="mt-3 list-disc space-y-1 pl-6">
        <li>
          Tideline records what the crew finds and computes values against the criteria you enter. It never declares
          equipment safe, fit for service or ready to energise.
        </li>
        <li>
          A qualified, licensed person decides every test and every energisation, and signs for it under your own
          procedures.
        </li>
        <li>
          Follow NFPA 70E (or your jurisdiction's equivalent): establish an electrically safe work condition, observe
          the shock and arc-flash approach boundaries, wear the PPE the risk assessment calls for.
        </li>
        <li>
          Apply lockout/tagout, verify absence of voltage with a tested instrument, and follow local electrical codes
          and the equipment manufacturer's instructions.
        </li>
        <li>Insulation-resistance testers produce hazardous voltages: discharge the circuit after every test.</li>
      </ul>
      <p className="mt-4">
        <Link to="/">Back to Tideline</Link>
      </p>
    </main>
  );
}

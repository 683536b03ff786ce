import type { GroundCheck } from "../../../schemas/readings";
import { sig } from "../format";

/** Filled, half-filled or hollow circle plus the word: the lamp's look without colour alone. */
function Lamp({
  phase,
  look,
  volts,
  suspect,
}: {
  phase: string;
  look?: "bright" | "dim" | "dark";
  volts?: number;
  suspect: boolean;
}) {
  const fill = look === "bright" ? "fill-brass-300" : look === "dim" ? "fill-brass-700" : "fill-none";
  return (
    <li
      className={`flex flex-col items-center rounded-md px-3 py-2 ${suspect ? "ring-2 ring-rust-400" : "ring-1 ring-hull-600"}`}
    >
      <svg aria-hidden="true" viewBox="0 0 24 24" className="h-8 w-8">
        <circle cx="12" cy="12" r="9" className={`${fill} stroke-chalk`} strokeWidth="2" />
        {look === "dim" && <path d="M12 3a9 9 0 0 1 0 18z" className="fill-brass-300" />}
      </svg>
      <span className="font-mono font-bold">{phase}</span>
      <span className="text-sm">{look ? look : volts != null ? `${sig(volts)} V` : "—"}</span>
      {suspect && <span className="text-xs font-bold text-rust-300">suspect</span>}
    </li>
  );
}

export function LampRow({ check }: { check: GroundCheck }) {
  return (
    <ul className="flex gap-2" aria-label="Ground-detection lamps">
      {(["A", "B", "C"] as const).map((p) => (
        <Lamp
          key={p}
          phase={p}
          look={check.lamps?.[p]}
          volts={check.volts?.[p]}
          suspect={check.judgement.phase === p}
        />
      ))}
    </ul>
  );
}

import { useMemo, useState } from "react";
import { CONDUCTOR_LABELS, type Conductors, type InsulationReading } from "../../../schemas/readings";
import { DryOutChart } from "./dry-out-chart";

const keyOf = (r: InsulationReading) => (r.componentId ? `c:${r.componentId}` : `circuit:${r.circuit}`);
const labelOf = (r: InsulationReading) => (r.designation ? `${r.designation} · ${r.circuit}` : r.circuit);

/** Pick a component or circuit and the conductors; one series per chart (readings must compare). */
export function DryOutSection({ readings }: { readings: InsulationReading[] }) {
  const series = useMemo(() => {
    const m = new Map<string, { label: string; readings: InsulationReading[] }>();
    for (const r of readings) {
      const k = keyOf(r);
      if (!m.has(k)) m.set(k, { label: labelOf(r), readings: [] });
      m.get(k)!.readings.push(r);
    }
    return m;
  }, [readings]);
  const [key, setKey] = useState<string | null>(null);
  const [conductors, setConductors] = useState<Conductors | null>(null);
  if (readings.length === 0) return <p className="text-mist">No insulation readings to chart yet.</p>;
  const chosenKey = key && series.has(key) ? key : keyOf(readings[0]);
  const chosen = series.get(chosenKey)!;
  const available = [...new Set(chosen.readings.map((r) => r.conductors))];
  const c = conductors && available.includes(conductors) ? conductors : chosen.readings[0].conductors;
  const shown = chosen.readings.filter((r) => r.conductors === c);
  return (
    <div className="space-y-2">
      <div className="grid gap-2 sm:grid-cols-2">
        <label className="block text-sm font-semibold text-mist">
          Component or circuit
          <select
            value={chosenKey}
            onChange={(e) => setKey(e.target.value)}
            className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
          >
            {[...series].map(([k, s]) => (
              <option key={k} value={k}>
                {s.label} ({s.readings.length})
              </option>
            ))}
          </select>
        </label>
        <label className="block text-sm font-semibold text-mist">
          Conductors
          <select
            value={c}
            onChange={(e) => setConductors(e.target.value as Conductors)}
            className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
          >
            {available.map((a) => (
              <option key={a} value={a}>
                {CONDUCTOR_LABELS[a]}
              </option>
            ))}
          </select>
        </label>
      </div>
      <DryOutChart readings={shown} title={`${chosen.label}, ${CONDUCTOR_LABELS[c]}`} />
    </div>
  );
}

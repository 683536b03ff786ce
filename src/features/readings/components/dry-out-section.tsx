import { useMemo, useState, type ReactNode } from "react";
import { useOnline } from "../../../lib/online";
import {
  CONDUCTOR_LABELS,
  type Conductors,
  type DryOutSeries,
  type InsulationReading,
  phaseComparisonKey,
} from "../../../schemas/readings";
import { useDryOutSeries } from "../api";
import { DryOutChart } from "./dry-out-chart";

/** A series is a component's readings, else those of a circuit named by hand (the phase comparison's key too). */
const seriesKey = phaseComparisonKey;
const labelOf = (s: { designation: string | null; circuit: string }) =>
  [s.designation, s.circuit].filter(Boolean).join(" · ");
const n = (x: number) => x.toLocaleString("en");

interface Choice {
  key: string;
  label: string;
  count: number;
}

const SELECT = "mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk";

/** Pick a series and the conductors; one series and one pair per chart (readings must compare). */
function DryOutView({
  choices,
  chosenKey,
  onChoose,
  readings,
  note,
  empty = "Reading this series…",
}: {
  choices: Choice[];
  chosenKey: string;
  onChoose: (key: string) => void;
  readings: InsulationReading[];
  note?: ReactNode;
  /** What stands in the chart's place while the series has no readings here yet. */
  empty?: string;
}) {
  const [conductors, setConductors] = useState<Conductors | null>(null);
  const chosen = choices.find((c) => c.key === chosenKey)!;
  const available = [...new Set(readings.map((r) => r.conductors))];
  const c = conductors && available.includes(conductors) ? conductors : available[0];
  return (
    <div className="space-y-2">
      <div className="grid gap-2 sm:grid-cols-2">
        <label className="block text-sm font-semibold text-mist">
          Component or circuit
          <select value={chosenKey} onChange={(e) => onChoose(e.target.value)} className={SELECT}>
            {choices.map((s) => (
              <option key={s.key} value={s.key}>
                {s.label} ({n(s.count)})
              </option>
            ))}
          </select>
        </label>
        {c && (
          <label className="block text-sm font-semibold text-mist">
            Conductors
            <select value={c} onChange={(e) => setConductors(e.target.value as Conductors)} className={SELECT}>
              {available.map((a) => (
                <option key={a} value={a}>
                  {CONDUCTOR_LABELS[a]}
                </option>
              ))}
            </select>
          </label>
        )}
      </div>
      {note}
      {c ? (
        <DryOutChart
          readings={readings.filter((r) => r.conductors === c)}
          title={`${chosen.label}, ${CONDUCTOR_LABELS[c]}`}
        />
      ) : (
        <p className="text-mist">{empty}</p>
      )}
    </div>
  );
}

/** A component's page: every one of its readings is there, grouped here by series. */
export function DryOutSection({ readings }: { readings: InsulationReading[] }) {
  const series = useMemo(() => {
    const m = new Map<string, Choice & { readings: InsulationReading[] }>();
    for (const r of readings) {
      const k = seriesKey(r);
      if (!m.has(k))
        m.set(k, {
          key: k,
          label: labelOf({ designation: r.designation ?? null, circuit: r.circuit }),
          count: 0,
          readings: [],
        });
      const s = m.get(k)!;
      s.readings.push(r);
      s.count++;
    }
    return m;
  }, [readings]);
  const [key, setKey] = useState<string | null>(null);
  if (readings.length === 0) return <p className="text-mist">No insulation readings to chart yet.</p>;
  const chosenKey = key && series.has(key) ? key : seriesKey(readings[0]);
  return (
    <DryOutView
      choices={[...series.values()]}
      chosenKey={chosenKey}
      onChoose={setKey}
      readings={series.get(chosenKey)!.readings}
    />
  );
}

/**
 * A board's page: the series come from the server over every reading of the board, and the chosen one is
 * read whole (`GET …/dry-out`), since the page lists only the board's newest readings and a dry-out of weeks
 * has thousands. Until it arrives (or with no signal, when it was never kept on this phone) the chart draws
 * the series' readings that came with the page, and says so.
 */
export function BoardDryOut({
  siteId,
  boardId,
  series,
  listed,
}: {
  siteId: string;
  boardId: string;
  series: DryOutSeries[];
  listed: InsulationReading[];
}) {
  const [key, setKey] = useState<string | null>(null);
  const online = useOnline();
  const chosen = series.find((s) => seriesKey(s) === key) ?? series[0];
  const whole = useDryOutSeries(
    siteId,
    boardId,
    chosen ? (chosen.componentId ? { componentId: chosen.componentId } : { circuit: chosen.circuit }) : null,
  );
  if (!chosen) return <p className="text-mist">No insulation readings to chart yet.</p>;
  const k = seriesKey(chosen);
  const kept = listed.filter((r) => seriesKey(r) === k);
  const readings = whole.data?.readings ?? kept;
  let note: ReactNode = null;
  if (whole.data && !whole.data.complete)
    note = (
      <p className="text-sm text-mist">
        The newest {n(whole.data.readings.length)} of {n(chosen.count)} readings are drawn.
      </p>
    );
  else if (!whole.data && kept.length > 0 && kept.length < chosen.count)
    note = (
      <p className="text-sm text-mist" role="status">
        {whole.isPending && online
          ? `Reading all ${n(chosen.count)} readings of this series…`
          : `Drawn from the ${n(kept.length)} of ${n(chosen.count)} readings kept with this page; the rest are drawn once Tideline's server answers.`}
      </p>
    );
  return (
    <DryOutView
      choices={series.map((s) => ({ key: seriesKey(s), label: labelOf(s), count: s.count }))}
      chosenKey={k}
      onChoose={setKey}
      readings={readings}
      note={note}
      empty={
        whole.isPending && online
          ? "Reading this series…"
          : "None of this series' readings are kept on this phone yet; they are drawn once Tideline's server answers."
      }
    />
  );
}

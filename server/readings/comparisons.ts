/**
 * Phase comparison per component or circuit, from its judged insulation readings: the
 * latest A-G, B-G and C-G readings side by side (comparePhases), and each conductor pair's
 * latest reading against the one before it (compareWithPrevious). Only readings valid for
 * judging and corrected to the site's base temperature take part.
 */
import {
  PHASE_COMPARISON_SOURCE,
  comparePhases,
  compareWithPrevious,
  type PhaseKey,
} from "../../src/domain/insulation-comparison";
import { phaseComparisonKey, type InsulationReading, type PhaseComparison } from "../../src/schemas/readings";

const keyOf = (r: InsulationReading) => phaseComparisonKey(r);
const labelOf = (r: InsulationReading) =>
  r.designation ? `${r.designation}${r.circuit ? ` · ${r.circuit}` : ""}` : r.circuit;

export function phaseComparisons(readings: InsulationReading[]): PhaseComparison[] {
  const usable = readings
    .filter((r) => r.judgement.validForJudging && r.judgement.correctedMegohms != null)
    .sort((a, b) => Date.parse(b.measuredAt) - Date.parse(a.measuredAt));
  const groups = new Map<string, InsulationReading[]>();
  for (const r of usable) {
    const k = keyOf(r);
    if (!groups.has(k)) groups.set(k, []);
    groups.get(k)!.push(r);
  }
  const out: PhaseComparison[] = [];
  for (const [key, rs] of groups) {
    const latest = (c: string) => rs.find((r) => r.conductors === c);
    const values: Record<PhaseKey, number | null> = { A: null, B: null, C: null };
    for (const p of ["A", "B", "C"] as const) values[p] = latest(`${p}-G`)?.judgement.correctedMegohms ?? null;
    const measured = Object.fromEntries(Object.entries(values).filter(([, v]) => v != null)) as Partial<
      Record<PhaseKey, number>
    >;
    const phases = comparePhases(measured);
    const trend: PhaseComparison["trend"] = [];
    const reasons = [...phases.reasons];
    for (const c of [...new Set(rs.map((r) => r.conductors))]) {
      const [cur, prev] = rs.filter((r) => r.conductors === c);
      if (!cur || !prev) continue;
      const t = compareWithPrevious(cur.judgement.correctedMegohms!, prev.judgement.correctedMegohms!);
      trend.push({
        conductors: c,
        previous: prev.judgement.correctedMegohms!,
        current: cur.judgement.correctedMegohms!,
        dropFraction: t.dropFraction,
        flagged: t.flagged,
      });
      if (t.reason) reasons.push(`${c}: ${t.reason}`);
    }
    if (Object.keys(measured).length < 2 && trend.length === 0) continue;
    out.push({
      key,
      label: labelOf(rs[0]),
      measuredAt: rs[0].measuredAt,
      values,
      flagged: phases.flagged,
      trend,
      reasons,
      source: { ...PHASE_COMPARISON_SOURCE },
    });
  }
  return out;
}

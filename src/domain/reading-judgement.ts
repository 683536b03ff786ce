/**
 * Judging recorded readings against a site's criteria: which correction, which minimum,
 * where it comes from, and a verdict that only ever says whether the numbers meet the
 * recorded criterion. Builds on insulation.ts, thermal.ts, contacts.ts and
 * ground-detection.ts; adds nothing to their arithmetic except a configurable contact
 * threshold. Verdicts never say "safe": a qualified person decides (NFPA 70E).
 */
import { contactResistanceOutliers, CONTACT_DEVIATION_LIMIT } from "./contacts";
import {
  BALANCE_TOLERANCE,
  CAPACITANCE_UNCERTAINTY,
  faultEstimateRange,
  locateGround,
  suspectPhaseFromLamps,
  type LampState,
  type Phase,
} from "./ground-detection";
import { requireNumber, requirePositive } from "./guards";
import {
  DEW_POINT_MARGIN_K,
  IEEE43_PI_NOT_REQUIRED_ABOVE_MEGOHMS,
  IEEE43_RANGE_C,
  ieee43CorrectionTo40C,
  insulationReadingValidity,
  judgeInsulation,
  minimumPolarizationIndex,
  netaCorrectionFactor,
  netaMinimumInsulation,
  qualifiedRatio,
  testVoltageAdvice,
  type InsulationMedium,
  type InsulationVerdict,
  type ReadingQualifier,
  type ThermalClass,
} from "./insulation";
import {
  classifyTemperatureRise,
  LOAD_SCALING_EXPONENT,
  LOW_LOAD_PERCENT,
  scaleRiseToRatedLoad,
  THERMAL_ACTIONS,
  type ThermalLevel,
} from "./thermal";

/** "not_valid": taken at or near the dew point or below freezing — kept, shown, never judged on. */
export type Verdict = InsulationVerdict | "not_valid";
export const VERDICTS = ["meets", "below_minimum", "investigate", "not_valid"] as const;
export const VERDICT_LABELS: Record<Verdict, string> = {
  meets: "Meets the recorded criterion",
  below_minimum: "Below the recorded minimum",
  investigate: "Investigate",
  not_valid: "Not valid for judging",
};

export const CORRECTION_METHODS = ["ieee43_40c", "neta_20c"] as const;
export type CorrectionMethod = (typeof CORRECTION_METHODS)[number];
export const CORRECTION_METHOD_LABELS: Record<CorrectionMethod, string> = {
  ieee43_40c: "IEEE 43 halving rule, corrected to 40 °C",
  neta_20c: "NETA multipliers, corrected to 20 °C",
};

export interface ReadingCriteria {
  correctionMethod: CorrectionMethod;
  insulationMedium: InsulationMedium;
  thermalClass: ThermalClass;
  /** Site-wide minimum insulation resistance, MΩ; null → the NETA table by rated voltage. */
  minimumMegohms: number | null;
  minimumSource: string;
  /** A pole is flagged above the lowest by more than this percentage of the lowest. */
  contactOutlierPercent: number;
  /** Insulation readings with the equipment within this many kelvin of the dew point are not judged. */
  dewPointMarginK: number;
}

/** Defaults: NETA to 20 °C (its minimums are at 20 °C), solid insulation, class B, NETA 50 %. */
export const DEFAULT_CRITERIA: ReadingCriteria = {
  correctionMethod: "neta_20c",
  insulationMedium: "solid",
  thermalClass: "B",
  minimumMegohms: null,
  minimumSource: "",
  contactOutlierPercent: CONTACT_DEVIATION_LIMIT * 100,
  dewPointMarginK: DEW_POINT_MARGIN_K,
};

/** Where a criterion comes from: a short text and the table's name/number. */
export interface CriterionSource {
  table: string;
  text: string;
}

export interface ManufacturerValue {
  minimumMegohms?: number | null;
  maximumMicroOhms?: number | null;
  source: string;
}

const fmt = (n: number) => Number(n.toPrecision(3)).toString();

/**
 * A reading corrected to the base temperature of the site's method.
 * IEEE 43: R40 = R·0.5^((40 − T)/10); NETA: R20 = R·F(T) (Table 100.14, interpolated).
 * @throws RangeError when the temperature is outside the method's range
 */
export function correctInsulation(
  megohms: number,
  temperatureC: number,
  c: Pick<ReadingCriteria, "correctionMethod" | "insulationMedium">,
) {
  if (c.correctionMethod === "ieee43_40c") {
    return {
      correctedMegohms: ieee43CorrectionTo40C(megohms, temperatureC),
      baseTemperatureC: 40,
      source: {
        table: "IEEE Std 43, temperature correction to 40 °C",
        text: `R40 = R × 0.5^((40 − ${fmt(temperatureC)})/10)`,
      },
    };
  }
  requireNumber("megohms", megohms, { min: 0 });
  const factor = netaCorrectionFactor(temperatureC, c.insulationMedium);
  return {
    correctedMegohms: megohms * factor,
    baseTemperatureC: 20,
    source: {
      table: "NETA ATS/MTS Table 100.14, correction to 20 °C",
      // The solid column, and the oil rows outside 0–75 °C, are recalled, not checked against a copy of the table
      // (src/domain/insulation-tables.ts): the screen says so beside the figure.
      text:
        `Multiplier ${Number(factor.toFixed(3))} at ${fmt(temperatureC)} °C, ${c.insulationMedium} insulation (interpolated between 5 °C rows)` +
        (c.insulationMedium === "solid" || temperatureC < 0 || temperatureC > 75
          ? ". Tideline's copy of this row is from memory: check it against your edition of the table"
          : ""),
    },
  };
}

/**
 * The minimum that applies: a manufacturer's value for the component, else the site's
 * own minimum, else NETA Table 100.1 by rated voltage (ANSI/NETA MTS-2019 values).
 */
export function insulationMinimum(ratedVolts: number, c: ReadingCriteria, maker?: ManufacturerValue | null) {
  const table = netaMinimumInsulation(ratedVolts);
  if (maker?.minimumMegohms != null) {
    return {
      minMegohms: maker.minimumMegohms,
      recommendedTestVoltsDc: table.testVoltsDc,
      from: "manufacturer" as const,
      source: { table: "Manufacturer's value", text: maker.source },
    };
  }
  if (c.minimumMegohms != null) {
    return {
      minMegohms: c.minimumMegohms,
      recommendedTestVoltsDc: table.testVoltsDc,
      from: "site" as const,
      source: { table: "Site criterion set by the curator", text: c.minimumSource || "No source text given" },
    };
  }
  return {
    minMegohms: table.minMegohms,
    recommendedTestVoltsDc: table.testVoltsDc,
    from: "table" as const,
    source: {
      table: "ANSI/NETA MTS-2019 Table 100.1",
      text: `Equipment rated ${fmt(ratedVolts)} V: test at ${table.testVoltsDc} V DC, minimum ${table.minMegohms} MΩ (values at 20 °C)`,
    },
  };
}

export interface InsulationReadingInput {
  megohms: number;
  equipmentTempC: number;
  testVoltsDc: number;
  ratedVolts: number;
  r30s?: number | null;
  r1min?: number | null;
  r10min?: number | null;
  megohmsQualifier?: ReadingQualifier | null;
  r30sQualifier?: ReadingQualifier | null;
  r1minQualifier?: ReadingQualifier | null;
  r10minQualifier?: ReadingQualifier | null;
  ambientTempC?: number | null;
  humidityPercent?: number | null;
}

/**
 * Corrected value, minimum, PI/DAR and verdict for one insulation reading.
 * Order of the verdict: judgeInsulation (below minimum → PI/DAR low → meets).
 * @throws RangeError for a temperature outside the method's range or impossible values
 */
export function judgeInsulationReading(
  r: InsulationReadingInput,
  c: ReadingCriteria,
  maker?: ManufacturerValue | null,
) {
  const corrected = correctInsulation(r.megohms, r.equipmentTempC, c);
  const minimum = insulationMinimum(r.ratedVolts, c, maker);
  const q = (v: number, qualifier?: ReadingQualifier | null) => ({ megohms: v, qualifier: qualifier ?? null });
  const piBound =
    r.r1min != null && r.r10min != null
      ? qualifiedRatio(q(r.r1min, r.r1minQualifier), q(r.r10min, r.r10minQualifier))
      : null;
  const darBound =
    r.r30s != null && r.r1min != null ? qualifiedRatio(q(r.r30s, r.r30sQualifier), q(r.r1min, r.r1minQualifier)) : null;
  const minimumPi = minimumPolarizationIndex(c.thermalClass);
  // IEEE 43: above 5 000 MΩ at 40 °C (1-minute reading) the PI is not needed to judge.
  const r1At40 =
    r.r1min != null && r.equipmentTempC >= IEEE43_RANGE_C.min && r.equipmentTempC <= IEEE43_RANGE_C.max
      ? ieee43CorrectionTo40C(r.r1min, r.equipmentTempC)
      : null;
  const piNotRequired =
    r1At40 !== null && r1At40 > IEEE43_PI_NOT_REQUIRED_ABOVE_MEGOHMS && r.r1minQualifier !== "below";
  const j = judgeInsulation({
    correctedMegohms: corrected.correctedMegohms,
    qualifier: r.megohmsQualifier ?? null,
    minimumMegohms: minimum.minMegohms,
    pi: piBound,
    minimumPi,
    dar: darBound,
    piNotRequired,
  });
  const validity = insulationReadingValidity({
    equipmentTempC: r.equipmentTempC,
    ambientTempC: r.ambientTempC,
    humidityPercent: r.humidityPercent,
    marginK: c.dewPointMarginK ?? DEW_POINT_MARGIN_K,
  });
  const voltage = testVoltageAdvice(r.ratedVolts, r.testVoltsDc);
  const notes: string[] = [...j.notes];
  if (voltage.note) notes.push(voltage.note);
  if (c.correctionMethod === "ieee43_40c" && minimum.from === "table") {
    notes.push(
      "NETA's minimums are for 20 °C; a value corrected to 40 °C is lower, so this comparison errs on the strict side.",
    );
  }
  if (r.ambientTempC == null || r.humidityPercent == null)
    notes.push("No ambient temperature and humidity: the dew point could not be checked.");
  const verdict: Verdict = validity.valid ? j.verdict : "not_valid";
  const reasons = validity.valid
    ? j.reasons
    : [...validity.reasons, `Not judged; the numbers alone: ${j.reasons.join(" ")}`];
  return {
    correctedMegohms: corrected.correctedMegohms,
    qualifier: r.megohmsQualifier ?? null,
    baseTemperatureC: corrected.baseTemperatureC,
    correction: corrected.source,
    minimum: { megohms: minimum.minMegohms, from: minimum.from, source: minimum.source },
    pi: piBound?.value ?? null,
    piBound: piBound?.bound ?? null,
    dar: darBound?.value ?? null,
    darBound: darBound?.bound ?? null,
    piNotRequired,
    minimumPi,
    piSource: {
      table: "IEEE Std 43, recommended minimum polarization index",
      text: `Thermal class ${c.thermalClass}: PI at least ${minimumPi}`,
    },
    validForJudging: validity.valid,
    dewPointC: validity.dewPointC,
    validitySource: {
      table: "Dew point: Magnus formula, Alduchov–Eskridge coefficients (1996)",
      text: `Readings with the equipment at or within ${c.dewPointMarginK ?? DEW_POINT_MARGIN_K} K of the dew point, or below 0 °C, are not judged (common practice)`,
    },
    suggestedTestVoltsDc: voltage.suggestedVoltsDc,
    testVoltageOver: voltage.over,
    verdict,
    reasons,
    notes,
  };
}

/**
 * Contact-resistance outliers at a configurable threshold.
 * Formula: flag i when R_i − R_min > p·R_min. At p = 50 % this is NETA's rule and calls
 * contactResistanceOutliers itself.
 * @param percent threshold, % of the lowest, > 0
 */
export function contactOutliersAt(microOhms: readonly number[], percent: number): number[] {
  const p = requirePositive("percent", percent);
  if (p === CONTACT_DEVIATION_LIMIT * 100) return contactResistanceOutliers(microOhms);
  contactResistanceOutliers(microOhms); // same input checks
  if (microOhms.length < 2) return [];
  const lowest = Math.min(...microOhms);
  return microOhms.flatMap((v, i) => (v - lowest > (p / 100) * lowest * (1 + 1e-9) ? [i] : []));
}

/** Verdict for one set of pole readings: outliers or poles above a manufacturer's maximum → investigate. */
export function judgeContactReading(
  poleMicroOhms: readonly number[],
  c: Pick<ReadingCriteria, "contactOutlierPercent">,
  maker?: ManufacturerValue | null,
) {
  const outliers = contactOutliersAt(poleMicroOhms, c.contactOutlierPercent);
  const lowest = Math.min(...poleMicroOhms);
  const limitMicroOhms = lowest * (1 + c.contactOutlierPercent / 100);
  const max = maker?.maximumMicroOhms ?? null;
  const overMax = max == null ? [] : poleMicroOhms.flatMap((v, i) => (v > max ? [i] : []));
  const reasons: string[] = [];
  const pole = (i: number) => `Pole ${i + 1}`;
  for (const i of outliers)
    reasons.push(
      `${pole(i)} (${fmt(poleMicroOhms[i])} µΩ) is more than ${fmt(c.contactOutlierPercent)} % above the lowest pole (${fmt(lowest)} µΩ).`,
    );
  for (const i of overMax)
    reasons.push(`${pole(i)} (${fmt(poleMicroOhms[i])} µΩ) is above the manufacturer's ${fmt(max!)} µΩ.`);
  if (reasons.length === 0)
    reasons.push(`Every pole is within ${fmt(c.contactOutlierPercent)} % of the lowest (${fmt(lowest)} µΩ).`);
  const sources: CriterionSource[] = [
    {
      table: "NETA ATS/MTS circuit-breaker tests, contact resistance",
      text: `Investigate a pole deviating by more than ${fmt(c.contactOutlierPercent)} % of the lowest value`,
    },
  ];
  if (max != null) sources.push({ table: "Manufacturer's value", text: maker!.source });
  return {
    outliers,
    overMaximum: overMax,
    limitMicroOhms,
    verdict: (outliers.length || overMax.length ? "investigate" : "meets") as Verdict,
    reasons,
    sources,
  };
}

/**
 * Rises over a similar component and over ambient, classified by NETA Table 100.18; with
 * the load known (below 100 %), each rise is also scaled to rated load (thermal.ts,
 * ΔT ∝ (I/I_rated)², common practice) and the more severe of the measured and scaled
 * levels is the level — from 40 % load up. Below it (common practice: a scan shows little
 * there, and scaling multiplies every error: ×400 at 5 %) the level is the measured one,
 * and the scaled level is given in the warning, for reference, with "re-scan under more load".
 */
export function judgeThermalScan(s: {
  componentTempC: number;
  similarTempC?: number | null;
  ambientTempC?: number | null;
  loadPercent?: number | null;
}) {
  const t = requireNumber("componentTempC", s.componentTempC);
  const overSimilarC = s.similarTempC == null ? undefined : t - requireNumber("similarTempC", s.similarTempC);
  const overAmbientC = s.ambientTempC == null ? undefined : t - requireNumber("ambientTempC", s.ambientTempC);
  const measured = classifyTemperatureRise({ overSimilarC, overAmbientC });
  const load = s.loadPercent != null && s.loadPercent > 0 ? s.loadPercent : null;
  const scale = (rise: number | undefined) =>
    rise === undefined || load === null ? undefined : scaleRiseToRatedLoad(rise, Math.min(load, 200)).scaledRiseC;
  const scaledSimilarC = load !== null && load < 100 ? scale(overSimilarC) : undefined;
  const scaledAmbientC = load !== null && load < 100 ? scale(overAmbientC) : undefined;
  const scaled =
    scaledSimilarC !== undefined || scaledAmbientC !== undefined
      ? classifyTemperatureRise({ overSimilarC: scaledSimilarC, overAmbientC: scaledAmbientC })
      : null;
  const lowLoad = load !== null && load < LOW_LOAD_PERCENT;
  const level = (lowLoad ? measured.level : Math.max(measured.level, scaled?.level ?? 0)) as ThermalLevel;
  const action = THERMAL_ACTIONS[level];
  const warnings: string[] = [];
  if (load === null) warnings.push("Load not recorded: the rise cannot be scaled to rated load.");
  else if (lowLoad)
    warnings.push(
      `Scanned at ${fmt(load)} % load: below about ${LOW_LOAD_PERCENT} % a scan shows little, and scaling to full load magnifies every error (common practice), so the level is the one measured` +
        (scaled && scaled.level > measured.level
          ? `; scaled to full load the same rise would read level ${scaled.level}. Re-scan under more load before relying on either.`
          : ". Re-scan under more load."),
    );
  return {
    overSimilarC: overSimilarC ?? null,
    overAmbientC: overAmbientC ?? null,
    scaledOverSimilarC: scaledSimilarC ?? null,
    scaledOverAmbientC: scaledAmbientC ?? null,
    measuredLevel: measured.level as ThermalLevel,
    scaledLevel: (scaled?.level ?? null) as ThermalLevel | null,
    level,
    action,
    warnings,
    verdict: (level === 0 ? "meets" : "investigate") as Verdict,
    source: {
      table: "NETA ATS/MTS Table 100.18, thermographic survey suggested actions",
      text:
        `Level ${level}: ${action}` +
        (scaled
          ? `. Rises scaled to rated load by (100 / ${fmt(load!)} %)^${LOAD_SCALING_EXPONENT} (ΔT ∝ I², common practice)` +
            (lowLoad ? `, for reference only under ${LOW_LOAD_PERCENT} % load` : "")
          : ""),
    },
  };
}

const PHASE_LIST: Phase[] = ["A", "B", "C"];

function joinWords(parts: string[]) {
  return parts.length <= 1 ? parts.join("") : `${parts.slice(0, -1).join(", ")} and ${parts.at(-1)}`;
}

/** "A and C bright" or "A dim and C bright": how the other two lamps look. */
function othersInWords(phase: Phase, describe: (p: Phase) => string) {
  const others = PHASE_LIST.filter((p) => p !== phase);
  const [x, y] = others.map(describe);
  return x === y ? `${others.join(" and ")} ${x}` : joinWords(others.map((p) => `${p} ${describe(p)}`));
}

export interface GroundCheckInput {
  lineVolts: number;
  lamps?: Record<Phase, LampState> | null;
  volts?: Record<Phase, number> | null;
  branchOhms?: number | null;
  /** System capacitance to ground per phase, µF, when the crew knows it. */
  capacitanceMicroF?: number | null;
  frequencyHz?: number | null;
  siteKind?: "vessel" | "building" | "plant";
}

/**
 * The suspected grounded phase in words. Measured volts win over looks: locateGround
 * (Millman model, 5 % balance band); otherwise suspectPhaseFromLamps.
 * "meets" only when the lamps are balanced (no ground shown).
 */
export function judgeGroundCheck(g: GroundCheckInput) {
  const hull = g.siteKind === "vessel" ? " — on a vessel, a fault to the hull" : "";
  if (g.volts) {
    const found = locateGround({ lineVolts: g.lineVolts, ...g.volts, branchOhms: g.branchOhms ?? undefined });
    const vPh = g.lineVolts / Math.sqrt(3);
    const values = PHASE_LIST.map((p) => g.volts![p]);
    const balanced = Math.max(...values) - Math.min(...values) <= BALANCE_TOLERANCE * vPh;
    const v = (p: Phase) => `${fmt(g.volts![p])} V`;
    const range =
      found.phase && g.branchOhms != null
        ? faultEstimateRange({
            lineVolts: g.lineVolts,
            faultedVolts: g.volts[found.phase],
            branchOhms: g.branchOhms,
            capacitanceMicroF: g.capacitanceMicroF,
            frequencyHz: g.frequencyHz ?? 60,
          })
        : null;
    const ohms = (x: number | null) => (x == null ? "?" : `${fmt(x)} Ω`);
    const rangeWords = !range
      ? ""
      : range.capacitanceNeglected
        ? ` Estimated fault resistance at most about ${ohms(range.highOhms)} (lamp model without the system's capacitance, which only lowers it: enter the capacitance per phase for a range).`
        : ` Estimated fault resistance ${ohms(range.lowOhms)} to ${ohms(range.highOhms)}, about ${ohms(range.centralOhms)} (lamp model with ${fmt(g.capacitanceMicroF!)} µF per phase ± ${CAPACITANCE_UNCERTAINTY * 100} %).`;
    const words = found.phase
      ? `Phase ${found.phase} lamp at ${v(found.phase)} to ground, ${othersInWords(found.phase, v)}: suspect a ground on phase ${found.phase}${hull}.` +
        rangeWords
      : found.reason;
    return {
      phase: found.phase,
      faultOhms: range ? (range.centralOhms ?? range.highOhms) : found.faultOhms,
      faultRange: range,
      words,
      verdict: (balanced ? "meets" : "investigate") as Verdict,
      source: GROUND_SOURCE,
    };
  }
  if (!g.lamps) throw new RangeError("give the lamps' look or their volts to ground");
  const found = suspectPhaseFromLamps(g.lamps);
  const states = PHASE_LIST.map((p) => g.lamps![p]);
  const balanced = states.every((s) => s === states[0]) && states[0] !== "dark";
  const words = found.phase
    ? `Phase ${found.phase} lamp ${g.lamps[found.phase]}, ${othersInWords(found.phase, (p) => g.lamps![p])}: suspect a ground on phase ${found.phase}${hull}.`
    : found.reason;
  return {
    phase: found.phase,
    faultOhms: null,
    faultRange: null,
    words,
    verdict: (balanced ? "meets" : "investigate") as Verdict,
    source: GROUND_SOURCE,
  };
}

const GROUND_SOURCE: CriterionSource = {
  table: "Ground-detection lamps on an ungrounded system (Millman's theorem; common practice)",
  text: "Three equal lamps glow alike; one darker than the other two points at a ground on that phase",
};

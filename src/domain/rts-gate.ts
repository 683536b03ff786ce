/**
 * The return-to-service gate: from the recorded evidence, which hold points of a stage are
 * met and which are not, each blocker with a link to what blocks it. Pure (no clock: `now`
 * comes in). It never says "safe": it says which recorded hold points are met. NFPA 70E,
 * local codes and qualified persons decide every energisation.
 *
 * Sources per rule (see tests/domain/rts-gate.test.ts):
 * - isolate / clearance steps: NFPA 70E Article 120 (electrically safe work condition) and
 *   130.5 (arc-flash boundary) — signature steps; article numbers cited from memory.
 * - insulation: the reading's verdict comes from src/domain/reading-judgement.ts (ANSI/NETA
 *   MTS Table 100.1 or the recorded criterion); "recent" (D days, default 7) and "has not
 *   fallen" (more than FALL_TOLERANCE below the previous corrected value) are common
 *   practice — a falling insulation resistance during dry-out means moisture or
 *   contamination is coming back; the 10 % allowance for instrument repeatability is Tideline's.
 * - protection at or below the curator's limit, a named qualified person, no ground shown
 *   by the lamps, watch checks at the set interval: common practice.
 * - thermal level 3–4: NETA ATS/MTS Table 100.18 via src/domain/thermal.ts.
 */
import { localDate, localMinute } from "./local-time";
import { AFTER_ENERGISE_KINDS, isQualifiedOn, type StageStatus, type StepKind, type Supply } from "./return-to-service";
import type { Verdict } from "./reading-judgement";
import { watchSchedule } from "./rts-watch";
import { CONDUCTOR_LABELS, type Conductors } from "./vocab";

/** Tideline's allowance for repeatability: a fall of more than 10 % of the previous corrected value counts. */
export const FALL_TOLERANCE = 0.1;
const DAY_MS = 86_400_000;

export interface GateReading {
  id: string;
  measuredAt: string;
  /** Which conductors were tested ("A-G", "A-B", …): only readings of the same pair compare. */
  conductors: Conductors;
  verdict: Verdict;
  /** Corrected to the site's base temperature; null when it could not be corrected. */
  correctedMegohms: number | null;
}
export interface GateCircuit {
  positionId: string;
  designation: string;
  circuit: string;
  componentId: string | null;
  /** Positions whose kind takes an insulation test (breakers, bus, switches, fuses, transformers…). */
  needsInsulation: boolean;
  /** Newest first. */
  readings: GateReading[];
}
export interface GateDefect {
  id: string;
  ref: number;
  title: string;
  designation: string | null;
  safetyCritical: boolean;
  blocksEnergisation: boolean;
}
export interface GateLampObservation {
  id: string;
  at: string;
  suggestsGround: boolean;
  words: string;
  source: "ground_check" | "watch_check";
}
export interface GateSignoff {
  id: string;
  kind: "signed" | "released" | "struck";
  signerName: string;
  signedAt: string;
  reason: string;
  /**
   * A release's blockers as they stood when the curator let them pass (`blockerKey`): a blocker that appears after it
   * is not covered. Null on a release recorded before this was kept (it covers whatever blocks).
   */
  covers?: string[] | null;
}
export interface GateStep {
  id: string;
  kind: StepKind;
  title: string;
  qualifiedOnly: boolean;
  /** The entry in force (the latest of its supersede chain), or null. */
  current: GateSignoff | null;
}
export interface GateStage {
  id: string;
  name: string;
  status: StageStatus;
  supply: Supply;
  protectionDevice: string;
  protectionRatingA: number | null;
  protectionLimitA: number | null;
  energisedAt: string | null;
  watchHours: number;
  checkEveryHours: number;
  qualifiedPerson: {
    userId: string;
    name: string;
    expiresOn: string | null;
    qualification: string;
    /** The instance's admin has suspended the account: it cannot sign in, so it cannot sign. */
    suspended?: boolean;
  } | null;
  dependsOn: { id: string; name: string; status: StageStatus } | null;
}
export interface GateLinks {
  circuitReadings(c: GateCircuit): string;
  defect(id: string): string;
  crew(): string;
  stage(stageId: string): string;
  groundChecks(): string;
  watch(stageId: string): string;
}
export interface GateInput {
  stage: GateStage;
  steps: GateStep[];
  circuits: GateCircuit[];
  /** Defects not closed (nor accepted as is) on the stage's positions. */
  defects: GateDefect[];
  /** The board's latest lamp observation (a ground-lamp check or a watch check), or null. */
  lamps: GateLampObservation | null;
  /** This attempt's watch checks. */
  watchChecks: Array<{ id: string; at: string }>;
  /** Thermal scans of the stage's positions since it was energised. */
  thermal: Array<{ id: string; at: string; level: number; designation: string }>;
  /** This attempt's incidents. */
  incidents: Array<{ id: string; at: string; summary: string; defectId: string | null }>;
  maxReadingAgeDays: number;
  /** The site's IANA time zone: a qualification's last day is counted, and the watch's times written, on its clock. */
  timeZone: string;
  links: GateLinks;
}

export type BlockerCode =
  | "insulation_missing"
  | "insulation_old"
  | "insulation_not_met"
  | "insulation_fell"
  | "defect_open"
  | "protection_missing"
  | "protection_no_limit"
  | "protection_above_limit"
  | "no_qualified_person"
  | "qualification_expired"
  | "qualified_person_suspended"
  | "ground_shown"
  | "depends_on"
  | "stopped"
  | "not_energised"
  | "lamps_not_checked"
  | "thermal_missing"
  | "hot_spot"
  | "watch_running"
  | "watch_overdue"
  | "watch_gap";
export interface Blocker {
  code: BlockerCode;
  message: string;
  href: string;
}
export type HoldState = "met" | "released" | "ready" | "blocked" | "waiting";
export interface HoldPoint {
  stepId: string;
  kind: StepKind;
  title: string;
  state: HoldState;
  blockers: Blocker[];
  signoff: GateSignoff | null;
  qualifiedOnly: boolean;
  /**
   * Before the stage is energised, an entry in force stops counting when the evidence changes under it: a signed
   * hold point with a blocker now, or a release with a blocker it did not cover, is "blocked" again, and says so.
   */
  overtaken: boolean;
  /**
   * What the hold point would be with no entry in force, and its blockers then: a new signature (also one that
   * supersedes) needs "ready", a release "blocked" (server/return-to-service/service.ts).
   */
  unsigned: { state: HoldState; blockers: Blocker[] };
}

/** A blocker's identity across evaluations (its code and what it links to), not its words, which carry counts. */
export const blockerKey = (b: Blocker) => `${b.code} ${b.href}`;
export type StageState =
  "released" | "live" | "stopped" | "de_energised" | "ready_to_energise" | "blocked" | "preparing";
export interface GateResult {
  stageId: string;
  state: StageState;
  holdPoints: HoldPoint[];
  /** Every blocker once, in hold-point order. */
  blockers: Blocker[];
  /** Released-with-reason hold points: shown in red for ever. */
  releasedWithReason: Array<{ stepId: string; title: string; reason: string; by: string; at: string }>;
}

const ms = (iso: string) => {
  const t = Date.parse(iso);
  if (Number.isNaN(t)) throw new RangeError(`not a date: ${iso}`);
  return t;
};
const fmt = (n: number) => (n >= 100 ? String(Math.round(n)) : String(Number(n.toPrecision(2))));
/** A moment as the crew reads it: on the site's clock, the zone named ("2026-12-06 11:39 Europe/Lisbon"). */
const onSite = (iso: string, zone: string) => `${localMinute(new Date(ms(iso)), zone)} ${zone}`;
const daysOld = (fromMs: number, toMs: number) => Math.floor((toMs - fromMs) / DAY_MS);
const label = (c: GateCircuit) => (c.circuit ? `${c.designation} (${c.circuit})` : c.designation);

/** Readings of each conductor pair the insulation hold point looks at: the latest and the one before it. */
export const GATE_READINGS_PER_PAIR = 2;

/**
 * Insulation blockers for the circuits as of `asOfMs`. Each conductor pair a circuit was tested on is judged on its
 * own: its latest reading must be recent and meet the criterion, and must not have fallen since that pair's reading
 * before. Readings of different pairs do not compare (phase B after phase A is not a fall), and a pair whose latest
 * reading fails is not hidden by a later reading of another pair.
 */
export function insulationBlockers(
  circuits: GateCircuit[],
  asOfMs: number,
  maxAgeDays: number,
  links: GateLinks,
): Blocker[] {
  if (!(maxAgeDays >= 1)) throw new RangeError("maxReadingAgeDays must be at least 1");
  const out: Blocker[] = [];
  for (const c of circuits) {
    if (!c.needsInsulation) continue;
    const href = links.circuitReadings(c);
    const usable = c.readings.filter((r) => ms(r.measuredAt) <= asOfMs);
    if (!usable[0]) {
      out.push({ code: "insulation_missing", message: `${label(c)}: no insulation reading recorded.`, href });
      continue;
    }
    const byPair = new Map<Conductors, GateReading[]>(); // newest first within each pair
    for (const r of usable) byPair.set(r.conductors, [...(byPair.get(r.conductors) ?? []), r]);
    for (const [pair, [latest, prev]] of byPair) {
      const what = byPair.size > 1 ? `${label(c)}, ${CONDUCTOR_LABELS[pair]}` : label(c);
      if (asOfMs - ms(latest.measuredAt) > maxAgeDays * DAY_MS) {
        out.push({
          code: "insulation_old",
          message: `${what}: latest insulation reading is ${daysOld(ms(latest.measuredAt), asOfMs)} days old (the site asks for one within ${maxAgeDays}).`,
          href,
        });
        continue;
      }
      if (latest.verdict !== "meets") {
        out.push({
          code: "insulation_not_met",
          message: `${what}: latest insulation reading does not meet the recorded criterion.`,
          href,
        });
        continue;
      }
      if (
        prev &&
        latest.correctedMegohms != null &&
        prev.correctedMegohms != null &&
        latest.correctedMegohms < prev.correctedMegohms * (1 - FALL_TOLERANCE)
      ) {
        out.push({
          code: "insulation_fell",
          message: `${what}: insulation resistance fell from ${fmt(prev.correctedMegohms)} to ${fmt(latest.correctedMegohms)} MΩ (corrected) since the reading before.`,
          href,
        });
      }
    }
  }
  return out;
}

export function defectBlockers(defects: GateDefect[], links: GateLinks): Blocker[] {
  return defects
    .filter((d) => d.safetyCritical || d.blocksEnergisation)
    .map((d) => {
      const flags = [d.safetyCritical && "safety-critical", d.blocksEnergisation && "blocks energisation"]
        .filter(Boolean)
        .join(", ");
      return {
        code: "defect_open" as const,
        message: `D-${d.ref} open${d.designation ? ` on ${d.designation}` : ""}: ${d.title} (${flags}).`,
        href: links.defect(d.id),
      };
    });
}

export function protectionBlockers(s: GateStage, links: GateLinks): Blocker[] {
  const href = links.stage(s.id);
  if (s.protectionRatingA == null)
    return [
      { code: "protection_missing", message: "No rating recorded for the protection in front of this stage.", href },
    ];
  if (s.protectionLimitA == null)
    return [{ code: "protection_no_limit", message: "No limit set for the protection in front of this stage.", href }];
  if (s.protectionRatingA > s.protectionLimitA)
    return [
      {
        code: "protection_above_limit",
        message: `The protection is rated ${fmt(s.protectionRatingA)} A, above the stage's limit of ${fmt(s.protectionLimitA)} A.`,
        href,
      },
    ];
  return [];
}

/** Blockers of the energisation itself: the person, the lamps, the stage before, an incident. */
export function energiseBlockers(input: GateInput, today: string): Blocker[] {
  const { stage: s, links } = input;
  const out: Blocker[] = [];
  if (!s.qualifiedPerson)
    out.push({
      code: "no_qualified_person",
      message: "No qualified person named for this stage.",
      href: links.stage(s.id),
    });
  else if (!isQualifiedOn(s.qualifiedPerson, today))
    out.push({
      code: "qualification_expired",
      message: `${s.qualifiedPerson.name}'s qualification expired on ${s.qualifiedPerson.expiresOn}.`,
      href: links.crew(),
    });
  else if (s.qualifiedPerson.suspended)
    out.push({
      code: "qualified_person_suspended",
      message: `${s.qualifiedPerson.name}'s account is suspended by the instance's admin, so they cannot sign: name another qualified person for this stage.`,
      href: links.stage(s.id),
    });
  if (s.dependsOn && s.dependsOn.status !== "released")
    out.push({
      code: "depends_on",
      message: `Waits for “${s.dependsOn.name}” to be released.`,
      href: links.stage(s.dependsOn.id),
    });
  if (input.lamps?.suggestsGround && (!s.energisedAt || ms(input.lamps.at) <= ms(s.energisedAt)))
    out.push({
      code: "ground_shown",
      message: `The board's latest lamp check suggests a ground: ${input.lamps.words}`,
      href: input.lamps.source === "ground_check" ? links.groundChecks() : links.watch(s.id),
    });
  return out;
}

function stoppedBlocker(input: GateInput): Blocker[] {
  const { stage: s, links } = input;
  if (s.status !== "stopped") return [];
  const last = input.incidents.at(-1);
  return [
    {
      code: "stopped",
      message: `Stopped by an incident${last ? `: ${last.summary}` : ""}. The curator starts the stage again once it is dealt with.`,
      href: last?.defectId ? links.defect(last.defectId) : links.stage(s.id),
    },
  ];
}

function afterEnergiseBlockers(kind: StepKind, input: GateInput, nowMs: number): Blocker[] {
  const { stage: s, links } = input;
  if (kind === "release" && s.status === "stopped") return stoppedBlocker(input);
  if (!s.energisedAt) return [];
  const since = ms(s.energisedAt);
  if (kind === "ground_lamps") {
    const l = input.lamps;
    if (!l || ms(l.at) < since)
      return [
        {
          code: "lamps_not_checked",
          message: "No lamp check recorded since the stage was energised.",
          href: links.watch(s.id),
        },
      ];
    if (l.suggestsGround)
      return [
        {
          code: "ground_shown",
          message: `The latest lamp check suggests a ground: ${l.words}`,
          href: l.source === "ground_check" ? links.groundChecks() : links.watch(s.id),
        },
      ];
    return [];
  }
  if (kind === "thermal") {
    const scans = input.thermal.filter((t) => ms(t.at) >= since);
    if (!scans.length)
      return [
        {
          code: "thermal_missing",
          message: "No thermal scan of the stage's positions since it was energised.",
          href: links.stage(s.id),
        },
      ];
    return scans
      .filter((t) => t.level >= 3)
      .map((t) => ({
        code: "hot_spot" as const,
        message: `${t.designation}: thermal scan at level ${t.level} (NETA Table 100.18).`,
        href: links.stage(s.id),
      }));
  }
  if (kind === "watch") {
    const w = watchSchedule(
      {
        energisedAt: s.energisedAt,
        watchHours: s.watchHours,
        checkEveryHours: s.checkEveryHours,
        checks: input.watchChecks.map((c) => c.at),
      },
      nowMs,
    );
    const out: Blocker[] = [];
    const href = links.watch(s.id);
    for (const g of w.gaps)
      out.push({
        code: "watch_gap",
        message: `No check between ${onSite(g.from, input.timeZone)} and ${onSite(g.to, input.timeZone)} (every ${fmt(s.checkEveryHours)} h asked).`,
        href,
      });
    if (w.overdueSince)
      out.push({
        code: "watch_overdue",
        message: `A watch check was due at ${onSite(w.overdueSince, input.timeZone)} and has not been recorded.`,
        href,
      });
    if (!w.complete)
      out.push({
        code: "watch_running",
        message: `The watch period runs until ${onSite(w.endsAt, input.timeZone)}.`,
        href,
      });
    return out;
  }
  return [];
}

/**
 * Evaluates every hold point of a stage. Pre-energisation evidence is judged as of the
 * energisation when the stage has been energised (what was true when it was signed), else
 * as of `now`; open defects always count as of now. A hold point is met when signed, or
 * released with a reason by the curator; it can be signed only when it shows no blocker and
 * every hold point before it is met. Before the energisation a signature stops counting while
 * a blocker shows, and a release while a blocker it did not cover shows (`overtaken`).
 * @param now the moment of evaluation (ISO string)
 * @throws RangeError on unreadable dates or a non-positive reading age
 */
export function evaluateStage(input: GateInput, now: string): GateResult {
  const nowMs = ms(now);
  const today = localDate(new Date(nowMs), input.timeZone);
  const { stage: s, links } = input;
  const asOf = s.energisedAt ? Math.min(ms(s.energisedAt), nowMs) : nowMs;

  const home = (k: StepKind, fallback: StepKind) => (input.steps.some((x) => x.kind === k) ? k : fallback);
  const byKind = new Map<StepKind, Blocker[]>();
  const add = (k: StepKind, bs: Blocker[]) => byKind.set(k, [...(byKind.get(k) ?? []), ...bs]);
  add(home("insulation", "energise"), insulationBlockers(input.circuits, asOf, input.maxReadingAgeDays, links));
  add(home("defects", "energise"), defectBlockers(input.defects, links));
  add(home("protection", "energise"), protectionBlockers(s, links));
  add("energise", energiseBlockers(input, today));

  const holdPoints: HoldPoint[] = [];
  let allBeforeDone = true;
  for (const step of input.steps) {
    const blockers = AFTER_ENERGISE_KINDS.has(step.kind)
      ? afterEnergiseBlockers(step.kind, input, nowMs)
      : step.kind === "custom"
        ? []
        : (byKind.get(step.kind) ?? []);
    const cur = step.current && step.current.kind !== "struck" ? step.current : null;
    const open: HoldState = blockers.length
      ? "blocked"
      : !allBeforeDone || (AFTER_ENERGISE_KINDS.has(step.kind) && !s.energisedAt)
        ? "waiting"
        : "ready";
    // Until the stage is energised its evidence can still change (a defect raised, a reading aged or failed, the
    // protection changed): an entry made before then holds only while nothing new blocks it (common practice: a
    // hold point attests to the evidence as it stood, and the energisation needs it to stand).
    const beforeEnergising = !s.energisedAt && !AFTER_ENERGISE_KINDS.has(step.kind);
    let state: HoldState = open;
    let shown = blockers;
    let overtaken = false;
    if (cur?.kind === "signed") {
      if (beforeEnergising && blockers.length) overtaken = true;
      else [state, shown] = ["met", []];
    } else if (cur?.kind === "released") {
      const covered = new Set(cur.covers ?? blockers.map(blockerKey));
      const fresh = beforeEnergising ? blockers.filter((b) => !covered.has(blockerKey(b))) : [];
      if (fresh.length) [overtaken, shown] = [true, fresh];
      else state = "released";
    }
    holdPoints.push({
      stepId: step.id,
      kind: step.kind,
      title: step.title,
      state,
      blockers: shown,
      signoff: step.current,
      qualifiedOnly: step.qualifiedOnly,
      overtaken,
      unsigned: { state: open, blockers },
    });
    if (state !== "met" && state !== "released") allBeforeDone = false;
  }
  // An energisation blocker with no home step (the curator removed it) still blocks the energise step.
  const seen = new Set<string>();
  const blockers = holdPoints
    .flatMap((h) => h.blockers)
    .filter((b) => (seen.has(b.message) ? false : (seen.add(b.message), true)));

  const energise = holdPoints.find((h) => h.kind === "energise");
  let state: StageState;
  if (s.status === "released") state = "released";
  else if (s.status === "stopped") state = "stopped";
  else if (s.status === "energised") state = "live";
  else if (s.status === "de_energised") state = "de_energised";
  else if (holdPoints.some((h) => !AFTER_ENERGISE_KINDS.has(h.kind) && h.state === "blocked")) state = "blocked";
  else if (energise?.state === "ready") state = "ready_to_energise";
  else state = "preparing";

  const releasedWithReason = holdPoints
    .filter((h) => h.signoff?.kind === "released")
    .map((h) => ({
      stepId: h.stepId,
      title: h.title,
      reason: h.signoff!.reason,
      by: h.signoff!.signerName,
      at: h.signoff!.signedAt,
    }));
  return { stageId: s.id, state, holdPoints, blockers, releasedWithReason };
}

export const STAGE_STATE_LABELS: Record<StageState, string> = {
  released: "Released",
  live: "Live, under watch",
  stopped: "Stopped by an incident",
  de_energised: "De-energised",
  ready_to_energise: "Hold points met up to energising",
  blocked: "Blocked",
  preparing: "Being prepared",
};
export const HOLD_STATE_LABELS: Record<HoldState, string> = {
  met: "Signed",
  released: "Released with reason",
  ready: "Ready to sign",
  blocked: "Blocked",
  waiting: "Waiting",
};

/**
 * Return to service: the words, the default hold-point template and who may do what.
 * Bringing a flooded board back one small stage at a time, each energisation gated on
 * recorded evidence and signed by named people. Tideline records and computes; it never
 * authorises energisation — NFPA 70E, local codes and qualified persons decide.
 */

export const SUPPLIES = ["temporary_fused", "external", "normal"] as const;
export type Supply = (typeof SUPPLIES)[number];
export const SUPPLY_LABELS: Record<Supply, string> = {
  temporary_fused: "Temporary fused feed",
  external: "Shore or external supply",
  normal: "The board's normal supply",
};

export const VOLTAGE_STEPS = ["reduced", "full"] as const;
export type VoltageStep = (typeof VOLTAGE_STEPS)[number];
export const VOLTAGE_STEP_LABELS: Record<VoltageStep, string> = { reduced: "Reduced voltage", full: "Full voltage" };

/** Stored stage states (Tideline's own words). */
export const STAGE_STATUSES = ["planned", "energised", "stopped", "de_energised", "released"] as const;
export type StageStatus = (typeof STAGE_STATUSES)[number];
export const STAGE_STATUS_LABELS: Record<StageStatus, string> = {
  planned: "Being prepared",
  energised: "Live, under watch",
  stopped: "Stopped by an incident",
  de_energised: "De-energised",
  released: "Released",
};

export const STEP_KINDS = [
  "isolate",
  "insulation",
  "defects",
  "protection",
  "clearance",
  "energise",
  "ground_lamps",
  "thermal",
  "watch",
  "release",
  "custom",
] as const;
export type StepKind = (typeof STEP_KINDS)[number];
export const STEP_KIND_LABELS: Record<StepKind, string> = {
  isolate: "Isolate and prove dead",
  insulation: "Insulation resistance",
  defects: "Energisation-blocking defects",
  protection: "Temporary protection",
  clearance: "Personnel clear",
  energise: "Energise",
  ground_lamps: "Ground-detection lamps",
  thermal: "Warm-up and thermal scan",
  watch: "Watch period",
  release: "Release of the stage",
  custom: "Crew's own hold point",
};
/** Steps that only a qualified person for energisation may sign. */
export const QUALIFIED_ONLY_KINDS: ReadonlySet<StepKind> = new Set(["energise", "release"]);
/** Steps that come after the energisation: judged on what happened since. */
export const AFTER_ENERGISE_KINDS: ReadonlySet<StepKind> = new Set(["ground_lamps", "thermal", "watch", "release"]);

export interface TemplateStep {
  kind: StepKind;
  title: string;
  detail: string;
}

/**
 * The default hold points, in the trade's words. Sources (cited from memory, check the
 * edition you work to): NFPA 70E Article 120 (establishing an electrically safe work
 * condition: isolate, lockout/tagout, test for absence of voltage — 120.5 in the 2021/2024
 * editions) and 130.5 (arc-flash risk assessment and the arc-flash boundary). The rest is
 * common practice for flooded switchgear (feed from a temporary fused supply well below
 * the board's rating, watch the ground lamps, scan after warm-up, watch before the next stage).
 */
export const DEFAULT_TEMPLATE: TemplateStep[] = [
  {
    kind: "isolate",
    title: "Isolate and prove dead",
    detail:
      "Lockout/tagout applied at every source of supply; absence of voltage tested with a proven tester (NFPA 70E Article 120).",
  },
  {
    kind: "insulation",
    title: "Insulation resistance of every circuit meets its criterion",
    detail:
      "Each circuit in the stage has a recent reading meeting the recorded criterion, and none has fallen since the one before.",
  },
  {
    kind: "defects",
    title: "Energisation-blocking defects closed",
    detail: "No open safety-critical or energisation-blocking defect on the stage's positions.",
  },
  {
    kind: "protection",
    title: "Temporary protection fitted and its rating recorded",
    detail: "The device in front of the stage and its rating in amperes, at or below the stage's limit.",
  },
  {
    kind: "clearance",
    title: "Personnel clear and outside the arc-flash boundary",
    detail:
      "Everyone accounted for; whoever operates does so from a safe position outside the arc-flash boundary (NFPA 70E 130.5).",
  },
  { kind: "energise", title: "Energise", detail: "A qualified person energises the stage from the recorded supply." },
  {
    kind: "ground_lamps",
    title: "Ground-detection lamps checked",
    detail:
      "Three equal lamps: no ground shown. A dim or dark lamp points at a ground on that phase — stop and trace it.",
  },
  {
    kind: "thermal",
    title: "Warm-up, then thermal scan of the stage and its feeder",
    detail: "After warm-up under load, scan the stage and trace its feeder for local versus spread heating.",
  },
  {
    kind: "watch",
    title: "Watch period",
    detail: "Left energised under watch, with checks at the set interval, before the next stage.",
  },
  {
    kind: "release",
    title: "Release of the stage",
    detail: "A qualified person releases the stage; the next one may then be prepared.",
  },
];

/* Who may do what in return to service: the `rts.*` actions of src/domain/permissions.ts. */

/** A qualification counts on `today` (YYYY-MM-DD) when it has no expiry or expires on/after that day. */
export function isQualifiedOn(q: { expiresOn: string | null } | null | undefined, today: string): boolean {
  if (!q) return false;
  if (!/^\d{4}-\d{2}-\d{2}$/.test(today)) throw new RangeError(`today must be YYYY-MM-DD, got ${today}`);
  return q.expiresOn === null || q.expiresOn >= today;
}

/**
 * Can `stageId` move to `toIndex` in `order` (stage ids, top first)? A stage never goes
 * ahead of the stage it depends on, and a stage another one depends on never goes behind it.
 * Tideline's rule.
 */
export function checkReorder(
  stages: ReadonlyArray<{ id: string; dependsOnId: string | null; name: string }>,
  stageId: string,
  toIndex: number,
): { ok: true; order: string[] } | { ok: false; message: string } {
  const from = stages.findIndex((s) => s.id === stageId);
  if (from < 0) throw new RangeError("stageId is not in the plan");
  if (!Number.isInteger(toIndex) || toIndex < 0 || toIndex >= stages.length)
    throw new RangeError(`toIndex must be 0…${stages.length - 1}`);
  const order = stages.map((s) => s.id);
  order.splice(from, 1);
  order.splice(toIndex, 0, stageId);
  const at = new Map(order.map((id, i) => [id, i]));
  for (const s of stages) {
    if (!s.dependsOnId || !at.has(s.dependsOnId)) continue;
    if (at.get(s.dependsOnId)! > at.get(s.id)!) {
      const dep = stages.find((x) => x.id === s.dependsOnId)!;
      return { ok: false, message: `“${s.name}” depends on “${dep.name}”, so it cannot come before it.` };
    }
  }
  return { ok: true, order };
}

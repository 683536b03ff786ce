import { z } from "zod";
import { text as storable } from "./common";
import {
  STEP_KINDS,
  SUPPLIES,
  VOLTAGE_STEPS,
  type StageStatus,
  type StepKind,
  type Supply,
  type VoltageStep,
} from "../domain/return-to-service";
import type { GateResult } from "../domain/rts-gate";
import type { OperationsStatus } from "../domain/breaker-operations";
import { WATCH_LAMP_LOOKS, type ComponentKind } from "../domain/vocab";

const dateStr = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { message: "Use YYYY-MM-DD" });
const when = z.iso.datetime({ offset: true, message: "Give a date and time" });
const amps = z
  .number({ message: "Amperes as a number" })
  .positive({ message: "Amperes above 0" })
  .max(100_000)
  .nullable();
const text = (max: number) => storable().trim().max(max);
const version = z.number().int().min(1);

const stageFields = {
  name: storable().trim().min(2, { message: "Name the stage" }).max(200),
  sectionIds: z.array(z.uuid()).max(50),
  positionIds: z.array(z.uuid()).max(500),
  supply: z.enum(SUPPLIES, { message: "Choose the supply" }),
  protectionDevice: text(200),
  protectionRatingA: amps,
  protectionLimitA: amps,
  voltageStep: z.enum(VOLTAGE_STEPS, { message: "Reduced or full voltage" }),
  stepVolts: z.number({ message: "Volts as a number" }).positive({ message: "Volts above 0" }).max(100_000).nullable(),
  dependsOnId: z.uuid().nullable(),
  qualifiedPersonId: z.uuid().nullable(),
  watchHours: z
    .number({ message: "Hours as a number" })
    .min(0, { message: "Hours from 0" })
    .max(24 * 60),
  checkEveryHours: z
    .number({ message: "Hours as a number" })
    .min(0.25, { message: "At least every 15 minutes" })
    .max(24 * 14),
  notes: text(4000),
};
export const createStageBody = z
  .object({
    ...stageFields,
    sectionIds: stageFields.sectionIds.default([]),
    positionIds: stageFields.positionIds.default([]),
    protectionDevice: stageFields.protectionDevice.default(""),
    protectionRatingA: amps.default(null),
    protectionLimitA: amps.default(null),
    stepVolts: stageFields.stepVolts.default(null),
    dependsOnId: stageFields.dependsOnId.default(null),
    qualifiedPersonId: stageFields.qualifiedPersonId.default(null),
    watchHours: stageFields.watchHours.default(24),
    checkEveryHours: stageFields.checkEveryHours.default(4),
    notes: stageFields.notes.default(""),
  })
  .refine((b) => b.sectionIds.length + b.positionIds.length > 0, {
    message: "Name at least one section or circuit the stage brings back",
    path: ["sectionIds"],
  });
export type CreateStageBody = z.infer<typeof createStageBody>;
export const patchStageBody = z.object(stageFields).partial().extend({ version }).strict();
export type PatchStageBody = z.infer<typeof patchStageBody>;
export const moveBody = z.object({ toIndex: z.number().int().min(0).max(10_000) });

export const stepBody = z.object({
  kind: z.enum(STEP_KINDS).default("custom"),
  title: storable().trim().min(2, { message: "Say what the hold point is" }).max(300),
  detail: text(2000).default(""),
  /** Insert at this position (0 = top); default at the end. */
  atIndex: z.number().int().min(0).max(1000).optional(),
});
export const patchStepBody = z
  .object({ title: stepBody.shape.title, detail: text(2000), version })
  .partial()
  .extend({ version })
  .strict();

export const EVIDENCE_TYPES = [
  "insulation_reading",
  "thermal_scan",
  "ground_check",
  "photo",
  "defect",
  "watch_check",
] as const;
export const evidenceItem = z.object({ type: z.enum(EVIDENCE_TYPES), id: z.uuid() });
export type EvidenceItem = z.infer<typeof evidenceItem>;

/** A blocked hold point is released with at least a sentence of reason. */
export const RELEASE_REASON_MIN = 10;
export const signBody = z
  .object({
    /** signed: the hold point is met; released: the curator lets a blocked hold point pass, with a reason. */
    kind: z.enum(["signed", "released"]).default("signed"),
    reason: text(2000).default(""),
    note: text(2000).default(""),
    evidence: z.array(evidenceItem).max(50).default([]),
    /** The energisation's time (energise step only); default now. */
    at: when.optional(),
    /** The attempt the signer saw; a stale one gets 409 with the current state. */
    attempt: z.number().int().min(1),
  })
  .refine((b) => b.kind !== "released" || b.reason.length >= RELEASE_REASON_MIN, {
    message: "Write the reason for releasing a blocked hold point (at least a sentence).",
    path: ["reason"],
  });
export const supersedeBody = z.object({
  kind: z.enum(["signed", "released", "struck"]),
  reason: storable().trim().min(3, { message: "Say why the entry is corrected" }).max(2000),
  note: text(2000).default(""),
  evidence: z.array(evidenceItem).max(50).default([]),
});

// The words live with the trade's other words (no zod there: the sync bar names fields without building schemas).
export { WATCH_LAMP_LOOKS as LAMP_LOOKS, WATCH_LAMP_LOOK_LABELS as LAMP_LOOK_LABELS } from "../domain/vocab";
export const watchCheckBody = z
  .object({
    at: when.optional(),
    lamps: z.enum(WATCH_LAMP_LOOKS, { message: "How did the lamps look?" }),
    lampPhase: z.enum(["A", "B", "C"]).nullable().default(null),
    smell: z.boolean().default(false),
    sound: z.boolean().default(false),
    warmToHand: z.boolean().default(false),
    thermalPositionId: z.uuid().nullable().default(null),
    thermalC: z.number().min(-50).max(1000).nullable().default(null),
    ambientC: z.number().min(-50).max(80).nullable().default(null),
    note: text(2000).default(""),
  })
  .refine((b) => b.lamps === "equal" || b.lamps === "not_seen" || b.lampPhase, {
    message: "Which phase's lamp?",
    path: ["lampPhase"],
  })
  .refine((b) => b.thermalC === null || b.ambientC !== null, {
    message: "Give the air temperature beside the thermal reading",
    path: ["ambientC"],
  });

export const INCIDENT_KINDS = ["protection_operated", "dark_lamp", "hot_spot", "low_insulation", "other"] as const;
export type IncidentKind = (typeof INCIDENT_KINDS)[number];
export const INCIDENT_KIND_LABELS: Record<IncidentKind, string> = {
  protection_operated: "Protection operated (fuse blew / breaker tripped)",
  dark_lamp: "Ground lamp dark",
  hot_spot: "Hot spot (thermal level 3–4)",
  low_insulation: "Insulation below the minimum",
  other: "Other",
};
export const incidentBody = z.object({
  kind: z.enum(INCIDENT_KINDS),
  positionId: z.uuid().nullable().default(null),
  note: storable().trim().min(3, { message: "Say what happened" }).max(2000),
  at: when.optional(),
});
export const deEnergiseBody = z.object({ note: text(2000).default(""), at: when.optional() });
export const restartBody = z.object({
  reason: storable().trim().min(3, { message: "Say what was done about the incident" }).max(2000),
  version,
});

export const operationBody = z.object({
  operation: z.enum(["open", "close"]),
  stageId: z.uuid().nullable().default(null),
  why: storable().trim().min(2, { message: "Say why it was operated" }).max(500),
  at: when.optional(),
});
export const budgetBody = z.object({
  budget: z
    .number({ message: "A whole number of operations" })
    .int({ message: "A whole number of operations" })
    .min(0, { message: "0 or more operations" })
    .max(100_000),
  reason: text(500).default(""),
  version: z.number().int().min(0),
});

export const qualifiedBody = z.object({
  qualification: storable().trim().min(2, { message: "Say what the qualification is" }).max(500),
  expiresOn: dateStr.nullable(),
  /** 0 when adding. */
  version: z.number().int().min(0),
});

export const templateStep = z.object({
  kind: z.enum(STEP_KINDS),
  title: stepBody.shape.title,
  detail: text(2000).default(""),
});
export const settingsBody = z.object({
  insulationMaxAgeDays: z
    .number({ message: "Days as a whole number" })
    .int({ message: "Days as a whole number" })
    .min(1, { message: "From 1 to 365 days" })
    .max(365, { message: "From 1 to 365 days" }),
  template: z.array(templateStep).min(1).max(40),
  version: z.number().int().min(0),
});

// ---- responses (built by the server, read by the client) ----
export interface RtsSignoff {
  id: string;
  stepId: string;
  attempt: number;
  kind: "signed" | "released" | "struck";
  signedBy: string | null;
  signerName: string;
  signedAt: string;
  reason: string;
  note: string;
  evidence: EvidenceItem[];
  supersedesId: string | null;
  supersededBy: string | null;
  /** A release's blockers as it saw them (src/domain/rts-gate.ts blockerKey). */
  covers: string[] | null;
}
export interface RtsStep {
  id: string;
  kind: StepKind;
  title: string;
  detail: string;
  qualifiedOnly: boolean;
  sortOrder: number;
  version: number;
  /** Every entry of this attempt, oldest first (the chain of corrections). */
  entries: RtsSignoff[];
}
export interface RtsStage {
  id: string;
  boardId: string;
  sortOrder: number;
  name: string;
  sections: Array<{ id: string; name: string }>;
  positions: Array<{ id: string; designation: string; circuit: string }>;
  supply: Supply;
  protectionDevice: string;
  protectionRatingA: number | null;
  protectionLimitA: number | null;
  voltageStep: VoltageStep;
  stepVolts: number | null;
  dependsOnId: string | null;
  qualifiedPerson: {
    userId: string;
    name: string;
    qualification: string;
    expiresOn: string | null;
    suspended: boolean;
  } | null;
  watchHours: number;
  checkEveryHours: number;
  status: StageStatus;
  attempt: number;
  energisedAt: string | null;
  releasedAt: string | null;
  notes: string;
  version: number;
  steps: RtsStep[];
  gate: GateResult;
  watch: {
    endsAt: string;
    nextDueAt: string | null;
    overdueSince: string | null;
    checksDone: number;
    complete: boolean;
  } | null;
  /** Breakers the stage would operate that are at or past their budget. */
  operationWarnings: Array<{ componentId: string; designation: string; warning: string }>;
  circuitCount: number;
}
export interface RtsEvent {
  id: string;
  stageId: string;
  stageName: string;
  at: string;
  kind: "energise" | "de_energise" | "watch_check" | "incident" | "signoff" | "operation";
  title: string;
  detail: string;
  by: string | null;
  /** incidents: the defect it opened; signoffs: released-with-reason shows red. */
  defectId?: string | null;
  alert?: boolean;
  /** operations: the breaker operated. */
  componentId?: string;
  /**
   * watch checks: the time the phone gave (by its clock), when the server received it, and how far the
   * phone's clock was off the server's as it sent (s; null when it did not say). `at` is on the server's clock.
   */
  clock?: { deviceAt: string | null; receivedAt: string; skewS: number | null };
}
export interface RtsBreaker {
  componentId: string;
  positionId: string;
  designation: string;
  kind: ComponentKind;
  year: number | null;
  budget: number;
  budgetBasis: string;
  budgetVersion: number;
  status: OperationsStatus;
}
export interface RtsBoardView {
  board: { id: string; name: string; nominalVolts: number };
  settings: { insulationMaxAgeDays: number };
  stages: RtsStage[];
  events: RtsEvent[];
  breakers: RtsBreaker[];
  sections: Array<{ id: string; name: string }>;
  positions: Array<{ id: string; designation: string; circuit: string; sectionId: string | null }>;
  qualifiedPersons: Array<{
    userId: string;
    name: string;
    qualification: string;
    expiresOn: string | null;
    current: boolean;
    /** The account is suspended by the instance's admin (server/auth/suspension.ts): it cannot sign. */
    suspended: boolean;
  }>;
  now: string;
}
export interface RtsOverviewBoard {
  boardId: string;
  boardName: string;
  stages: number;
  released: number;
  current: { id: string; name: string; state: GateResult["state"]; blockers: number } | null;
  overdue: boolean;
  /** Every stage in plan order with its state. */
  sequence: Array<{ id: string; name: string; state: GateResult["state"]; blockers: number }>;
}
export interface QualifiedPerson {
  userId: string;
  name: string;
  email: string;
  role: string;
  qualification: string | null;
  expiresOn: string | null;
  version: number;
  current: boolean;
  /** The account is suspended by the instance's admin (server/auth/suspension.ts): it cannot sign. */
  suspended: boolean;
}
export interface RtsSettings {
  insulationMaxAgeDays: number;
  template: Array<{ kind: StepKind; title: string; detail: string }>;
  version: number;
}

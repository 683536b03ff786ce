import { z } from "zod";
import { text, int, queryInt, isoDate } from "./common";
import { DEFECT_CATEGORIES, DEFECT_SEVERITIES, DEFECT_STATUSES, ROLES } from "../domain/vocab";

import { PARTS_STATES } from "../domain/vocab";
// The words live with the trade's other words (no zod there: the sync bar names fields without building schemas).
export { PARTS_STATES, PARTS_STATE_LABELS } from "../domain/vocab";

/** Register columns the server can sort by (one index each, migration 0400). */
export const SORT_KEYS = [
  "priority",
  "ref",
  "title",
  "board",
  "position",
  "category",
  "severity",
  "status",
  "assignee",
  "dueOn",
  "effortHours",
  "costEstimate",
  "createdAt",
  "updatedAt",
] as const;
export type SortKey = (typeof SORT_KEYS)[number];
export const FLAGS = ["safety", "blocking", "pinned", "unassigned", "overdue"] as const;
export type Flag = (typeof FLAGS)[number];

const many = <T extends z.ZodType>(item: T) =>
  // Only a string is split; anything else (an object from a crafted query) goes on to fail the array check, never to throw here.
  z.preprocess(
    (v) => (v === undefined ? [] : typeof v === "string" ? v.split(",").filter(Boolean) : v),
    z.array(item).max(50),
  );
const dateStr = isoDate("Use YYYY-MM-DD");

/** The register's query: the same keys live in the browser's URL, so a link shows the same view. */
export const listQuery = z.object({
  q: text().trim().max(200).default(""),
  board: many(z.uuid()),
  category: many(z.enum(DEFECT_CATEGORIES)),
  severity: many(z.enum(DEFECT_SEVERITIES)),
  status: many(z.enum(DEFECT_STATUSES)),
  /** user ids, or "none" for unassigned */
  assignee: many(z.union([z.uuid(), z.literal("none")])),
  flag: many(z.enum(FLAGS)),
  sort: z.enum(SORT_KEYS).default("priority"),
  dir: z.enum(["asc", "desc"]).default("desc"),
  page: queryInt().min(0).max(100_000).default(0),
  size: queryInt().min(1).max(200).default(25),
  /** the day "overdue" counts from (the client's today); defaults to the server's */
  today: dateStr.optional(),
});
export type ListQuery = z.infer<typeof listQuery>;

const money = z.number().min(0).max(10_000_000).nullable();
const hours = z.number().min(0).max(10_000).nullable();

/** The editable fields, without defaults (a PATCH must not reset what it does not name). */
const fields = {
  sectionId: z.uuid().nullable(),
  positionId: z.uuid().nullable(),
  componentId: z.uuid().nullable(),
  title: text().trim().min(3, { message: "Say in a few words what is wrong" }).max(200),
  description: text().trim().max(8000),
  category: z.enum(DEFECT_CATEGORIES, { message: "Choose a category" }),
  severity: z.enum(DEFECT_SEVERITIES, { message: "Choose a severity" }),
  safetyCritical: z.boolean(),
  blocksEnergisation: z.boolean(),
  effortHours: hours,
  costEstimate: money,
  partsNeeded: text().trim().max(2000),
  partsState: z.enum(PARTS_STATES),
  assigneeId: z.uuid().nullable(),
  dueOn: dateStr.nullable(),
};

export const createDefectBody = z.object({
  ...fields,
  boardId: z.uuid({ message: "Choose a board" }),
  inspectionId: z.uuid().nullable().default(null),
  sectionId: fields.sectionId.default(null),
  positionId: fields.positionId.default(null),
  componentId: fields.componentId.default(null),
  description: fields.description.default(""),
  safetyCritical: fields.safetyCritical.default(false),
  blocksEnergisation: fields.blocksEnergisation.default(false),
  effortHours: fields.effortHours.default(null),
  costEstimate: fields.costEstimate.default(null),
  partsNeeded: fields.partsNeeded.default(""),
  partsState: fields.partsState.default("none_needed"),
  assigneeId: fields.assigneeId.default(null),
  dueOn: fields.dueOn.default(null),
  /** The failing reading this defect is raised from; linked both ways. */
  fromReading: z
    .object({ kind: z.enum(["insulation", "contact", "thermal", "ground"]), id: z.uuid() })
    .nullable()
    .default(null),
});
export type CreateDefectBody = z.infer<typeof createDefectBody>;

export const READING_KINDS = ["insulation", "contact", "thermal", "ground"] as const;
export const linkReadingBody = z.object({
  readingKind: z.enum(READING_KINDS),
  readingId: z.uuid(),
  role: z.enum(["raised_from", "retest"]).default("retest"),
});
export type LinkReadingBody = z.input<typeof linkReadingBody>;
const judged = {
  readingKind: z.enum(READING_KINDS),
  readingId: z.string(),
  measuredAt: z.string(),
  verdict: z.string(),
  summary: z.string(),
};
export const evidenceResponse = z.object({
  linked: z.array(
    z.object({ ...judged, id: z.string(), role: z.enum(["raised_from", "retest"]), linkedAt: z.string() }),
  ),
  candidates: z.array(z.object(judged)),
  retestsMeeting: z.number(),
  afterPhotos: z.number(),
});
export type Evidence = z.infer<typeof evidenceResponse>;
export const readingDefectsResponse = z.object({
  links: z.array(
    z.object({
      readingKind: z.enum(READING_KINDS),
      readingId: z.string(),
      role: z.string(),
      defectId: z.string(),
      ref: z.number(),
      status: z.enum(DEFECT_STATUSES),
      title: z.string(),
    }),
  ),
});

export const patchDefectBody = z
  .object(fields)
  .partial()
  .extend({ version: int().min(1) })
  .strict();
export type PatchDefectBody = z.infer<typeof patchDefectBody>;

export const transitionBody = z.object({
  to: z.enum(DEFECT_STATUSES),
  reason: text().trim().max(2000).default(""),
  repairedBy: z.uuid().nullable().optional(),
  version: int().min(1),
});
export const assignBody = z.object({ assigneeId: z.uuid().nullable(), version: int().min(1) });
export const pinBody = z.object({
  direction: z.enum(["above", "below"]),
  relativeTo: z.uuid({ message: "Choose the defect to pin against" }),
  reason: text().trim().min(3, { message: "Give the reason for the pin" }).max(2000),
});
export const unpinBody = z.object({ reason: text().trim().max(2000).default("") });

export const bulkBody = z.object({
  ids: z.array(z.uuid()).min(1, { message: "Select at least one defect" }).max(500),
  action: z.discriminatedUnion("type", [
    z.object({ type: z.literal("assign"), assigneeId: z.uuid().nullable() }),
    z.object({ type: z.literal("status"), to: z.enum(DEFECT_STATUSES), reason: text().trim().max(2000).default("") }),
    z.object({ type: z.literal("due"), dueOn: dateStr.nullable() }),
  ]),
});
export type BulkBody = z.infer<typeof bulkBody>;

export const viewBody = z.object({
  name: text().trim().min(1, { message: "Name the view" }).max(80),
  query: text().max(4000).default(""),
});

const termSchema = z.object({ key: text(), label: text(), points: z.number() });
const pinSchema = z.object({
  id: text(),
  direction: z.enum(["above", "below"]),
  relativeTo: text(),
  relativeRef: z.number().nullable(),
  reason: text(),
  pinnedBy: text().nullable(),
  pinnedByName: text().nullable(),
  pinnedAt: text(),
  removedAt: text().nullable(),
  removedByName: text().nullable(),
  removedReason: text(),
});
export type DefectPin = z.infer<typeof pinSchema>;

export const defectRowSchema = z.object({
  id: text(),
  ref: z.number(),
  siteId: text(),
  boardId: text(),
  boardName: text(),
  sectionId: text().nullable(),
  sectionName: text().nullable(),
  positionId: text().nullable(),
  designation: text().nullable(),
  componentId: text().nullable(),
  inspectionId: text().nullable(),
  title: text(),
  description: text(),
  category: z.enum(DEFECT_CATEGORIES),
  severity: z.enum(DEFECT_SEVERITIES),
  status: z.enum(DEFECT_STATUSES),
  statusReason: text(),
  safetyCritical: z.boolean(),
  blocksEnergisation: z.boolean(),
  effortHours: z.number().nullable(),
  costEstimate: z.number().nullable(),
  partsNeeded: text(),
  partsState: z.enum(PARTS_STATES),
  assigneeId: text().nullable(),
  assigneeName: text().nullable(),
  dueOn: text().nullable(),
  repairedBy: text().nullable(),
  verifiedBy: text().nullable(),
  createdBy: text().nullable(),
  priorityScore: z.number(),
  pinned: z.enum(["above", "below"]).nullable(),
  version: z.number(),
  createdAt: text(),
  updatedAt: text(),
  closedAt: text().nullable(),
});
export type DefectRow = z.infer<typeof defectRowSchema>;

export const listResponse = z.object({
  rows: z.array(defectRowSchema),
  total: z.number(),
  page: z.number(),
  size: z.number(),
});

export const defectDetailSchema = z.object({
  defect: defectRowSchema.extend({
    repairedByName: text().nullable(),
    verifiedByName: text().nullable(),
    createdByName: text().nullable(),
  }),
  terms: z.array(termSchema),
  rank: z.number().nullable(),
  allowedTargets: z.array(z.enum(DEFECT_STATUSES)),
  canEdit: z.boolean(),
  heritage: text().nullable(),
  photoCount: z.number(),
  pins: z.array(pinSchema),
  history: z.array(
    z.object({
      id: z.number(),
      fromStatus: text().nullable(),
      toStatus: text(),
      reason: text(),
      actorName: text().nullable(),
      at: text(),
    }),
  ),
  audit: z.array(
    z.object({ id: z.number(), action: text(), actorName: text().nullable(), at: text(), after: z.unknown() }),
  ),
});
export type DefectDetail = z.infer<typeof defectDetailSchema>;

export const optionsResponse = z.object({
  boards: z.array(z.object({ id: text(), name: text() })),
  sections: z.array(z.object({ id: text(), boardId: text(), name: text() })),
  crew: z.array(z.object({ id: text(), name: text(), role: z.enum(ROLES) })),
});
export type DefectOptions = z.infer<typeof optionsResponse>;

export const positionsResponse = z.object({
  positions: z.array(
    z.object({ id: text(), designation: text(), sectionId: text().nullable(), componentId: text().nullable() }),
  ),
});

export const viewSchema = z.object({ id: text(), name: text(), query: text(), version: z.number(), updatedAt: text() });
export type SavedView = z.infer<typeof viewSchema>;

const planTotals = {
  count: z.number().int(),
  effortHours: z.number(),
  unestimated: z.number().int(),
  cost: z.number(),
  /** The best place among these defects in the site's ranked order. */
  firstRank: z.number().int(),
};
/** The repair plan's first page: totals per board and section, no defects. */
export const planResponse = z.object({
  boards: z.array(
    z.object({
      boardId: text(),
      boardName: text(),
      ...planTotals,
      sections: z.array(z.object({ sectionId: text().nullable(), sectionName: text(), ...planTotals })),
    }),
  ),
});
export type RepairPlan = z.infer<typeof planResponse>;

/** One board's part of the plan: its active defects by section, each with its place in the site's order. */
export const boardPlanResponse = z.object({
  boardId: text(),
  boardName: text(),
  sections: z.array(
    z.object({
      sectionId: text().nullable(),
      sectionName: text(),
      effortHours: z.number(),
      unestimated: z.number(),
      cost: z.number(),
      defects: z.array(defectRowSchema.extend({ rank: z.number() })),
    }),
  ),
});
export type BoardRepairPlan = z.infer<typeof boardPlanResponse>;

export const contextResponse = z.object({
  context: z
    .object({
      boardId: text(),
      sectionId: text().nullable(),
      positionId: text(),
      designation: text(),
      componentId: text().nullable(),
      inspectionId: text().nullable(),
    })
    .nullable(),
});

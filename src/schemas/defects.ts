import { z } from "zod";
import { DEFECT_CATEGORIES, DEFECT_SEVERITIES, DEFECT_STATUSES } from "../domain/vocab";

export const PARTS_STATES = ["none_needed", "in_hand", "wanted", "unobtainable"] as const;
export const PARTS_STATE_LABELS: Record<(typeof PARTS_STATES)[number], string> = {
  none_needed: "No parts needed",
  in_hand: "Parts in hand",
  wanted: "Parts wanted",
  unobtainable: "Parts unobtainable",
};

/** Register columns the server can sort by (one index each, migration 0400). */
export const SORT_KEYS = [
  "priority", "ref", "title", "board", "position", "category", "severity", "status",
  "assignee", "dueOn", "effortHours", "costEstimate", "createdAt", "updatedAt",
] as const;
export type SortKey = (typeof SORT_KEYS)[number];
export const FLAGS = ["safety", "blocking", "pinned", "unassigned", "overdue"] as const;
export type Flag = (typeof FLAGS)[number];

const many = <T extends z.ZodType>(item: T) =>
  z.preprocess((v) => (v === undefined ? [] : Array.isArray(v) ? v : String(v).split(",").filter(Boolean)), z.array(item).max(50));
const dateStr = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { message: "Use YYYY-MM-DD" });

/** The register's query: the same keys live in the browser's URL, so a link shows the same view. */
export const listQuery = z.object({
  q: z.string().trim().max(200).default(""),
  board: many(z.uuid()),
  category: many(z.enum(DEFECT_CATEGORIES)),
  severity: many(z.enum(DEFECT_SEVERITIES)),
  status: many(z.enum(DEFECT_STATUSES)),
  /** user ids, or "none" for unassigned */
  assignee: many(z.union([z.uuid(), z.literal("none")])),
  flag: many(z.enum(FLAGS)),
  sort: z.enum(SORT_KEYS).default("priority"),
  dir: z.enum(["asc", "desc"]).default("desc"),
  page: z.coerce.number().int().min(0).max(100_000).default(0),
  size: z.coerce.number().int().min(1).max(200).default(25),
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
  title: z.string().trim().min(3, { message: "Say in a few words what is wrong" }).max(200),
  description: z.string().trim().max(8000),
  category: z.enum(DEFECT_CATEGORIES, { message: "Choose a category" }),
  severity: z.enum(DEFECT_SEVERITIES, { message: "Choose a severity" }),
  safetyCritical: z.boolean(),
  blocksEnergisation: z.boolean(),
  effortHours: hours,
  costEstimate: money,
  partsNeeded: z.string().trim().max(2000),
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
  /** The failing reading this defect is raised from (issue 14); linked both ways. */
  fromReading: z.object({ kind: z.enum(["insulation", "contact", "thermal", "ground"]), id: z.uuid() }).nullable().default(null),
});
export type CreateDefectBody = z.infer<typeof createDefectBody>;

export const READING_KINDS = ["insulation", "contact", "thermal", "ground"] as const;
export const linkReadingBody = z.object({ readingKind: z.enum(READING_KINDS), readingId: z.uuid(), role: z.enum(["raised_from", "retest"]).default("retest") });
export type LinkReadingBody = z.input<typeof linkReadingBody>;
const judged = { readingKind: z.enum(READING_KINDS), readingId: z.string(), measuredAt: z.string(), verdict: z.string(), summary: z.string() };
export const evidenceResponse = z.object({
  linked: z.array(z.object({ ...judged, id: z.string(), role: z.enum(["raised_from", "retest"]), linkedAt: z.string() })),
  candidates: z.array(z.object(judged)),
  retestsMeeting: z.number(),
  afterPhotos: z.number(),
});
export type Evidence = z.infer<typeof evidenceResponse>;
export const readingDefectsResponse = z.object({
  links: z.array(z.object({ readingKind: z.enum(READING_KINDS), readingId: z.string(), role: z.string(), defectId: z.string(), ref: z.number(), status: z.enum(DEFECT_STATUSES), title: z.string() })),
});

export const patchDefectBody = z.object(fields).partial().extend({ version: z.number().int().min(1) }).strict();
export type PatchDefectBody = z.infer<typeof patchDefectBody>;

export const transitionBody = z.object({
  to: z.enum(DEFECT_STATUSES),
  reason: z.string().trim().max(2000).default(""),
  repairedBy: z.uuid().nullable().optional(),
  version: z.number().int().min(1),
});
export const assignBody = z.object({ assigneeId: z.uuid().nullable(), version: z.number().int().min(1) });
export const pinBody = z.object({
  direction: z.enum(["above", "below"]),
  relativeTo: z.uuid({ message: "Choose the defect to pin against" }),
  reason: z.string().trim().min(3, { message: "Give the reason for the pin" }).max(2000),
});
export const unpinBody = z.object({ reason: z.string().trim().max(2000).default("") });

export const bulkBody = z.object({
  ids: z.array(z.uuid()).min(1, { message: "Select at least one defect" }).max(500),
  action: z.discriminatedUnion("type", [
    z.object({ type: z.literal("assign"), assigneeId: z.uuid().nullable() }),
    z.object({ type: z.literal("status"), to: z.enum(DEFECT_STATUSES), reason: z.string().trim().max(2000).default("") }),
    z.object({ type: z.literal("due"), dueOn: dateStr.nullable() }),
  ]),
});
export type BulkBody = z.infer<typeof bulkBody>;

export const viewBody = z.object({
  name: z.string().trim().min(1, { message: "Name the view" }).max(80),
  query: z.string().max(4000).default(""),
});

const termSchema = z.object({ key: z.string(), label: z.string(), points: z.number() });
const pinSchema = z.object({
  id: z.string(), direction: z.enum(["above", "below"]), relativeTo: z.string(), relativeRef: z.number().nullable(),
  reason: z.string(), pinnedBy: z.string().nullable(), pinnedByName: z.string().nullable(), pinnedAt: z.string(),
  removedAt: z.string().nullable(), removedByName: z.string().nullable(), removedReason: z.string(),
});
export type DefectPin = z.infer<typeof pinSchema>;

export const defectRowSchema = z.object({
  id: z.string(), ref: z.number(), siteId: z.string(), boardId: z.string(), boardName: z.string(),
  sectionId: z.string().nullable(), sectionName: z.string().nullable(),
  positionId: z.string().nullable(), designation: z.string().nullable(),
  componentId: z.string().nullable(), inspectionId: z.string().nullable(),
  title: z.string(), description: z.string(),
  category: z.enum(DEFECT_CATEGORIES), severity: z.enum(DEFECT_SEVERITIES), status: z.enum(DEFECT_STATUSES),
  statusReason: z.string(), safetyCritical: z.boolean(), blocksEnergisation: z.boolean(),
  effortHours: z.number().nullable(), costEstimate: z.number().nullable(),
  partsNeeded: z.string(), partsState: z.enum(PARTS_STATES),
  assigneeId: z.string().nullable(), assigneeName: z.string().nullable(), dueOn: z.string().nullable(),
  repairedBy: z.string().nullable(), verifiedBy: z.string().nullable(), createdBy: z.string().nullable(),
  priorityScore: z.number(), pinned: z.enum(["above", "below"]).nullable(),
  version: z.number(), createdAt: z.string(), updatedAt: z.string(), closedAt: z.string().nullable(),
});
export type DefectRow = z.infer<typeof defectRowSchema>;

export const listResponse = z.object({
  rows: z.array(defectRowSchema),
  total: z.number(),
  page: z.number(),
  size: z.number(),
});

export const defectDetailSchema = z.object({
  defect: defectRowSchema.extend({ repairedByName: z.string().nullable(), verifiedByName: z.string().nullable(), createdByName: z.string().nullable() }),
  terms: z.array(termSchema),
  rank: z.number().nullable(),
  allowedTargets: z.array(z.enum(DEFECT_STATUSES)),
  canEdit: z.boolean(),
  heritage: z.string().nullable(),
  photoCount: z.number(),
  pins: z.array(pinSchema),
  history: z.array(z.object({ id: z.number(), fromStatus: z.string().nullable(), toStatus: z.string(), reason: z.string(), actorName: z.string().nullable(), at: z.string() })),
  audit: z.array(z.object({ id: z.number(), action: z.string(), actorName: z.string().nullable(), at: z.string(), after: z.unknown() })),
});
export type DefectDetail = z.infer<typeof defectDetailSchema>;

export const optionsResponse = z.object({
  boards: z.array(z.object({ id: z.string(), name: z.string() })),
  sections: z.array(z.object({ id: z.string(), boardId: z.string(), name: z.string() })),
  crew: z.array(z.object({ id: z.string(), name: z.string(), role: z.string() })),
});
export type DefectOptions = z.infer<typeof optionsResponse>;

export const positionsResponse = z.object({
  positions: z.array(z.object({ id: z.string(), designation: z.string(), sectionId: z.string().nullable(), componentId: z.string().nullable() })),
});

export const viewSchema = z.object({ id: z.string(), name: z.string(), query: z.string(), version: z.number(), updatedAt: z.string() });
export type SavedView = z.infer<typeof viewSchema>;

export const planResponse = z.object({
  boards: z.array(z.object({
    boardId: z.string(), boardName: z.string(),
    sections: z.array(z.object({
      sectionId: z.string().nullable(), sectionName: z.string(),
      effortHours: z.number(), unestimated: z.number(), cost: z.number(),
      defects: z.array(defectRowSchema.extend({ rank: z.number() })),
    })),
  })),
});
export type RepairPlan = z.infer<typeof planResponse>;

export const contextResponse = z.object({
  context: z.object({ boardId: z.string(), sectionId: z.string().nullable(), positionId: z.string(), designation: z.string(), componentId: z.string().nullable(), inspectionId: z.string().nullable() }).nullable(),
});

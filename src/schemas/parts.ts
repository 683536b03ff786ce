import { z } from "zod";
import { text, int, isoDate } from "./common";
import { LEAD_SOURCE_KINDS, LEAD_STATUSES } from "../domain/part-workflow";
import { SPEC_FIELDS } from "../domain/parts";
import { COMPONENT_KINDS, HERITAGE_RULES, PART_STATUSES } from "../domain/vocab";

const shortText = (max = 200) =>
  text()
    .trim()
    .max(max, { message: `At most ${max} characters` });
const money = z.number({ message: "Enter an amount" }).min(0, { message: "Cannot be negative" }).max(10_000_000);
const dateText = isoDate("Use YYYY-MM-DD");
const version = int().min(1);

const rating = z.number().positive({ message: "Must be above 0" }).max(100_000).nullable();
const poles = int({ message: "Whole number" }).min(1).max(12).nullable();
const volts = int({ message: "Whole number" }).positive().max(100_000).nullable();
const mustMatch = z.array(z.enum(SPEC_FIELDS)).max(SPEC_FIELDS.length).nullable();

export const specFields = {
  kind: z.enum(COMPONENT_KINDS),
  ratingAmps: rating.default(null),
  poles: poles.default(null),
  voltageRating: volts.default(null),
  frame: shortText().default(""),
  mounting: shortText().default(""),
  maker: shortText().default(""),
  model: shortText().default(""),
  need: shortText(300).default(""),
  mustMatch: mustMatch.default(null),
};

export const createLineBody = z.object({
  ...specFields,
  qty: int({ message: "Whole number" }).min(1).max(10_000),
  notes: shortText(4000).default(""),
  estimatedUnitCost: money.nullable().default(null),
  heritageRule: z.enum(HERITAGE_RULES).optional(),
});
export type CreateLineBody = z.input<typeof createLineBody>;

export const updateLineBody = z.object({
  version,
  kind: specFields.kind.optional(),
  ratingAmps: rating.optional(),
  poles: poles.optional(),
  voltageRating: volts.optional(),
  frame: shortText().optional(),
  mounting: shortText().optional(),
  maker: shortText().optional(),
  model: shortText().optional(),
  need: shortText(300).optional(),
  mustMatch: mustMatch.optional(),
  manualQty: int().min(0).max(10_000).optional(),
  notes: shortText(4000).optional(),
  estimatedUnitCost: money.nullable().optional(),
});
export type UpdateLineBody = z.input<typeof updateLineBody>;

export const heritageRuleBody = z.object({ version, heritageRule: z.enum(HERITAGE_RULES) });

export const acquisitionBody = z.object({
  cost: money,
  acquiredOn: dateText,
  qty: int().min(1).max(10_000).default(1),
  leadId: z.uuid().nullable().default(null),
  notes: shortText(2000).default(""),
});
export type AcquisitionBody = z.input<typeof acquisitionBody>;

/** What the fitted part makes of the component it goes into (heritage). */
export const FITTED_HERITAGE = ["unchanged", "period", "modern"] as const;
export type FittedHeritage = (typeof FITTED_HERITAGE)[number];

const note = shortText(2000).default("");
export const statusBody = z.discriminatedUnion("to", [
  z.object({ to: z.literal("wanted"), version, note }),
  z.object({ to: z.literal("lead_found"), version, note }),
  z.object({ to: z.literal("acquired"), version, note, acquisition: acquisitionBody.optional() }),
  z.object({ to: z.literal("received"), version, note }),
  // Left out: the default for the line (defaultFittedHeritage: a whole component is a replacement).
  z.object({ to: z.literal("fitted"), version, note, heritageAfter: z.enum(FITTED_HERITAGE).optional() }),
  z.object({
    to: z.literal("cancelled"),
    version,
    reason: shortText(1000).min(1, { message: "Say why the line is cancelled" }),
  }),
]);
export type StatusBody = z.input<typeof statusBody>;

const leadFields = {
  sourceKind: z.enum(LEAD_SOURCE_KINDS),
  source: shortText(300).min(1, { message: "Where might it come from?" }),
  contact: shortText(500),
  askingPrice: money.nullable(),
  qtyOffered: int().min(1).max(10_000).nullable(),
  notes: shortText(4000),
  status: z.enum(LEAD_STATUSES),
};
export const leadBody = z.object({
  ...leadFields,
  sourceKind: leadFields.sourceKind.default("other"),
  contact: leadFields.contact.default(""),
  askingPrice: leadFields.askingPrice.default(null),
  qtyOffered: leadFields.qtyOffered.default(null),
  notes: leadFields.notes.default(""),
  status: leadFields.status.default("open"),
});
export type LeadBody = z.input<typeof leadBody>;
// No defaults here: an absent field is left as it is.
export const updateLeadBody = z.object(leadFields).partial().extend({ version });

/** Server-side sorts of the wanted list ("part" = kind, rating, maker, model, need). */
export const PART_SORTS = [
  "created",
  "part",
  "heritageRule",
  "qty",
  "positions",
  "status",
  "leadCount",
  "estimated",
] as const;
export type PartSort = (typeof PART_SORTS)[number];
export const PART_PAGE_SIZES = [25, 50, 100, 200, 500] as const;

export const listQuery = z.object({
  status: z.enum([...PART_STATUSES, "open", "all"]).default("open"),
  boardId: z.uuid().optional(),
  kind: z.enum(COMPONENT_KINDS).optional(),
  heritageRule: z.enum(HERITAGE_RULES).optional(),
  /** Words to find in the maker, model, frame, mounting or part wanted, or a line number ("W-12"). */
  q: shortText(200).optional(),
  sort: z.enum(PART_SORTS).optional(),
  dir: z.enum(["asc", "desc"]).optional(),
  page: z.coerce.number().int().min(1).max(100_000).optional(),
  size: z.coerce.number().int().min(1).max(500).optional(),
});
export type ListQuery = z.input<typeof listQuery>;

export const shareLinkBody = z.object({ label: shortText(200).default("") });

/**
 * How many of a line's positions its row carries (the list, the line's heading, a write's answer): the
 * first ones to ask for the part; `linkCount` says how many there are, and the line's own page reads them
 * all, a page at a time, from `GET …/parts/:lineId/links`.
 */
export const LINKS_IN_ROW = 4;
export const LINE_LINKS_PAGE = 50;
export const lineLinksQuery = z.object({
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  size: z.coerce.number().int().min(1).max(500).default(LINE_LINKS_PAGE),
});
export type LineLinksQuery = z.input<typeof lineLinksQuery>;

// ── responses ─────────────────────────────────────────────────────────────────
const specOut = {
  kind: z.enum(COMPONENT_KINDS),
  ratingAmps: z.number().nullable(),
  poles: z.number().nullable(),
  voltageRating: z.number().nullable(),
  frame: text(),
  mounting: text(),
  maker: text(),
  model: text(),
  need: text(),
};

export const linePositionSchema = z.object({
  linkId: text(),
  positionId: text().nullable(),
  designation: text().nullable(),
  boardId: text().nullable(),
  boardName: text().nullable(),
  componentId: text().nullable(),
  defectId: text().nullable(),
  defectTitle: text().nullable(),
  qty: z.number(),
  state: z.enum(["active", "fitted", "withdrawn"]),
});
export type LinePosition = z.infer<typeof linePositionSchema>;

export const lineSchema = z.object({
  id: text(),
  /** Short per-site number, said on the phone: 12, shown as ref "W-12". */
  number: z.number(),
  ref: text(),
  version: z.number(),
  origin: z.enum(["register", "manual"]),
  ...specOut,
  title: text(),
  mustMatch: z.array(z.enum(SPEC_FIELDS)).nullable(),
  status: z.enum(PART_STATUSES),
  heritageRule: z.enum(HERITAGE_RULES),
  cancelReason: text(),
  notes: text(),
  manualQty: z.number(),
  qty: z.number(),
  estimatedUnitCost: z.number().nullable(),
  estimated: z.number().nullable(),
  spent: z.number(),
  leadCount: z.number(),
  /** Nameplate photos of the components of the positions carried below (the first of each). */
  photoIds: z.array(text()),
  /**
   * The positions the part is for or was fitted to (active and fitted links). A row carries the first
   * LINKS_IN_ROW in the order they asked for it; `linkCount` counts them all (withdrawn ones are history,
   * read on the line's page).
   */
  positions: z.array(linePositionSchema),
  linkCount: z.number(),
  updatedAt: text(),
});
export type PartLine = z.infer<typeof lineSchema>;

export const budgetSchema = z.object({
  rows: z.array(
    z.object({
      boardId: text(),
      boardName: text(),
      estimated: z.number(),
      spent: z.number(),
      unestimatedLines: z.number(),
    }),
  ),
  total: z.object({ estimated: z.number(), spent: z.number() }),
});
export type PartsBudget = z.infer<typeof budgetSchema>;

export const listResponse = z.object({
  lines: z.array(lineSchema),
  /** Lines matching the filter on every page; `lines` is page `page` of `size`. */
  total: z.number(),
  page: z.number(),
  size: z.number(),
  budget: budgetSchema,
  boards: z.array(z.object({ id: text(), name: text() })),
});
export type PartsListResponse = z.infer<typeof listResponse>;

/** A page of one line's links, withdrawn ones too, in board and designation order. */
export const lineLinksResponse = z.object({
  links: z.array(linePositionSchema),
  total: z.number(),
  page: z.number(),
  size: z.number(),
});
export type LineLinksResponse = z.infer<typeof lineLinksResponse>;

export const leadSchema = z.object({
  id: text(),
  version: z.number(),
  lineId: text(),
  sourceKind: z.enum(LEAD_SOURCE_KINDS),
  source: text(),
  contact: text(),
  askingPrice: z.number().nullable(),
  qtyOffered: z.number().nullable(),
  notes: text(),
  status: z.enum(LEAD_STATUSES),
  createdAt: text(),
});
export type PartLead = z.infer<typeof leadSchema>;

export const acquisitionSchema = z.object({
  id: text(),
  leadId: text().nullable(),
  qty: z.number(),
  cost: z.number(),
  acquiredOn: text(),
  notes: text(),
});

export const historySchema = z.object({
  id: z.number(),
  at: text(),
  action: text(),
  summary: text(),
  fromStatus: z.enum(PART_STATUSES).nullable(),
  toStatus: z.enum(PART_STATUSES).nullable(),
  actorName: text().nullable(),
});

export const lineDetailResponse = z.object({
  line: lineSchema,
  leads: z.array(leadSchema),
  acquisitions: z.array(acquisitionSchema),
  history: z.array(historySchema),
  nextStatuses: z.array(z.enum(PART_STATUSES)),
});
export type LineDetail = z.infer<typeof lineDetailResponse>;

export const shareLinkSchema = z.object({
  id: text(),
  label: text(),
  createdAt: text(),
  revokedAt: text().nullable(),
  createdByName: text().nullable(),
});
export type ShareLink = z.infer<typeof shareLinkSchema>;

/** The public share page: specifications, quantities, photos. Nothing else, by construction. */
export const sharedLineSchema = z.strictObject({
  ref: text(),
  ...specOut,
  title: text(),
  qty: z.number(),
  heritageRule: z.enum(HERITAGE_RULES),
  status: z.enum(["wanted", "lead_found"]),
  photoUrls: z.array(text()),
});
export const sharedListResponse = z.strictObject({ siteName: text(), lines: z.array(sharedLineSchema) });
export type SharedList = z.infer<typeof sharedListResponse>;

/**
 * Inventory and condition survey: request and response shapes shared by the
 * server (server/inventory/*) and the client. Every path is under /api/sites/:siteId.
 * Timestamps travel as ISO strings, calendar dates as "YYYY-MM-DD". Editable records
 * carry `version`; a stale one gets 409 {error:{code:"conflict", message, current}}.
 */
import { z } from "zod";
import { text as safeText, int as safeInt, queryInt, isoDate, INT4_MIN, INT4_MAX } from "./common";
import {
  COMPONENT_KINDS,
  CONTAMINANTS,
  CUSTODY,
  DISPOSITIONS,
  EARTHING,
  HERITAGE,
  INSULATION_STATES,
  MECHANISM,
  WATER_TYPES,
} from "../domain/vocab";

const text = (max: number) =>
  safeText()
    .trim()
    .max(max, { message: `At most ${max} characters` });
const int = (min: number, max: number) =>
  safeInt({ message: "Whole number" })
    .min(min, { message: `At least ${min}` })
    .max(max, { message: `At most ${max}` });
const num = (min: number, max: number) =>
  z
    .number({ message: "A number" })
    .min(min, { message: `At least ${min}` })
    .max(max, { message: `At most ${max}` });
const version = int(1, 2_147_483_647);
const stamp = safeText();
const id = safeText();

// ───────────── params ─────────────
export const siteParams = z.object({ siteId: z.uuid() });
export const floodEventParams = siteParams.extend({ floodEventId: z.uuid() });
export const boardParams = siteParams.extend({ boardId: z.uuid() });
export const sectionParams = siteParams.extend({ sectionId: z.uuid() });
export const positionParams = siteParams.extend({ positionId: z.uuid() });
export const componentParams = siteParams.extend({ componentId: z.uuid() });
/** DELETE may carry ?version=n; when given and stale the delete is refused with 409. */
export const deleteQuery = z.object({ version: queryInt().min(1).optional() });

// ───────────── flood events: GET/POST /flood-events, PATCH /flood-events/:id ─────────────
export const floodEventSchema = z.object({
  id,
  occurredOn: safeText(),
  waterType: z.enum(WATER_TYPES),
  maxDepthM: z.number().nullable(),
  hoursSubmerged: z.number().nullable(),
  notes: safeText(),
  version: z.number(),
  createdAt: stamp,
  updatedAt: stamp,
});
export type FloodEvent = z.infer<typeof floodEventSchema>;
export const createFloodEventBody = z.object({
  occurredOn: isoDate("A date as YYYY-MM-DD"),
  waterType: z.enum(WATER_TYPES),
  maxDepthM: num(0, 100).nullable().optional(),
  hoursSubmerged: num(0, 100_000).nullable().optional(),
  notes: text(4000).optional(),
});
export type CreateFloodEventBody = z.infer<typeof createFloodEventBody>;
export const patchFloodEventBody = createFloodEventBody.partial().extend({ version });
export type PatchFloodEventBody = z.infer<typeof patchFloodEventBody>;
/** GET /flood-events: newest first. The first is the one recommendations use. */
export const floodEventListResponse = z.array(floodEventSchema);

// ───────────── boards ─────────────
export const boardSchema = z.object({
  id,
  name: safeText(),
  location: safeText(),
  nominalVolts: z.number(),
  phases: z.union([z.literal(1), z.literal(3)]),
  frequencyHz: z.number(),
  earthing: z.enum(EARTHING),
  yearBuilt: z.number().nullable(),
  drawingRef: safeText(),
  faceHeightMm: z.number().nullable(),
  waterLineMm: z.number().nullable(),
  gridRows: z.number(),
  gridCols: z.number(),
  notes: safeText(),
  version: z.number(),
  createdAt: stamp,
  updatedAt: stamp,
});
export type Board = z.infer<typeof boardSchema>;
export const createBoardBody = z.object({
  name: text(200).min(1, { message: "Give the board a name" }),
  location: text(200).optional(),
  nominalVolts: int(1, 1000).optional(),
  phases: z.union([z.literal(1), z.literal(3)], { message: "1 or 3" }).optional(),
  frequencyHz: int(1, 1000).optional(),
  earthing: z.enum(EARTHING).optional(),
  yearBuilt: int(1850, 2100).nullable().optional(),
  drawingRef: text(200).optional(),
  /** Height of the board face and of the flood's water line on it, from the floor, mm. */
  faceHeightMm: int(1, 10_000).nullable().optional(),
  waterLineMm: int(0, 10_000).nullable().optional(),
  gridRows: int(1, 60).optional(),
  gridCols: int(1, 60).optional(),
  notes: text(4000).optional(),
});
export type CreateBoardBody = z.infer<typeof createBoardBody>;
/** Shrinking the grid below an existing position is refused (400, fields.gridRows/gridCols). */
export const patchBoardBody = createBoardBody.partial().extend({ version });
export type PatchBoardBody = z.infer<typeof patchBoardBody>;
export const boardListItem = boardSchema.extend({ positionCount: z.number(), surveyedCount: z.number() });
export type BoardListItem = z.infer<typeof boardListItem>;
/** GET /boards, by name. POST /boards → 201 boardSchema; PATCH → boardSchema. */
export const boardListResponse = z.array(boardListItem);

// ───────────── sections ─────────────
export const sectionSchema = z.object({
  id,
  boardId: id,
  name: safeText(),
  sortOrder: z.number(),
  notes: safeText(),
  version: z.number(),
  createdAt: stamp,
  updatedAt: stamp,
});
export type Section = z.infer<typeof sectionSchema>;
export const createSectionBody = z.object({
  name: text(200).min(1, { message: "Give the section a name" }),
  sortOrder: int(0, 100_000).optional(),
  notes: text(4000).optional(),
});
export const patchSectionBody = createSectionBody.partial().extend({ version });
export type CreateSectionBody = z.infer<typeof createSectionBody>;
export type PatchSectionBody = z.infer<typeof patchSectionBody>;

// ───────────── positions ─────────────
export const positionSchema = z.object({
  id,
  boardId: id,
  sectionId: id.nullable(),
  designation: safeText(),
  kind: z.enum(COMPONENT_KINDS),
  gridRow: z.number(),
  gridCol: z.number(),
  rowSpan: z.number(),
  colSpan: z.number(),
  circuit: safeText(),
  sortOrder: z.number(),
  version: z.number(),
  createdAt: stamp,
  updatedAt: stamp,
});
export type Position = z.infer<typeof positionSchema>;
const designation = text(40).min(1, { message: "Give the designation painted on the board" });
/** Grid rows and columns count from 1 (top left); the span must stay inside the board's grid. */
export const createPositionBody = z.object({
  designation,
  kind: z.enum(COMPONENT_KINDS),
  gridRow: int(1, 60),
  gridCol: int(1, 60),
  rowSpan: int(1, 60).optional(),
  colSpan: int(1, 60).optional(),
  circuit: text(200).optional(),
  sectionId: z.uuid().nullable().optional(),
  sortOrder: int(0, 100_000).optional(),
});
export type CreatePositionBody = z.infer<typeof createPositionBody>;
export const patchPositionBody = createPositionBody.partial().extend({ version });
export type PatchPositionBody = z.infer<typeof patchPositionBody>;
/** Creates `${prefix}${from}` … `${prefix}${to}` left to right from startCol on gridRow (≤ 60 at once). */
export const generatePositionsBody = z
  .object({
    prefix: safeText().max(20),
    from: int(0, 9999),
    to: int(0, 9999),
    gridRow: int(1, 60),
    startCol: int(1, 60),
    kind: z.enum(COMPONENT_KINDS),
    sectionId: z.uuid().nullable().optional(),
  })
  .refine((b) => b.to >= b.from, { message: "'to' must not be below 'from'", path: ["to"] })
  .refine((b) => b.to - b.from < 60, { message: "At most 60 positions at once", path: ["to"] });
export type GeneratePositionsBody = z.infer<typeof generatePositionsBody>;
/** Every id must be a position of this board; sortOrder becomes the index in `ids`. */
export const reorderPositionsBody = z.object({ ids: z.array(z.uuid()).min(1).max(2000) });
export type ReorderPositionsBody = z.infer<typeof reorderPositionsBody>;

// ───────────── components ─────────────
export const componentSchema = z.object({
  id,
  positionId: id,
  kind: z.enum(COMPONENT_KINDS),
  maker: safeText(),
  model: safeText(),
  frame: safeText(),
  mounting: safeText(),
  ratingAmps: z.number().nullable(),
  poles: z.number().nullable(),
  voltageRating: z.number().nullable(),
  interruptingKa: z.number().nullable(),
  serial: safeText(),
  year: z.number().nullable(),
  meterRange: safeText(),
  lampWatts: z.number().nullable(),
  heritage: z.enum(HERITAGE),
  tagNumber: safeText().nullable(),
  custody: z.enum(CUSTODY),
  custodyLocation: safeText(),
  disposition: z.enum(DISPOSITIONS).nullable(),
  dispositionReason: safeText(),
  dispositionRecommended: z.enum(DISPOSITIONS).nullable(),
  dispositionOverridden: z.boolean(),
  dispositionBy: id.nullable(),
  dispositionAt: stamp.nullable(),
  retiredAt: stamp.nullable(),
  notes: safeText(),
  version: z.number(),
  createdAt: stamp,
  updatedAt: stamp,
});
export type Component = z.infer<typeof componentSchema>;
/** Nameplate fields typed by kind; an empty tagNumber ("") clears the tag. Tag numbers are unique per site. */
export const patchComponentBody = z.object({
  version,
  kind: z.enum(COMPONENT_KINDS).optional(),
  maker: text(200).optional(),
  model: text(200).optional(),
  frame: text(100).optional(),
  mounting: text(100).optional(),
  ratingAmps: num(0, 100_000).nullable().optional(),
  poles: int(1, 4).nullable().optional(),
  voltageRating: int(1, 100_000).nullable().optional(),
  interruptingKa: num(0, 1000).nullable().optional(),
  serial: text(100).optional(),
  year: int(1850, 2100).nullable().optional(),
  meterRange: text(100).optional(),
  lampWatts: num(0, 10_000).nullable().optional(),
  heritage: z.enum(HERITAGE).optional(),
  tagNumber: text(40).optional(),
  notes: text(4000).optional(),
});
export type PatchComponentBody = z.infer<typeof patchComponentBody>;

// ───────────── board elevation: GET /boards/:boardId ─────────────
export const tileComponentSchema = z.object({
  id,
  kind: z.enum(COMPONENT_KINDS),
  tagNumber: safeText().nullable(),
  heritage: z.enum(HERITAGE),
  custody: z.enum(CUSTODY),
  disposition: z.enum(DISPOSITIONS).nullable(),
  dispositionOverridden: z.boolean(),
  maker: safeText(),
  model: safeText(),
  ratingAmps: z.number().nullable(),
  poles: z.number().nullable(),
  version: z.number(),
});
export const tileLatestSchema = z.object({
  astmGrade: z.number().nullable(),
  isoRi: safeText().nullable(),
  percentRusted: z.number().nullable(),
  inspectedAt: stamp,
  belowWaterLine: z.boolean().nullable(),
});
export const tileRowSchema = z.object({
  id,
  designation: safeText(),
  kind: z.enum(COMPONENT_KINDS),
  gridRow: z.number(),
  gridCol: z.number(),
  rowSpan: z.number(),
  colSpan: z.number(),
  circuit: safeText(),
  sectionId: id.nullable(),
  sortOrder: z.number(),
  version: z.number(),
  component: tileComponentSchema.nullable(),
  latest: tileLatestSchema.nullable(),
  photoCount: z.number(),
  openDefectCount: z.number(),
});
export type TileRow = z.infer<typeof tileRowSchema>;
/**
 * A board's positions come in pages, in board order (row, column, order in the cell, id). A board of up to
 * BOARD_PAGE positions is one answer; a larger one answers its first page with the board, and each page's `next` is
 * the key to ask GET /boards/:boardId/tiles?after=… for the one after it (null on the last page).
 */
export const BOARD_PAGE = 500;
/** The size the client asks for the pages after the first (drawn by then): fewer requests for the rest. */
export const BOARD_LATER_PAGE = 1000;
export const BOARD_PAGE_MAX = 2000;
const PAGE_KEY =
  /^(\d{1,10})\.(\d{1,10})\.(-?\d{1,10})\.([0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12})$/i;
/** The key after which a page starts: the last position of the page before (row.col.order.id), as its `next` gave it. */
export const tilePageKey = z
  .string()
  .regex(PAGE_KEY, { message: "after must be a page key exactly as the previous page's next gave it" })
  .transform((v, ctx) => {
    const [, r, c, o, id] = PAGE_KEY.exec(v)!;
    const [gridRow, gridCol, sortOrder] = [r, c, o].map(Number);
    if (![gridRow, gridCol, sortOrder].every((n) => n >= INT4_MIN && n <= INT4_MAX)) {
      ctx.addIssue({ code: "custom", message: "after holds a number out of range" });
      return z.NEVER;
    }
    return { gridRow, gridCol, sortOrder, id: id.toLowerCase() };
  });
export type TilePageKey = z.output<typeof tilePageKey>;
export const tilePageKeyOf = (t: { gridRow: number; gridCol: number; sortOrder: number; id: string }) =>
  `${t.gridRow}.${t.gridCol}.${t.sortOrder}.${t.id}`;
/** GET /boards/:boardId?size= (the first page's size). */
export const boardQuery = z.object({ size: queryInt().min(1).max(BOARD_PAGE_MAX).default(BOARD_PAGE) });
/** GET /boards/:boardId/tiles?after=&size=. */
export const tilePageQuery = boardQuery.extend({ after: tilePageKey });
/** The board, its sections, its number of positions and the first page of them. */
export const boardDetailResponse = z.object({
  board: boardSchema,
  sections: z.array(sectionSchema),
  total: z.number(),
  positions: z.array(tileRowSchema),
  next: z.string().nullable(),
});
export const tilePageResponse = z.object({ positions: z.array(tileRowSchema), next: z.string().nullable() });
export type TilePage = z.infer<typeof tilePageResponse>;
/**
 * A board's small picture for the board list: its grid and one cell per position, as
 * [row, column, row span, column span, newest ASTM grade or null, custody or null]: a few bytes a
 * position, where the board's pages carry every field of every tile.
 */
export const boardThumbnailResponse = z.object({
  gridRows: z.number(),
  gridCols: z.number(),
  faceHeightMm: z.number().nullable(),
  waterLineMm: z.number().nullable(),
  cells: z.array(
    z.tuple([z.number(), z.number(), z.number(), z.number(), z.number().nullable(), z.enum(CUSTODY).nullable()]),
  ),
});
export type BoardDetail = z.infer<typeof boardDetailResponse>;
/** POST /boards/:boardId/positions → 201 this; generate → 201 { positions: [this…] }. */
export const createdPositionResponse = z.object({ position: positionSchema, component: componentSchema });
export const generatedPositionsResponse = z.object({ positions: z.array(createdPositionResponse) });
/** POST /boards/:boardId/positions/reorder → the board's positions in their new order. */
export const reorderedPositionsResponse = z.object({ positions: z.array(positionSchema) });

// ───────────── survey ─────────────
export const inspectionSchema = z.object({
  id,
  componentId: id,
  positionId: id,
  inspectorId: id.nullable(),
  inspectorName: safeText().nullable(),
  inspectedAt: stamp,
  percentRusted: z.number().nullable(),
  /** ASTM D610 grade 10…0 and ISO 4628-3 "Ri n", computed by the server from percentRusted. */
  astmGrade: z.number().nullable(),
  isoRi: safeText().nullable(),
  belowWaterLine: z.boolean().nullable(),
  contaminants: z.array(z.enum(CONTAMINANTS)),
  mechanism: z.enum(MECHANISM).nullable(),
  insulation: z.enum(INSULATION_STATES).nullable(),
  notes: safeText(),
  createdAt: stamp,
});
export type Inspection = z.infer<typeof inspectionSchema>;
/** The phone's time of a record it made (ISO 8601 with offset); corrected for the phone's clock by the server. */
const madeWhen = z.iso.datetime({ offset: true, message: "Give a date and time" }).optional();
/** POST /components/:id/inspections → 201 inspectionSchema. Appends; the newest is current. */
export const createInspectionBody = z.object({
  percentRusted: num(0, 100).nullable().optional(),
  belowWaterLine: z.boolean().nullable().optional(),
  contaminants: z.array(z.enum(CONTAMINANTS)).max(CONTAMINANTS.length).default([]),
  mechanism: z.enum(MECHANISM).nullable().optional(),
  insulation: z.enum(INSULATION_STATES).nullable().optional(),
  notes: text(4000).default(""),
  /** When it was made, on the phone's clock (an inspection kept on the phone is sent later): server's time if absent. */
  at: madeWhen,
});
export type CreateInspectionBody = z.input<typeof createInspectionBody>;

export const custodyMoveSchema = z.object({
  id,
  componentId: id,
  fromState: z.enum(CUSTODY),
  toState: z.enum(CUSTODY),
  location: safeText(),
  note: safeText(),
  movedBy: id.nullable(),
  movedByName: safeText().nullable(),
  movedAt: stamp,
  /** When it was made on the phone, when that differs from when the server applied it (kept with no signal). */
  madeAt: stamp.nullable().default(null),
  /** Rules of src/domain/custody-chain.ts the curator released for this move, and why. */
  releasedRules: z.array(z.string()).default([]),
  releaseReason: safeText().default(""),
});
export type CustodyMove = z.infer<typeof custodyMoveSchema>;
/**
 * POST /components/:id/custody. `version` is the component's. A move to the state it is
 * already in is refused (409 code "same_state"). `tagNumber`, when given, tags the
 * component in the same step (tag-and-bag on removal).
 */
export const custodyBody = z.object({
  toState: z.enum(CUSTODY),
  location: text(200).default(""),
  note: text(2000).default(""),
  tagNumber: text(40).min(1).optional(),
  /** The curator's release of the chain's refusals (src/domain/custody-chain.ts), with the reason; curator only. */
  releaseReason: text(2000).min(5, "Say why in a few words").optional(),
  /** When it was made, on the phone's clock (a move kept on the phone is applied when it arrives, and keeps this). */
  at: madeWhen,
  version,
});
export type CustodyBody = z.input<typeof custodyBody>;
/** The body of a 409/422 custody refusal's `current`: every rule the move breaks. */
export const custodyRefusalSchema = z.object({
  rule: z.string(),
  status: z.union([z.literal(409), z.literal(422)]),
  message: z.string(),
  releasable: z.boolean(),
});
export type CustodyRefusalDto = z.infer<typeof custodyRefusalSchema>;
export const nextTagResponse = z.object({ tagNumber: z.string() });
export const custodyOptionsResponse = z.object({
  proposed: z.enum(CUSTODY).nullable(),
  moves: z.array(z.object({ to: z.enum(CUSTODY), refusals: z.array(custodyRefusalSchema) })),
});
export type CustodyOptions = z.infer<typeof custodyOptionsResponse>;
export const custodyResponse = z.object({ component: componentSchema, move: custodyMoveSchema });

export const recommendationSchema = z.object({
  disposition: z.enum(DISPOSITIONS),
  reasons: z.array(safeText()),
  source: safeText(),
});
/**
 * GET /components/:id/recommendation. `recommendation` is null when the site has no flood
 * event yet. `assumptions` lists what was assumed, e.g. "no inspection says whether it was
 * below the water line: treated as below it (the cautious reading)".
 */
export const recommendationResponse = z.object({
  recommendation: recommendationSchema.nullable(),
  assumptions: z.array(safeText()),
  basis: z.object({
    floodEventId: id.nullable(),
    waterType: z.enum(WATER_TYPES).nullable(),
    inspectionId: id.nullable(),
    belowWaterLine: z.boolean().nullable(),
  }),
});
export type RecommendationResponse = z.infer<typeof recommendationResponse>;

export const dispositionDecisionSchema = z.object({
  id,
  componentId: id,
  disposition: z.enum(DISPOSITIONS),
  recommended: z.enum(DISPOSITIONS).nullable(),
  overridden: z.boolean(),
  reason: safeText(),
  decidedBy: id.nullable(),
  decidedByName: safeText().nullable(),
  decidedAt: stamp,
});
export type DispositionDecision = z.infer<typeof dispositionDecisionSchema>;
/**
 * PUT /components/:id/disposition (curator). overridden = a recommendation exists and differs;
 * then `reason` must be non-empty (400 fields.reason).
 */
export const dispositionBody = z.object({ disposition: z.enum(DISPOSITIONS), reason: text(2000).default(""), version });
export type DispositionBody = z.input<typeof dispositionBody>;
export const dispositionResponse = z.object({
  component: componentSchema,
  decision: dispositionDecisionSchema,
  recommendation: recommendationResponse,
});

// ───────────── position detail and lookup ─────────────
export const auditRowSchema = z.object({
  id: z.number(),
  entityType: safeText(),
  entityId: id,
  action: safeText(),
  actorId: id.nullable(),
  actorName: safeText().nullable(),
  at: stamp,
  before: z.unknown(),
  after: z.unknown(),
});
export type AuditRow = z.infer<typeof auditRowSchema>;
/** GET /positions/:positionId; lists newest first. */
export const positionDetailResponse = z.object({
  position: positionSchema,
  board: z.object({
    id,
    name: safeText(),
    waterLineMm: z.number().nullable(),
    faceHeightMm: z.number().nullable(),
    gridRows: z.number(),
    gridCols: z.number(),
  }),
  section: z.object({ id, name: safeText() }).nullable(),
  component: componentSchema.nullable(),
  recommendation: recommendationResponse.nullable(),
  inspections: z.array(inspectionSchema),
  custodyMoves: z.array(custodyMoveSchema),
  dispositions: z.array(dispositionDecisionSchema),
  history: z.array(auditRowSchema),
  photoCount: z.number(),
  openDefectCount: z.number(),
});
export type PositionDetail = z.infer<typeof positionDetailResponse>;

export const lookupQuery = z.object({
  q: text(60).min(1, { message: "Type a designation, tag number, circuit or kind" }),
});
/**
 * GET /positions/lookup?q= — designation, tag number, circuit name and kind: exact matches (case-insensitive)
 * first, then loosely typed ones ("kl 42" for KL-0042), prefixes, contains, then typing slips (pg_trgm); ≤ 20.
 */
export const lookupMatchSchema = z.object({
  positionId: id,
  designation: safeText(),
  kind: z.enum(COMPONENT_KINDS),
  circuit: safeText(),
  boardId: id,
  boardName: safeText(),
  sectionName: safeText().nullable(),
  componentId: id.nullable(),
  componentVersion: z.number().nullable(),
  tagNumber: safeText().nullable(),
  custody: z.enum(CUSTODY).nullable(),
  matchedOn: z.enum(["designation", "tag", "circuit", "kind"]),
  exact: z.boolean(),
});
export type LookupMatch = z.infer<typeof lookupMatchSchema>;
export const lookupResponse = z.array(lookupMatchSchema);

// ───────────── site overview: GET /overview ─────────────
const countsOf = <T extends readonly string[]>(keys: T) =>
  z.object(Object.fromEntries(keys.map((k) => [k, z.number()])) as { [K in T[number]]: z.ZodNumber });
export const GRADE_KEYS = ["10", "9", "8", "7", "6", "5", "4", "3", "2", "1", "0", "ungraded"] as const;
/**
 * Counts over the positions of the site (one current component each).
 * surveyed = the position has at least one inspection. bySurveyState: not_surveyed (no
 * inspection, no disposition), inspected (inspection, no disposition), decided (disposition set).
 * byGrade uses each position's newest inspection. originalRetainedPercent = positions whose
 * current component is original and neither scrapped nor missing ÷ all positions × 100
 * (null with no positions).
 */
export const overviewResponse = z.object({
  totals: z.object({
    positions: z.number(),
    surveyed: z.number(),
    bySurveyState: countsOf(["not_surveyed", "inspected", "decided"] as const),
  }),
  byDisposition: countsOf([...DISPOSITIONS, "undecided"] as const),
  byCustody: countsOf(CUSTODY),
  byGrade: countsOf(GRADE_KEYS),
  /** How many positions that is (the percentage rounds away one position on a large site). */
  originalRetained: z.number(),
  originalRetainedPercent: z.number().nullable(),
  boards: z.array(z.object({ id, name: safeText(), positions: z.number(), surveyed: z.number() })),
});
export type Overview = z.infer<typeof overviewResponse>;

// ───────────── CSV: GET /inventory.csv, POST /inventory/import ─────────────
/** Columns the import reads (header names, any order, case-insensitive); board, designation, kind, grid_row, grid_col required. */
export const CSV_IMPORT_COLUMNS = [
  "board",
  "section",
  "designation",
  "kind",
  "grid_row",
  "grid_col",
  "row_span",
  "col_span",
  "circuit",
  "maker",
  "model",
  "frame",
  "mounting",
  "rating_amps",
  "poles",
  "voltage_rating",
  "interrupting_ka",
  "serial",
  "year",
  "meter_range",
  "lamp_watts",
  "heritage",
  "tag_number",
  "notes",
] as const;
/**
 * The export's first column and the one after the import columns: the position's id (a UUID,
 * which no spreadsheet turns into a number) and its row version ("p3c5": position 3,
 * component 5). The import matches a row to its position by id, else by board + designation,
 * else by tag number, and refuses a changed row whose version is no longer current.
 */
export const CSV_KEY_COLUMNS = ["position_id", "row_version"] as const;
/** The export writes these after the import columns; custody and disposition are never applied by an import (listed per row when they differ). */
export const CSV_EXPORT_EXTRA_COLUMNS = [
  "custody",
  "custody_location",
  "disposition",
  "disposition_overridden",
  "latest_percent_rusted",
  "latest_astm_grade",
  "latest_iso_ri",
  "latest_inspected_at",
] as const;
/** Columns changed on screen, not by a file: custody moves and dispositions have their own rules and reasons. */
export const CSV_NOT_APPLIED_COLUMNS = [
  "custody",
  "custody_location",
  "disposition",
  "disposition_overridden",
] as const;
export const importQuery = z.object({
  mode: z.enum(["preview", "commit"]).default("preview"),
  /** The preview's planDigest: a commit whose plan differs (someone changed the inventory since) gets 409. */
  expect: z
    .string()
    .regex(/^[0-9a-f]{64}$/, { message: "Send the planDigest of the preview" })
    .optional(),
});
/** Body: the file's bytes as text/csv or application/octet-stream (≤ 2 MB, else 413; encoding detected), or JSON { csv }. */
export const importJsonBody = z.object({ csv: safeText().min(1, { message: "The file is empty" }).max(2_000_000) });
export const IMPORT_ACTIONS = ["create", "update", "unchanged", "problem"] as const;
export type ImportAction = (typeof IMPORT_ACTIONS)[number];
export const importRowSchema = z.object({
  /** Line in the file (the header is line 1). */
  line: z.number(),
  ok: z.boolean(),
  /** What the commit does with the row: a new position, a change of an existing one, nothing, or refuse it. */
  action: z.enum(IMPORT_ACTIONS),
  /** The existing position the row was matched to (by id, board + designation, or tag). */
  positionId: safeText().nullable(),
  matchedBy: z.enum(["id", "designation", "tag"]).nullable(),
  errors: z.record(safeText(), safeText()),
  /** Old → new, per column, for a row that changes an existing position. */
  changes: z.array(z.object({ column: safeText(), from: safeText(), to: safeText() })),
  /** Columns the file changes that an import does not apply (custody, disposition), with why. */
  ignored: z.array(z.object({ column: safeText(), from: safeText(), to: safeText(), why: safeText() })),
  /** The row as it will be written (camelCase fields), or null when it cannot be read. */
  data: z.record(safeText(), z.unknown()).nullable(),
  /** The row's cells as read from the file (decoded, guards removed), by normalised column name. */
  cells: z.record(safeText(), safeText()),
});
export type ImportRow = z.infer<typeof importRowSchema>;
export const importSummarySchema = z.object({
  rows: z.number(),
  ok: z.number(),
  failed: z.number(),
  created: z.number(),
  changed: z.number(),
  unchanged: z.number(),
  /** Boards named in the file that do not exist yet: they are created (450 V, 3-phase, 60 Hz, ungrounded defaults, grid sized to fit). */
  boardsToCreate: z.array(safeText()),
  sectionsToCreate: z.array(safeText()),
  ignoredColumns: z.array(safeText()),
  /** How the file was read: the encoding used and how it was decided, and the separator. */
  encoding: z.object({
    name: safeText(),
    how: z.enum(["byte_order_mark", "valid_utf8", "detected", "sent_as_text"]),
    confidence: z.number().nullable(),
  }),
  separator: safeText(),
  /** Columns of the file in the order read (normalised names). */
  columns: z.array(safeText()),
  /** SHA-256 of the plan; send it back as ?expect= with the commit. */
  planDigest: safeText(),
  committed: z.boolean(),
  /** How many rows the answer lists (at most 1,000: problems, changes, new, then unchanged); `rows` counts them all. */
  shown: z.number().optional(),
});
export type ImportSummary = z.infer<typeof importSummarySchema>;
/** preview → 200 this (writes nothing); commit → 201 this with committed:true. */
export const importResponse = z.object({ rows: z.array(importRowSchema), summary: importSummarySchema });
export type ImportResponse = z.infer<typeof importResponse>;
/** A commit with any bad row → 400 {error:{code:"import_invalid", message, fields:{"<line>.<column>": msg}, rows, summary}}; nothing written. */

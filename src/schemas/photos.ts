import { z } from "zod";
import { text, int, queryInt } from "./common";
import { PHOTO_KINDS } from "../domain/vocab";

const id = z.uuid({ message: "must be an id" });
const optId = id.nullable().optional();

/** Fields sent beside the file(s) of an upload (multipart text fields). */
export const uploadFields = z.object({
  kind: z.enum(PHOTO_KINDS).default("other"),
  caption: text().trim().max(500).default(""),
  boardId: id.optional(),
  positionId: id.optional(),
  componentId: id.optional(),
  defectId: id.optional(),
  inspectionId: id.optional(),
  /** A custody move the photo goes with (the quick log's "Move the part"). */
  custodyMoveId: id.optional(),
});
export type UploadFields = z.infer<typeof uploadFields>;

export const photoSchema = z.object({
  id: text(),
  siteId: text(),
  boardId: text().nullable(),
  positionId: text().nullable(),
  componentId: text().nullable(),
  defectId: text().nullable(),
  inspectionId: text().nullable(),
  custodyMoveId: text().nullable().default(null),
  kind: z.enum(PHOTO_KINDS),
  caption: text(),
  originalName: text(),
  format: text(),
  width: z.number(),
  height: z.number(),
  bytes: z.number(),
  capturedAt: text().nullable(),
  cameraModel: text(),
  uploadedBy: text().nullable(),
  uploaderName: text().nullable(),
  boardName: text().nullable(),
  designation: text().nullable(),
  createdAt: text(),
  version: z.number(),
  /** 'processing' until the background job has made the display copy and thumbnail. */
  renditionState: z.enum(["processing", "ready", "failed"]),
  renditionError: z.string().nullable(),
});
export type Photo = z.infer<typeof photoSchema>;

export const photoListQuery = z.object({
  boardId: id.optional(),
  positionId: id.optional(),
  componentId: id.optional(),
  defectId: id.optional(),
  inspectionId: id.optional(),
  custodyMoveId: id.optional(),
  kind: z.enum(PHOTO_KINDS).optional(),
  /** Only photos not yet filed to a board or position (after a shoot). */
  unassigned: z.enum(["1", "true"]).optional(),
  ids: text().max(20000).optional(),
  limit: queryInt().min(1).max(500).default(200),
  offset: queryInt().min(0).default(0),
});

export const photoPatch = z.object({
  version: int().min(1),
  kind: z.enum(PHOTO_KINDS).optional(),
  caption: text().trim().max(500).optional(),
  boardId: optId,
  positionId: optId,
  componentId: optId,
  defectId: optId,
});
export type PhotoPatch = z.infer<typeof photoPatch>;

export const bulkAssignBody = z.object({
  items: z
    .array(z.object({ photoId: id, version: int().min(1), positionId: id, kind: z.enum(PHOTO_KINDS).optional() }))
    .min(1)
    .max(200),
});
export type BulkAssign = z.infer<typeof bulkAssignBody>;

export const photoSettingsSchema = z.object({ requiredKinds: z.array(z.enum(PHOTO_KINDS)), version: z.number() });
export const photoSettingsBody = z.object({
  requiredKinds: z
    .array(z.enum(PHOTO_KINDS))
    .max(PHOTO_KINDS.length)
    .refine((a) => new Set(a).size === a.length, "list each kind once"),
  version: int().min(1),
});

export const shootListSchema = z.object({
  board: z.object({ id: text(), name: text() }),
  requiredKinds: z.array(z.enum(PHOTO_KINDS)),
  positions: z.array(
    z.object({
      id: text(),
      designation: text(),
      photoCount: z.number(),
      have: z.array(z.enum(PHOTO_KINDS)),
      missing: z.array(z.enum(PHOTO_KINDS)),
    }),
  ),
  /** Positions with every required kind; shots = required shots taken out of all required. */
  complete: z.number(),
  total: z.number(),
  shotsTaken: z.number(),
  shotsRequired: z.number(),
});
export type ShootList = z.infer<typeof shootListSchema>;

/** A position a photo can be filed to, with its current component's tag number (for filing by designation or tag). */
export const photoTargetSchema = z.object({
  positionId: text(),
  boardId: text(),
  boardName: text(),
  designation: text(),
  tagNumber: text().nullable(),
  componentId: text().nullable(),
});
export type PhotoTarget = z.infer<typeof photoTargetSchema>;

/**
 * GET /sites/:siteId/photo-targets — the site's boards a photo can be filed to, each with how many positions it has;
 * never the positions themselves (a site of 200,000 positions sent whole was tens of MB to a phone).
 */
export const photoTargetBoardsResponse = z.object({
  boards: z.array(z.object({ id: text(), name: text(), positionCount: z.number().int() })),
});
export type PhotoTargetBoard = z.infer<typeof photoTargetBoardsResponse>["boards"][number];

/** GET /sites/:siteId/boards/:boardId/photo-targets — one board's positions in board order; 404 for another site's board. */
export const boardPhotoTargetsResponse = z.object({
  board: z.object({ id: text(), name: text() }),
  targets: z.array(photoTargetSchema),
});

/**
 * POST /sites/:siteId/photo-targets/match — the positions the file names of a shoot name, matched on the server
 * (src/domain/photo-matching.ts `matchFileName` over the positions whose designation or tag is a token of the name,
 * found by index): tag numbers across the site, designations on `boardId` only when it is given.
 */
export const matchNamesBody = z.object({
  names: z.array(text().min(1).max(255)).min(1).max(500),
  boardId: id.optional(),
});
const matchResultSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.enum(["tag", "designation"]), positionId: text(), matched: text() }),
  z.object({ kind: z.literal("ambiguous"), candidates: z.array(text()), matched: text() }),
  z.object({ kind: z.literal("none") }),
]);
export const matchNamesResponse = z.object({
  /** One per name sent, in the same order. */
  matches: z.array(matchResultSchema),
  /** Every position a match or a candidate names. */
  targets: z.array(photoTargetSchema),
});

export const photoParams = z.object({ siteId: id, photoId: id });
export const boardParams = z.object({ siteId: id, boardId: id });
export const RENDITIONS = ["thumb", "display", "original"] as const;

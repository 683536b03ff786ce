import { sql } from "kysely";
import type { Insertable } from "kysely";
import type { PhotosTable, RenditionState } from "../../db/types";
import type { PhotoKind } from "../../src/domain/vocab";
import { currentComponentOfP } from "../inventory/current-component-reads";
import type { Db } from "../db";

const cols = [
  "photos.id",
  "photos.siteId",
  "photos.boardId",
  "photos.positionId",
  "photos.componentId",
  "photos.defectId",
  "photos.inspectionId",
  "photos.custodyMoveId",
  "photos.kind",
  "photos.caption",
  "photos.originalName",
  "photos.format",
  "photos.width",
  "photos.height",
  "photos.bytes",
  "photos.capturedAt",
  "photos.cameraModel",
  "photos.uploadedBy",
  "photos.createdAt",
  "photos.version",
  "photos.deletedAt",
  "photos.originalKey",
  "photos.displayKey",
  "photos.thumbKey",
  "photos.renditionState",
  "photos.renditionError",
] as const;

const base = (db: Db) =>
  db
    .selectFrom("photos")
    .leftJoin("users", "users.id", "photos.uploadedBy")
    .leftJoin("boards", "boards.id", "photos.boardId")
    .leftJoin("positions", "positions.id", "photos.positionId")
    .select([...cols, "users.name as uploaderName", "boards.name as boardName", "positions.designation"]);

export type PhotoRow = Awaited<ReturnType<typeof findPhoto>> & {};

export const findPhoto = (db: Db, siteId: string, photoId: string) =>
  base(db).where("photos.siteId", "=", siteId).where("photos.id", "=", photoId).executeTakeFirst();

export interface ListFilter {
  boardId?: string;
  positionId?: string;
  componentId?: string;
  defectId?: string;
  inspectionId?: string;
  custodyMoveId?: string;
  kind?: PhotoKind;
  unassigned?: boolean;
  ids?: string[];
  limit: number;
  offset: number;
}

export function listPhotos(db: Db, siteId: string, f: ListFilter) {
  let q = base(db).where("photos.siteId", "=", siteId).where("photos.deletedAt", "is", null);
  for (const k of [
    "boardId",
    "positionId",
    "componentId",
    "defectId",
    "inspectionId",
    "custodyMoveId",
    "kind",
  ] as const)
    if (f[k]) q = q.where(`photos.${k}`, "=", f[k] as string);
  if (f.unassigned)
    q = q
      .where("photos.positionId", "is", null)
      .where("photos.defectId", "is", null)
      .where("photos.inspectionId", "is", null);
  if (f.ids?.length) q = q.where("photos.id", "in", f.ids);
  return q.orderBy("photos.createdAt", "desc").orderBy("photos.id").limit(f.limit).offset(f.offset).execute();
}

export const insertPhoto = (db: Db, row: Insertable<PhotosTable>) =>
  db.insertInto("photos").values(row).returning("id").executeTakeFirstOrThrow();

export const updatePhoto = (
  db: Db,
  siteId: string,
  photoId: string,
  version: number,
  patch: Partial<Insertable<PhotosTable>>,
) =>
  db
    .updateTable("photos")
    .set({ ...patch, version: sql`version + 1`, updatedAt: sql`now()` } as never)
    .where("siteId", "=", siteId)
    .where("id", "=", photoId)
    .where("version", "=", version)
    .where("deletedAt", "is", null)
    .returning("id")
    .executeTakeFirst();

/** The board/position/component a target id belongs to, checked against the site. */
export const findPositionTarget = (db: Db, siteId: string, positionId: string) =>
  db
    .selectFrom("positions")
    .select(["id as positionId", "boardId"])
    .where("siteId", "=", siteId)
    .where("id", "=", positionId)
    .executeTakeFirst();
export const findBoard = (db: Db, siteId: string, boardId: string) =>
  db
    .selectFrom("boards")
    .select(["id", "name"])
    .where("siteId", "=", siteId)
    .where("id", "=", boardId)
    .executeTakeFirst();
export const findComponentTarget = (db: Db, siteId: string, componentId: string) =>
  db
    .selectFrom("components")
    .innerJoin("positions", "positions.id", "components.positionId")
    .select(["components.id as componentId", "components.positionId", "positions.boardId"])
    .where("components.siteId", "=", siteId)
    .where("components.id", "=", componentId)
    .executeTakeFirst();
export const findDefectTarget = (db: Db, siteId: string, defectId: string) =>
  db
    .selectFrom("defects")
    .select(["id as defectId", "boardId", "positionId", "componentId"])
    .where("siteId", "=", siteId)
    .where("id", "=", defectId)
    .executeTakeFirst();
export const findInspectionTarget = (db: Db, siteId: string, inspectionId: string) =>
  db
    .selectFrom("inspections")
    .innerJoin("positions", "positions.id", "inspections.positionId")
    .select([
      "inspections.id as inspectionId",
      "inspections.componentId",
      "inspections.positionId",
      "positions.boardId",
      "inspections.inspectorId",
    ])
    .where("inspections.siteId", "=", siteId)
    .where("inspections.id", "=", inspectionId)
    .executeTakeFirst();

export const findCustodyMoveTarget = (db: Db, siteId: string, custodyMoveId: string) =>
  db
    .selectFrom("custodyMoves as m")
    .innerJoin("components as c", "c.id", "m.componentId")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .select(["m.id as custodyMoveId", "m.componentId", "c.positionId", "p.boardId", "m.movedBy"])
    .where("m.siteId", "=", siteId)
    .where("m.id", "=", custodyMoveId)
    .executeTakeFirst();

/**
 * The site's boards with how many positions each has (the sum of the board's kept summary "positions" rows, kept
 * current by the inventory's writes): what the photo pages offer first. Grows with boards, never positions.
 */
export const listTargetBoards = (db: Db, siteId: string) =>
  db
    .selectFrom("boards as b")
    .select(["b.id", "b.name"])
    .select((eb) =>
      eb
        .selectFrom("boardSummaries as s")
        .select(sql<number>`coalesce(sum(s.n), 0)::int`.as("n"))
        .whereRef("s.boardId", "=", "b.id")
        .where("s.facet", "=", "positions")
        .as("positionCount"),
    )
    .where("b.siteId", "=", siteId)
    .orderBy("b.name")
    .execute();

const targetColumns = [
  "p.id as positionId",
  "p.boardId",
  "b.name as boardName",
  "p.designation",
  "c.tagNumber",
  "c.id as componentId",
] as const;

/**
 * One board's positions in board order (as the shoot list), each with its current component's tag number, read by
 * key (`currentComponentOfP`), never a hash of the site's components.
 */
export const boardTargetsQuery = (db: Db, boardId: string) =>
  db
    .selectFrom("positions as p")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .leftJoinLateral(
      () => currentComponentOfP(["c.id", "c.tagNumber"]),
      (j) => j.onTrue(),
    )
    .select(targetColumns)
    .where("p.boardId", "=", boardId)
    .orderBy("p.sortOrder")
    .orderBy("p.gridRow")
    .orderBy("p.gridCol")
    .orderBy("p.designation");
export const boardTargets = (db: Db, boardId: string) => boardTargetsQuery(db, boardId).execute();

/**
 * The positions a shoot's file names could name: those whose designation (on `boardId` only, when given) or whose
 * current component's tag number is one of `tokens` once normalised (name_token(), migration 2026_12_13_0600; both
 * lookups served by its indexes, so the cost follows the tokens and their matches, not the site's size).
 */
export const targetsNamedQuery = (db: Db, siteId: string, tokens: string[], boardId?: string) => {
  const byDesignation = db
    .selectFrom("positions as p")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .leftJoinLateral(
      () => currentComponentOfP(["c.id", "c.tagNumber"]),
      (j) => j.onTrue(),
    )
    .select(targetColumns)
    .where("p.siteId", "=", siteId)
    .where(sql<boolean>`name_token(p.designation) = any(${tokens}::text[])`)
    .$if(!!boardId, (q) => q.where("p.boardId", "=", boardId!));
  const byTag = db
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .select(targetColumns)
    .where("c.siteId", "=", siteId)
    .where("c.retiredAt", "is", null)
    .where("c.tagNumber", "is not", null)
    .where(sql<boolean>`name_token(c.tag_number) = any(${tokens}::text[])`);
  return byDesignation.union(byTag);
};
export const targetsNamed = (db: Db, siteId: string, tokens: string[], boardId?: string) =>
  targetsNamedQuery(db, siteId, tokens, boardId).execute();

export const getSettings = (db: Db, siteId: string) =>
  db.selectFrom("photoSettings").select(["requiredKinds", "version"]).where("siteId", "=", siteId).executeTakeFirst();

export const upsertSettings = (db: Db, siteId: string, requiredKinds: PhotoKind[], version: number) =>
  db
    .insertInto("photoSettings")
    .values({ siteId, requiredKinds, version: version + 1 }) // the unsaved default counts as version 1
    .onConflict((oc) =>
      oc
        .column("siteId")
        .doUpdateSet({ requiredKinds, version: sql`photo_settings.version + 1`, updatedAt: sql`now()` } as never)
        .where("photoSettings.version", "=", version),
    )
    .returning(["requiredKinds", "version"])
    .executeTakeFirst();

/** Per position of the board: which kinds it has live photos of, and how many photos. */
export const boardPositionKinds = (db: Db, siteId: string, boardId: string) =>
  db
    .selectFrom("positions")
    .leftJoin("photos", (j) => j.onRef("photos.positionId", "=", "positions.id").on("photos.deletedAt", "is", null))
    .select([
      "positions.id",
      "positions.designation",
      sql<PhotoKind[]>`coalesce(array_agg(DISTINCT photos.kind) FILTER (WHERE photos.id IS NOT NULL), '{}')`.as(
        "kinds",
      ),
      sql<number>`count(photos.id)::int`.as("photoCount"),
    ])
    .where("positions.siteId", "=", siteId)
    .where("positions.boardId", "=", boardId)
    .groupBy(["positions.id", "positions.designation", "positions.sortOrder", "positions.gridRow", "positions.gridCol"])
    .orderBy("positions.sortOrder")
    .orderBy("positions.gridRow")
    .orderBy("positions.gridCol")
    .execute();

export const allPhotoKeys = (db: Db) =>
  db
    .selectFrom("photos")
    .select(["id", "siteId", "originalKey", "displayKey", "thumbKey", "deletedAt", "renditionState"])
    .execute();

export const expiredDeleted = (db: Db, before: Date) =>
  db
    .selectFrom("photos")
    .select(["id", "siteId", "originalKey", "displayKey", "thumbKey"])
    .where("deletedAt", "<", before)
    .execute();

export const deletePhotoRow = (db: Db, photoId: string) => db.deleteFrom("photos").where("id", "=", photoId).execute();

/** Photos still processing that were uploaded before `before`, oldest first (the stranded-rendition sweep's candidates). */
export const processingSince = (db: Db, before: Date, limit: number) =>
  db
    .selectFrom("photos")
    .select(["id"])
    .where("renditionState", "=", "processing")
    .where("createdAt", "<", before)
    .orderBy("createdAt")
    .limit(limit)
    .execute();

/** Marks a photo failed only while it still says processing; rows changed (0 when its job finished meanwhile). */
export const failProcessing = async (db: Db, id: string, error: string) =>
  Number(
    (
      await db
        .updateTable("photos")
        .set({ renditionState: "failed", renditionError: error })
        .where("id", "=", id)
        .where("renditionState", "=", "processing")
        .executeTakeFirst()
    ).numUpdatedRows,
  );

/** Written by the rendition job only. */
export const setRenditionState = (db: Db, id: string, state: RenditionState, error: string | null) =>
  db.updateTable("photos").set({ renditionState: state, renditionError: error }).where("id", "=", id).execute();

/** A live nameplate photo of the site (its thumbnail's key), or undefined. */
export const findNameplate = (db: Db, siteId: string, photoId: string) =>
  db
    .selectFrom("photos")
    .select(["id", "thumbKey"])
    .where("id", "=", photoId)
    .where("siteId", "=", siteId)
    .where("kind", "=", "nameplate")
    .where("deletedAt", "is", null)
    .executeTakeFirst();

/** Whether the defect was raised, is held or was repaired by this person (a volunteer's photo target). */
export const defectTouchedBy = async (db: Db, defectId: string, userId: string) =>
  !!(await db
    .selectFrom("defects")
    .select("id")
    .where("id", "=", defectId)
    .where((eb) => eb.or([eb("createdBy", "=", userId), eb("assigneeId", "=", userId), eb("repairedBy", "=", userId)]))
    .executeTakeFirst());

/** Marks a photo deleted (kept for the retention period, then purged). */
export const softDeletePhoto = (db: Db, photoId: string) =>
  db.updateTable("photos").set({ deletedAt: new Date() }).where("id", "=", photoId).execute();

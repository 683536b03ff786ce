import type { RENDITIONS } from "../../src/schemas/photos";
import type { Readable } from "node:stream";
import { matchFileName, nameTokens } from "../../src/domain/photo-matching";
import type { Db } from "../db";
import { AppError, notFound } from "../errors";
import * as repo from "./repository";
import { toPhoto } from "./service";
import { StorageNotFound, type PhotoStorage } from "./storage";

/** The reads of the photos domain: lists, one photo, and the bytes of one of its copies. */

export const listPhotos = async (db: Db, siteId: string, filter: repo.ListFilter) =>
  (await repo.listPhotos(db, siteId, filter)).map(toPhoto);

/** The boards a photo may be filed to, each with its count of positions (never the positions: see boardTargetsOf). */
export const targetBoardsOf = (db: Db, siteId: string) => repo.listTargetBoards(db, siteId);

/** One board's positions a photo may be filed to; 404 when the board is not this site's. */
export async function boardTargetsOf(db: Db, siteId: string, boardId: string) {
  const board = await repo.findBoard(db, siteId, boardId);
  if (!board) throw notFound("That board");
  return { board, targets: await repo.boardTargets(db, boardId) };
}

const byBoardThenDesignation = (
  a: { boardName: string; designation: string },
  b: { boardName: string; designation: string },
) =>
  a.boardName.localeCompare(b.boardName, "en") || a.designation.localeCompare(b.designation, "en", { numeric: true });

/** Unique tokens a request may look up at once (500 names of ordinary length give a few thousand). */
const MAX_TOKENS = 20_000;

/**
 * Which position each file name names (`matchFileName`, the same rules the client once ran over every position of
 * the site), over only the positions whose designation or tag is a token of some name: one index-served statement.
 */
export async function matchNames(db: Db, siteId: string, names: string[], boardId?: string) {
  if (boardId && !(await repo.findBoard(db, siteId, boardId))) throw notFound("That board");
  const tokens = [...new Set(names.flatMap((n) => nameTokens(n)))];
  if (tokens.length > MAX_TOKENS)
    throw new AppError(400, "too_many_tokens", "Those file names are too long to match at once; send fewer.", {
      names: "Too long to match at once",
    });
  // In the order the photo pages list positions (board, then designation), so an ambiguous name quotes the same
  // token whatever order the statement returned its rows in.
  const targets = (tokens.length ? await repo.targetsNamed(db, siteId, tokens, boardId) : []).sort(
    byBoardThenDesignation,
  );
  const matches = names.map((n) => matchFileName(n, targets, boardId));
  const named = new Set(
    matches.flatMap((m) => (m.kind === "none" ? [] : m.kind === "ambiguous" ? m.candidates : [m.positionId])),
  );
  return { matches, targets: targets.filter((t) => named.has(t.positionId)) };
}

async function liveRow(db: Db, siteId: string, photoId: string) {
  const row = await repo.findPhoto(db, siteId, photoId);
  if (!row || row.deletedAt) throw notFound("That photo");
  return row;
}

export const photoOf = async (db: Db, siteId: string, photoId: string) => toPhoto(await liveRow(db, siteId, photoId));

/**
 * One copy of a photo as a stream, with what the answer's headers need. 409 while the display
 * copy and thumbnail are still being made (or could not be); 404 when the file is gone from storage.
 */
export async function renditionOf(
  db: Db,
  storage: PhotoStorage,
  siteId: string,
  photoId: string,
  rendition: (typeof RENDITIONS)[number],
) {
  const row = await liveRow(db, siteId, photoId);
  if (rendition !== "original" && row.renditionState !== "ready")
    throw new AppError(
      409,
      row.renditionState === "failed" ? "rendition_failed" : "processing",
      row.renditionState === "failed"
        ? `This photo could not be processed: ${row.renditionError ?? "unknown reason"}`
        : "This photo is still being processed; its copies appear in a moment.",
    );
  const key = rendition === "original" ? row.originalKey : rendition === "display" ? row.displayKey : row.thumbKey;
  try {
    return { body: await storage.get(key), format: row.format, originalName: row.originalName };
  } catch (e) {
    if (e instanceof StorageNotFound)
      throw new AppError(
        404,
        "file_missing",
        "The picture's file is missing from storage; run the photo cleanup report.",
      );
    throw e;
  }
}

/** The thumbnail of a live nameplate photo of the site, or null (no such photo, or its file is missing). */
export async function nameplateThumb(
  db: Db,
  storage: PhotoStorage,
  siteId: string,
  photoId: string,
): Promise<Readable | null> {
  const photo = await repo.findNameplate(db, siteId, photoId);
  if (!photo) return null;
  try {
    return await storage.get(photo.thumbKey);
  } catch (e) {
    if (e instanceof StorageNotFound) return null;
    throw e;
  }
}

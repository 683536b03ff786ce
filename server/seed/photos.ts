/**
 * Demo photos for MV Kestrel Lantern (invented). They are DRAWINGS rendered by sharp
 * from SVG, each labelled "Drawing — not a photograph", so nobody mistakes them for a
 * record of real equipment. Filed to a few positions of the main and emergency boards,
 * with an as-found and an after-work drawing of one position for the before/after view.
 */
import { randomUUID } from "node:crypto";
import type { Kysely } from "kysely";
import sharp from "sharp";
import type { Database } from "../../db/types";
import type { PhotoKind } from "../../src/domain/vocab";
import { PHOTO_KIND_LABELS } from "../../src/domain/vocab";
import { processImage } from "../photos/images";
import { photoKey, storageFromEnv, type PhotoStorage } from "../photos/storage";
import type { SeedContext } from "./context";
import { onSiteClock } from "./clock";

const SHOTS: Array<{ board: string; designation: string; kind: PhotoKind; caption: string; day: number }> = [
  {
    board: "Main",
    designation: "1-1",
    kind: "as_found",
    caption: "Front as found: silt line across the escutcheon (drawing)",
    day: 3,
  },
  { board: "Main", designation: "1-1", kind: "nameplate", caption: "Nameplate (drawing)", day: 3 },
  { board: "Main", designation: "1-1", kind: "after_work", caption: "Front after cleaning (drawing)", day: 12 },
  { board: "Main", designation: "1-2", kind: "as_found", caption: "Front as found (drawing)", day: 3 },
  { board: "Main", designation: "1-3", kind: "damage", caption: "Corroded terminal lug, line side (drawing)", day: 4 },
  {
    board: "Emergency",
    designation: "EG",
    kind: "as_found",
    caption: "Emergency generator breaker as found (drawing)",
    day: 5,
  },
];

const esc = (s: string) => s.replace(/[&<>"]/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;" })[c]!);

/** A breaker face drawn in SVG; the silt line is drawn for as-found, not for after-work. */
function drawing(designation: string, kind: PhotoKind) {
  const silt =
    kind === "after_work" ? "" : `<rect x="0" y="430" width="1200" height="470" fill="#6b5a3a" opacity="0.55"/>`;
  const rust = kind === "damage" ? `<circle cx="600" cy="610" r="90" fill="#8a3b12" opacity="0.8"/>` : "";
  return Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="1200" height="900" viewBox="0 0 1200 900">
    <rect width="1200" height="900" fill="#2b3238"/>
    <rect x="380" y="120" width="440" height="660" rx="24" fill="#15191c" stroke="#9aa4ab" stroke-width="6"/>
    <rect x="560" y="300" width="80" height="200" rx="10" fill="#c9c2b0"/>
    <rect x="470" y="560" width="260" height="70" fill="#d8d0b8"/>
    ${rust}${silt}
    <text x="600" y="600" font-family="sans-serif" font-size="36" text-anchor="middle" fill="#222">${esc(designation)}</text>
    <text x="600" y="80" font-family="sans-serif" font-size="44" text-anchor="middle" fill="#f0cd80">DRAWING — NOT A PHOTOGRAPH</text>
    <text x="600" y="860" font-family="sans-serif" font-size="34" text-anchor="middle" fill="#edf2f5">${esc(`${designation} · ${PHOTO_KIND_LABELS[kind]} · Tideline demo`)}</text>
  </svg>`);
}

export async function seedPhotos(db: Kysely<Database>, ctx: SeedContext, storage: PhotoStorage = storageFromEnv()) {
  const photographer = ctx.people["photographer@tideline.test"] ?? null;
  const positions = await db
    .selectFrom("positions")
    .innerJoin("boards", "boards.id", "positions.boardId")
    .select(["positions.id", "positions.designation", "positions.boardId", "boards.name"])
    .where("positions.siteId", "=", ctx.siteId)
    .execute();
  for (const shot of SHOTS) {
    const pos = positions.find((p) => p.designation === shot.designation && p.name.startsWith(shot.board));
    if (!pos) continue;
    const jpeg = await sharp(drawing(shot.designation, shot.kind)).jpeg({ quality: 85 }).toBuffer();
    const img = await processImage(jpeg, `${shot.designation}-${shot.kind}.jpg`);
    const id = randomUUID();
    const keys = {
      originalKey: photoKey(ctx.siteId, id, "original", img.ext),
      displayKey: photoKey(ctx.siteId, id, "display", "jpg"),
      thumbKey: photoKey(ctx.siteId, id, "thumb", "jpg"),
    };
    const at = onSiteClock(2026, 10, shot.day, 10);
    await db
      .insertInto("photos")
      .values({
        id,
        siteId: ctx.siteId,
        boardId: pos.boardId,
        positionId: pos.id,
        kind: shot.kind,
        caption: shot.caption,
        originalName: `${shot.designation}-${shot.kind}-drawing.jpg`,
        format: img.format,
        width: img.width,
        height: img.height,
        bytes: jpeg.length,
        capturedAt: at,
        cameraModel: "",
        uploadedBy: photographer,
        createdAt: at,
        updatedAt: at,
        ...keys,
      })
      .execute();
    await storage.put(keys.originalKey, jpeg, img.mime);
    await storage.put(keys.displayKey, img.display, "image/jpeg");
    await storage.put(keys.thumbKey, img.thumb, "image/jpeg");
  }
}

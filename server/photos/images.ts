/**
 * From uploaded bytes to what Tideline stores: the type decided from the bytes (sharp's
 * metadata, never the name or the declared type), capture facts read before anything is
 * stripped, and two upright JPEG renditions without any metadata (no EXIF, no GPS, no ICC).
 * Facts about sharp 0.35.5 used here are in STACK.md "Photos".
 */
import exifr from "exifr";
import sharp, { type Metadata, type Sharp } from "sharp";
import { AppError } from "../errors";
import { decodeHeicOneAtATime } from "./heic-queue";

/** Refuse decompression bombs: 100 megapixels is well above any phone or DSLR (~50 MP). */
export const MAX_INPUT_PIXELS = 100_000_000;
export const THUMB_PX = 320;
export const DISPLAY_PX = 1600;

/** sharp's format names we accept; SVG, GIF, AVIF-as-named, PDF and the rest are refused. */
const ALLOWED = new Set(["jpeg", "png", "webp", "tiff", "heif"]);
const MIME: Record<string, string> = { jpeg: "image/jpeg", png: "image/png", webp: "image/webp", tiff: "image/tiff", heif: "image/heif" };
const EXT: Record<string, string> = { jpeg: "jpg", png: "png", webp: "webp", tiff: "tif", heif: "heic" };

export interface ProcessedImage {
  format: string;
  mime: string;
  ext: string;
  /** Upright width and height of the original (after EXIF orientation). */
  width: number;
  height: number;
  capturedAt: Date | null;
  cameraModel: string;
  display: Buffer;
  thumb: Buffer;
}

const refuse = (status: number, code: string, name: string, why: string) =>
  new AppError(status, code, `${name}: ${why}`, { file: why });

async function readMetadata(buf: Buffer, name: string) {
  if (buf.length === 0) throw refuse(400, "empty_file", name, "the file is empty.");
  try {
    return await sharp(buf, { limitInputPixels: MAX_INPUT_PIXELS }).metadata();
  } catch (e) {
    const msg = (e as Error).message;
    if (/pixel limit/i.test(msg)) throw bomb(name);
    if (/unsupported image format/i.test(msg))
      throw refuse(415, "unsupported_type", name, "this is not a picture Tideline accepts (JPEG, PNG, WebP, HEIC/HEIF or TIFF).");
    throw refuse(400, "unreadable_image", name, "the picture could not be read; it may be damaged or cut short.");
  }
}

const bomb = (name: string) =>
  refuse(413, "too_many_pixels", name, `the picture has more than ${MAX_INPUT_PIXELS / 1e6} megapixels; Tideline refuses it (a decompression bomb or a panorama too large to handle).`);

/** Capture time and camera model from EXIF, read from the original before stripping. */
async function captureFacts(buf: Buffer): Promise<{ capturedAt: Date | null; cameraModel: string }> {
  try {
    const tags = await exifr.parse(buf, { pick: ["DateTimeOriginal", "CreateDate", "Make", "Model"] });
    const when = tags?.DateTimeOriginal ?? tags?.CreateDate;
    const capturedAt = when instanceof Date && !Number.isNaN(when.getTime()) ? when : null;
    const model = [tags?.Make, tags?.Model].filter((x) => typeof x === "string" && x.trim()).join(" ").trim();
    return { capturedAt, cameraModel: model.slice(0, 200) };
  } catch {
    return { capturedAt: null, cameraModel: "" };
  }
}

/** A sharp input for the pixels: phone HEIC (HEVC) goes through heic-decode first. */
async function pixelSource(buf: Buffer, meta: Metadata) {
  if (meta.format === "heif" && meta.compression === "hevc") {
    const d = await decodeHeicOneAtATime(buf).catch(() => {
      throw refuse(400, "unreadable_image", "HEIC", "this HEIC picture could not be decoded; it may be damaged.");
    });
    return () => sharp(Buffer.from(d.data.buffer, d.data.byteOffset, d.data.byteLength), { raw: { width: d.width, height: d.height, channels: 4 }, limitInputPixels: MAX_INPUT_PIXELS });
  }
  return () => sharp(buf, { limitInputPixels: MAX_INPUT_PIXELS });
}

async function render(make: () => Sharp, px: number, name: string): Promise<Buffer> {
  try {
    // rotate() applies the EXIF orientation; sharp writes no EXIF/XMP/ICC unless asked
    // (STACK.md "Photos"). JPEG rather than WebP so any EXIF reader can check the result.
    return await make().rotate().resize({ width: px, height: px, fit: "inside", withoutEnlargement: true }).jpeg({ quality: 82, mozjpeg: true }).toBuffer();
  } catch (e) {
    const msg = (e as Error).message;
    if (/pixel limit/i.test(msg)) throw bomb(name);
    throw refuse(400, "truncated_image", name, "the picture is damaged or cut short (the upload may have been interrupted); try it again.");
  }
}

export async function processImage(buf: Buffer, name: string): Promise<ProcessedImage> {
  const meta = await readMetadata(buf, name);
  const format = meta.format ?? "";
  if (!ALLOWED.has(format))
    throw refuse(415, "unsupported_type", name, `${format.toUpperCase() || "this"} is not accepted; upload JPEG, PNG, WebP, HEIC/HEIF or TIFF.`);
  if ((meta.width ?? 0) * (meta.height ?? 0) > MAX_INPUT_PIXELS) throw bomb(name);
  const make = await pixelSource(buf, meta);
  const display = await render(make, DISPLAY_PX, name);
  const thumb = await render(make, THUMB_PX, name);
  const sideways = (meta.orientation ?? 1) >= 5;
  const facts = await captureFacts(buf);
  return {
    format,
    mime: MIME[format],
    ext: EXT[format],
    width: sideways ? meta.height! : meta.width!,
    height: sideways ? meta.width! : meta.height!,
    ...facts,
    display,
    thumb,
  };
}

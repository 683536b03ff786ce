/**
 * From uploaded bytes to what Tideline stores: the type decided from the bytes (sharp's
 * metadata, never the name or the declared type), capture facts read before anything is
 * stripped, and two upright JPEG renditions without any metadata (no EXIF, no GPS, no ICC).
 * Facts about sharp are those of its documentation for 0.35.5, the pinned version.
 */
import { open, readFile, stat } from "node:fs/promises";
import exifr from "exifr";
import sharp, { type Sharp } from "sharp";
import { AppError } from "../errors";
import { decodeHeicOneAtATime } from "./heic-queue";

/** Refuse decompression bombs: 100 megapixels is well above any phone or DSLR (~50 MP). */
export const MAX_INPUT_PIXELS = 100_000_000;
export const THUMB_PX = 320;
export const DISPLAY_PX = 1600;

/** sharp's format names we accept; SVG, GIF, AVIF-as-named, PDF and the rest are refused. */
const ALLOWED = new Set(["jpeg", "png", "webp", "tiff", "heif"]);
const MIME: Record<string, string> = {
  jpeg: "image/jpeg",
  png: "image/png",
  webp: "image/webp",
  tiff: "image/tiff",
  heif: "image/heif",
};
const EXT: Record<string, string> = { jpeg: "jpg", png: "png", webp: "webp", tiff: "tif", heif: "heic" };

/** What the upload learns from the file without decoding its pixels. */
export interface ImageFacts {
  format: string;
  mime: string;
  ext: string;
  /** Upright width and height of the original (after EXIF orientation). */
  width: number;
  height: number;
  capturedAt: Date | null;
  cameraModel: string;
  /** Phone HEIC (HEVC): decoded by heic-decode, since sharp's libvips cannot. */
  hevc: boolean;
}

export interface ProcessedImage extends ImageFacts {
  display: Buffer;
  thumb: Buffer;
}

/** A file path (an upload streamed to disk) or bytes. */
type Source = string | Buffer;

const refuse = (status: number, code: string, name: string, why: string) =>
  new AppError(status, code, `${name}: ${why}`, { file: why });

async function readMetadata(src: Source, name: string) {
  if (typeof src !== "string" && src.length === 0) throw refuse(400, "empty_file", name, "the file is empty.");
  if (typeof src === "string" && (await stat(src)).size === 0)
    throw refuse(400, "empty_file", name, "the file is empty.");
  try {
    return await sharp(src, { limitInputPixels: MAX_INPUT_PIXELS }).metadata();
  } catch (e) {
    const msg = (e as Error).message;
    if (/pixel limit/i.test(msg)) throw bomb(name);
    if (/unsupported image format/i.test(msg))
      throw refuse(
        415,
        "unsupported_type",
        name,
        "this is not a picture Tideline accepts (JPEG, PNG, WebP, HEIC/HEIF or TIFF).",
      );
    throw refuse(400, "unreadable_image", name, "the picture could not be read; it may be damaged or cut short.");
  }
}

const bomb = (name: string) =>
  refuse(
    413,
    "too_many_pixels",
    name,
    `the picture has more than ${MAX_INPUT_PIXELS / 1e6} megapixels; Tideline refuses it (a decompression bomb or a panorama too large to handle).`,
  );

/** Capture time and camera model from EXIF, read from the original before stripping. */
async function captureFacts(src: Source): Promise<{ capturedAt: Date | null; cameraModel: string }> {
  try {
    const tags = await exifr.parse(src, { pick: ["DateTimeOriginal", "CreateDate", "Make", "Model"] });
    const when = tags?.DateTimeOriginal ?? tags?.CreateDate;
    const capturedAt = when instanceof Date && !Number.isNaN(when.getTime()) ? when : null;
    const model = [tags?.Make, tags?.Model]
      .filter((x) => typeof x === "string" && x.trim())
      .join(" ")
      .trim();
    return { capturedAt, cameraModel: model.slice(0, 200) };
  } catch {
    return { capturedAt: null, cameraModel: "" };
  }
}

/** The file's last bytes (at most 64), for `looksComplete`; null when they cannot be read. */
async function lastBytes(src: Source): Promise<Buffer | null> {
  if (typeof src !== "string") return src.subarray(Math.max(0, src.length - 64));
  try {
    const fh = await open(src, "r");
    try {
      const size = (await fh.stat()).size;
      const n = Math.min(size, 64);
      const tail = Buffer.alloc(n);
      await fh.read(tail, 0, n, size - n);
      return tail;
    } finally {
      await fh.close();
    }
  } catch {
    return null;
  }
}

/**
 * The last bytes of the file: a JPEG ends with the EOI marker FF D9 (ITU-T T.81 §B.2.1), a
 * PNG with its IEND chunk (PNG 2nd ed. §11.2.5). Missing, the upload was cut short; this
 * is checked at upload without decoding, so an interrupted transfer is refused at once.
 */
function looksComplete(tail: Buffer | null, format: string): boolean {
  if (format !== "jpeg" && format !== "png") return true;
  if (!tail) return false;
  if (format === "png") return tail.includes(Buffer.from("IEND", "ascii"));
  // Some cameras pad after EOI; look for it among the last bytes.
  for (let i = tail.length - 2; i >= 0; i--) if (tail[i] === 0xff && tail[i + 1] === 0xd9) return true;
  return false;
}

/**
 * Refusals come here, before anything is stored: type from the bytes, pixel limit, a cut-off file.
 * The header, the last bytes and EXIF are read at once (three trips to libuv's pool side by side
 * rather than one after another); the refusals keep their order.
 */
export async function inspectImage(src: Source, name: string): Promise<ImageFacts> {
  const [meta, tail, capture] = await Promise.all([readMetadata(src, name), lastBytes(src), captureFacts(src)]);
  const format = meta.format ?? "";
  if (!ALLOWED.has(format))
    throw refuse(
      415,
      "unsupported_type",
      name,
      `${format.toUpperCase() || "this"} is not accepted; upload JPEG, PNG, WebP, HEIC/HEIF or TIFF.`,
    );
  if ((meta.width ?? 0) * (meta.height ?? 0) > MAX_INPUT_PIXELS) throw bomb(name);
  if (!looksComplete(tail, format))
    throw refuse(
      400,
      "truncated_image",
      name,
      "the picture is damaged or cut short (the upload may have been interrupted); try it again.",
    );
  const sideways = (meta.orientation ?? 1) >= 5;
  return {
    format,
    mime: MIME[format],
    ext: EXT[format],
    width: sideways ? meta.height! : meta.width!,
    height: sideways ? meta.width! : meta.height!,
    hevc: format === "heif" && meta.compression === "hevc",
    ...capture,
  };
}

/**
 * A sharp input for the pixels: phone HEIC (HEVC) goes through heic-decode first. A path is read by
 * libvips itself, in its own thread (the rendition job on the disk store).
 */
async function pixelSource(src: Source, hevc: boolean): Promise<Sharp> {
  if (hevc) {
    const buf = typeof src === "string" ? await readFile(src) : src;
    const d = await decodeHeicOneAtATime(buf).catch(() => {
      throw refuse(400, "unreadable_image", "HEIC", "this HEIC picture could not be decoded; it may be damaged.");
    });
    return sharp(Buffer.from(d.data.buffer, d.data.byteOffset, d.data.byteLength), {
      raw: { width: d.width, height: d.height, channels: 4 },
      limitInputPixels: MAX_INPUT_PIXELS,
    });
  }
  return sharp(src, { limitInputPixels: MAX_INPUT_PIXELS });
}

const box = (px: number) => ({ width: px, height: px, fit: "inside" as const, withoutEnlargement: true });

/**
 * The two renditions, decoding the original once: the display copy from the original
 * (rotate() applies the EXIF orientation; sharp writes no EXIF/XMP/ICC unless asked), the thumbnail from the display copy (already upright, 1600 px is
 * plenty for 320). Plain libjpeg for the display copy: mozjpeg about doubles its encode
 * time for a smaller file nobody waits on; the thumbnail, sent to
 * every phone in a gallery, keeps mozjpeg's smaller output at a tiny cost.
 * JPEG rather than WebP so any EXIF reader can check the result.
 * Two steps, so the rendition job can store the display copy while the thumbnail is encoded.
 */
export async function renderDisplay(original: Source, facts: Pick<ImageFacts, "hevc">, name: string): Promise<Buffer> {
  return renditionErrors(name, async () =>
    (await pixelSource(original, facts.hevc)).rotate().resize(box(DISPLAY_PX)).jpeg({ quality: 82 }).toBuffer(),
  );
}

/** The thumbnail, from the display copy renderDisplay made. */
export async function renderThumb(display: Buffer, name: string): Promise<Buffer> {
  return renditionErrors(name, () =>
    sharp(display).resize(box(THUMB_PX)).jpeg({ quality: 82, mozjpeg: true }).toBuffer(),
  );
}

/** A picture that cannot be decoded is a refusal (AppError: trying again will not help). */
async function renditionErrors<T>(name: string, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (e) {
    if (e instanceof AppError) throw e;
    const msg = (e as Error).message;
    if (/pixel limit/i.test(msg)) throw bomb(name);
    // A stored original that is not there (yet, or any more) is the store's matter, not the picture's.
    if (typeof e === "object" && e && "code" in e) throw e;
    if (/input file is missing/i.test(msg)) throw e;
    throw refuse(
      400,
      "truncated_image",
      name,
      "the picture is damaged or cut short (the upload may have been interrupted); try it again.",
    );
  }
}

/** Both renditions, one after the other (the demo seed and tests). */
export async function renderRenditions(
  original: Buffer,
  facts: Pick<ImageFacts, "hevc">,
  name: string,
): Promise<{ display: Buffer; thumb: Buffer }> {
  const display = await renderDisplay(original, facts, name);
  return { display, thumb: await renderThumb(display, name) };
}

/** Facts and renditions at once, from bytes (the demo seed). */
export async function processImage(buf: Buffer, name: string): Promise<ProcessedImage> {
  const facts = await inspectImage(buf, name);
  return { ...facts, ...(await renderRenditions(buf, facts, name)) };
}

import { deflateSync, crc32 } from "node:zlib";
import sharp from "sharp";
import type { Db } from "../../server/db";

/**
 * A 400×200 JPEG stored sideways: red on the left half, blue on the right, with EXIF
 * orientation 6 ("rotate 90° clockwise to view", EXIF 2.32 §4.6.4 tag 0x0112), a camera
 * model, a capture time and GPS tags. Upright it is 200×400 with red on top.
 */
export async function sidewaysJpegWithGps() {
  const red = await sharp({ create: { width: 200, height: 200, channels: 3, background: "#d00000" } })
    .png()
    .toBuffer();
  return sharp({ create: { width: 400, height: 200, channels: 3, background: "#0000d0" } })
    .composite([{ input: red, left: 0, top: 0 }])
    .withExif({
      IFD0: { Make: "Testcam", Model: "Deckhand 7" },
      IFD2: { DateTimeOriginal: "2026:11:03 09:41:07" },
      IFD3: {
        GPSLatitudeRef: "N",
        GPSLatitude: "51/1 30/1 1234/100",
        GPSLongitudeRef: "W",
        GPSLongitude: "3/1 10/1 0/1",
      },
    })
    .withMetadata({ orientation: 6 })
    .jpeg({ quality: 90 })
    .toBuffer();
}

/** A noisy picture, so a JPEG of it is large enough to cut in half meaningfully. */
export async function noisyJpeg(width = 640, height = 480) {
  const raw = Buffer.alloc(width * height * 3);
  for (let i = 0; i < raw.length; i++) raw[i] = (i * 2654435761) >>> 24;
  return sharp(raw, { raw: { width, height, channels: 3 } })
    .jpeg({ quality: 92 })
    .toBuffer();
}

export const plainPng = (color = "#2a7") =>
  sharp({ create: { width: 64, height: 48, channels: 3, background: color } })
    .png()
    .toBuffer();

/**
 * A valid PNG whose header claims 30 000 × 30 000 pixels (900 MP) but whose data is a
 * few bytes: a decompression bomb's shape. Chunk layout and CRC per the PNG spec (W3C
 * PNG 2nd ed., §5.3 and §11.2.2).
 */
export function pngPixelBomb(width = 30000, height = 30000) {
  const chunk = (type: string, data: Buffer) => {
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const td = Buffer.concat([Buffer.from(type, "ascii"), data]);
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(crc32(td) >>> 0);
    return Buffer.concat([len, td, crc]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 0; // greyscale
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk("IHDR", ihdr),
    chunk("IDAT", deflateSync(Buffer.alloc(width + 1))),
    chunk("IEND", Buffer.alloc(0)),
  ]);
}

export function form(files: Array<{ name: string; data: Buffer; type?: string }>, fields: Record<string, string> = {}) {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) fd.append(k, v);
  for (const f of files)
    fd.append("files", new Blob([new Uint8Array(f.data)], { type: f.type ?? "image/jpeg" }), f.name);
  return fd;
}

/** A board with positions (and their components), straight into the tables. */
export async function makeBoard(db: Db, siteId: string, designations: string[], name = "Main switchboard") {
  const board = await db.insertInto("boards").values({ siteId, name }).returning("id").executeTakeFirstOrThrow();
  const positions: Record<string, { id: string; componentId: string }> = {};
  let col = 1;
  for (const d of designations) {
    const p = await db
      .insertInto("positions")
      .values({ siteId, boardId: board.id, designation: d, kind: "molded_case_breaker", gridRow: 1, gridCol: col++ })
      .returning("id")
      .executeTakeFirstOrThrow();
    const c = await db
      .insertInto("components")
      .values({ siteId, positionId: p.id, kind: "molded_case_breaker", tagNumber: `T-${d}` })
      .returning("id")
      .executeTakeFirstOrThrow();
    positions[d] = { id: p.id, componentId: c.id };
  }
  return { boardId: board.id, positions };
}

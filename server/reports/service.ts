/**
 * Streams the condition survey report: load the data, lay it out once without photos
 * to number the pages, then render for real straight into the response, a position
 * at a time, waiting whenever the client reads slower than we write — so memory stays
 * flat whatever the board's size.
 */
import { once } from "node:events";
import type { Writable } from "node:stream";
import sharp from "sharp";
import { localDate } from "../../src/domain/local-time";
import type { SurveyReportQuery } from "../../src/schemas/reports";
import type { Db } from "../db";
import { exportWriteTimeoutMs } from "../export-stream";
import type { PhotoStorage } from "../photos/storage";
import { newDocument } from "./pdf-base";
import { loadSurveyData, type ReportData, type ReportPhoto } from "./survey-data";
import { renderSurvey, type RenderPlan } from "./survey-pdf";

/**
 * Photos in the report: at most this many pixels on the long side, JPEG at this quality. A photo
 * prints 118 pt (1.64 in) wide (survey-pdf.ts PHOTO_W), so 320 px is about 195 dpi — inside the
 * 150–300 dpi usually asked of printed photos (common practice, from memory). 480 px (290 dpi) made a
 * 500-position board with 2,000 photos 125 MB in `npm run bench`; the issue asks well under 50 MB.
 */
export const REPORT_PHOTO_PX = 320;
export const REPORT_PHOTO_QUALITY = 60;
/** Photos read ahead of the one being drawn. */
const LOOKAHEAD = 4;

export async function downscale(bytes: Buffer) {
  return sharp(bytes)
    .rotate()
    .resize({ width: REPORT_PHOTO_PX, height: REPORT_PHOTO_PX, fit: "inside", withoutEnlargement: true })
    .jpeg({ quality: REPORT_PHOTO_QUALITY })
    .toBuffer();
}

/** Reads photos in report order a few ahead of the page being drawn. */
function photoLoader(storage: PhotoStorage, data: ReportData) {
  const order = data.boards.flatMap((b) => b.positions.flatMap((p) => p.photos.slice(0, 4)));
  const index = new Map(order.map((p, i) => [p.id, i]));
  const pending = new Map<string, Promise<Buffer | null>>();
  const load = async (p: ReportPhoto) => {
    try {
      return await downscale(await storage.getBytes(p.displayKey));
    } catch {
      return null; // a missing or unreadable file shows as an empty frame, never fails the report
    }
  };
  return (p: ReportPhoto) => {
    const i = index.get(p.id) ?? -1;
    for (let k = i; k >= 0 && k < Math.min(order.length, i + 1 + LOOKAHEAD); k++) {
      const q = order[k];
      if (!pending.has(q.id)) pending.set(q.id, load(q));
    }
    const got = pending.get(p.id) ?? load(p);
    pending.delete(p.id);
    return got;
  };
}

export interface PreparedReport {
  data: ReportData;
  plan: RenderPlan;
  filename: string;
  title: string;
}

export async function prepareSurveyReport(
  db: Db,
  siteId: string,
  q: SurveyReportQuery,
  viewer: { id: string; name: string },
): Promise<PreparedReport> {
  const data = await loadSurveyData(db, siteId, q, viewer);
  const title = `Condition survey · ${data.site.name}${q.boardId ? ` · ${data.boards[0].name}` : ""}`;
  const dry = documentFor(data, title);
  dry.on("data", () => {});
  const plan = await renderSurvey(dry, data, { dry: true });
  dry.end();
  const slug = `${data.site.name}${q.boardId ? `-${data.boards[0].name}` : ""}`
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-|-$/g, "");
  return {
    data,
    plan,
    title,
    filename: `condition-survey-${slug}-${localDate(data.generatedAt, data.site.timeZone)}.pdf`,
  };
}

function documentFor(data: ReportData, title: string) {
  return newDocument({
    size: data.query.paper === "letter" ? "LETTER" : "A4",
    margin: 48,
    title,
    author: data.generatedBy,
    subject: "Condition survey: observations and readings; certifies nothing",
  });
}

/**
 * Renders a prepared report into `out` (an HTTP response or a file). Resolves when the
 * last byte is handed over; stops early (rejecting) when `out` is destroyed.
 */
export async function writeSurveyReport(
  prepared: PreparedReport,
  storage: PhotoStorage,
  out: Writable,
  onProgress?: (positionsDone: number) => void,
) {
  const doc = documentFor(prepared.data, prepared.title);
  doc.pipe(out);
  const closed = new Promise<void>((resolve) => out.once("close", resolve));
  await renderSurvey(doc, prepared.data, {
    dry: false,
    plan: prepared.plan,
    photo: prepared.data.query.photos === "yes" ? photoLoader(storage, prepared.data) : undefined,
    afterPosition: async (n) => {
      if (out.destroyed) throw new Error("report_aborted");
      onProgress?.(n);
      if (out.writableNeedDrain) {
        // A reader that takes nothing for the export timeout is dropped, as every download is (server/export-stream.ts).
        let timer: NodeJS.Timeout | undefined;
        const stalled = new Promise<"stalled">(
          (resolve) => (timer = setTimeout(() => resolve("stalled"), exportWriteTimeoutMs())),
        );
        const got = await Promise.race([once(out, "drain"), closed, stalled]);
        clearTimeout(timer);
        if (got === "stalled" || out.destroyed) throw new Error("report_aborted");
      }
    },
  });
  doc.end();
  if (!out.writableFinished) await Promise.race([once(out, "finish"), closed]);
}

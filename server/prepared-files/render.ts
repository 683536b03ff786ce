/**
 * Makes one prepared file on local disk (a temporary file the job then stores): the same
 * writers the direct downloads use, pointed at a file instead of a response. Each kind
 * parses its params with its direct download's own schema, so both accept the same.
 */
import { once } from "node:events";
import { createWriteStream, type WriteStream } from "node:fs";
import { listQuery as defectsListQuery } from "../../src/schemas/defects";
import { listQuery as partsListQuery } from "../../src/schemas/parts";
import type { PreparedKind } from "../../src/schemas/prepared-files";
import { surveyReportQuery } from "../../src/schemas/reports";
import { localDate } from "../../src/domain/local-time";
import type { Db } from "../db";
import { writeDefectsCsv } from "../defects/csv";
import type { ExportWriter } from "../export-stream";
import { writeInventoryCsv } from "../inventory/csv-export";
import { writePartsCsv } from "../parts/service";
import type { PhotoStorage } from "../photos/storage";
import { prepareSurveyReport, writeSurveyReport } from "../reports/service";
import { findSite } from "../sites/reads";

export type Progress = (done: number, total?: number) => void;

export interface RenderInput {
  kind: PreparedKind;
  params: Record<string, unknown>;
  siteId: string;
  requester: { id: string; name: string };
}

/** Parses a request's params with the kind's own schema (throws ZodError → 400 at request time). */
export function parseParams(kind: PreparedKind, params: Record<string, unknown>) {
  switch (kind) {
    case "survey_report":
      return surveyReportQuery.parse(params);
    case "defects_csv":
      return defectsListQuery.parse(params);
    case "parts_csv": {
      const { page: _p, size: _s, ...filter } = partsListQuery.parse(params);
      return filter;
    }
    case "inventory_csv":
      return {};
  }
}

export const contentTypeOf = (kind: PreparedKind) =>
  kind === "survey_report" ? "application/pdf" : "text/csv; charset=utf-8";
export const extensionOf = (kind: PreparedKind) => (kind === "survey_report" ? "pdf" : "csv");

const slug = (s: string) =>
  s
    .toLowerCase()
    .normalize("NFKD")
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-|-$/g, "") || "site";

/** An export writer over a file, with the file stream's own back-pressure. */
function fileWriter(ws: WriteStream, progress: Progress): ExportWriter {
  return {
    async write(chunk) {
      if (!ws.write(chunk)) await once(ws, "drain");
    },
    end() {
      ws.end();
    },
    progress,
  };
}

/** Writes the file to `path`; resolves with its download name once every byte is on disk. */
export async function renderTo(
  db: Db,
  storage: PhotoStorage,
  input: RenderInput,
  path: string,
  progress: Progress,
): Promise<{ fileName: string }> {
  const ws = createWriteStream(path);
  const failed = new Promise<never>((_, reject) => ws.once("error", reject));
  failed.catch(() => {});
  const site = await findSite(db, input.siteId);
  if (!site) throw new Error(`site ${input.siteId} is gone`);
  const day = localDate(new Date(), site.timeZone);
  const work = async (): Promise<string> => {
    switch (input.kind) {
      case "survey_report": {
        const q = surveyReportQuery.parse(input.params);
        const prepared = await prepareSurveyReport(db, input.siteId, q, input.requester);
        const total = prepared.data.boards.reduce((s, b) => s + b.positions.length, 0);
        progress(0, total);
        await writeSurveyReport(prepared, storage, ws, (n) => progress(n, total));
        progress(total, total);
        return prepared.filename;
      }
      case "inventory_csv": {
        const out = fileWriter(ws, progress);
        await writeInventoryCsv(db, input.siteId, site.timeZone, out);
        out.end();
        return `${slug(site.name)}-inventory-${day}.csv`;
      }
      case "defects_csv": {
        const f = defectsListQuery.parse(input.params);
        const today = f.today ?? day;
        const out = fileWriter(ws, progress);
        await writeDefectsCsv(db, input.siteId, site.timeZone, f, today, out);
        out.end();
        return `defects-${today}.csv`;
      }
      case "parts_csv": {
        const { page: _p, size: _s, ...filter } = partsListQuery.parse(input.params);
        const out = fileWriter(ws, progress);
        await writePartsCsv(db, input.siteId, filter, site.timeZone, out);
        out.end();
        return `wanted-parts-${day}.csv`;
      }
    }
  };
  try {
    const fileName = await Promise.race([work(), failed]);
    if (!ws.writableFinished) await Promise.race([once(ws, "finish"), failed]);
    return { fileName };
  } finally {
    if (!ws.closed) ws.destroy();
  }
}

/**
 * Condition survey report and tag labels: the query shapes shared by the
 * client's forms and the server's routes.
 */
import { z } from "zod";
import { LABEL_SHEET_IDS } from "../domain/label-sheets";
import { text } from "./common";

/** Sections a person may leave out. Cover, contents and the safety caution are always in. */
export const REPORT_SECTIONS = ["summary", "board", "positions", "dryout", "rts", "defects", "parts"] as const;
export type ReportSection = (typeof REPORT_SECTIONS)[number];
export const REPORT_SECTION_LABELS: Record<ReportSection, string> = {
  summary: "Summary",
  board: "Board front",
  positions: "Positions, one by one",
  dryout: "Dry-out charts",
  rts: "Return-to-service record",
  defects: "Defect register",
  parts: "Parts wanted",
};

const dateText = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { message: "Use YYYY-MM-DD" });

/** `sections=summary,board` (comma-separated) or repeated `sections=`; absent = every section. */
const sectionList = z
  .union([z.string(), z.array(z.string())])
  .transform((v) => (Array.isArray(v) ? v : v.split(",")).map((s) => s.trim()).filter(Boolean))
  .pipe(
    z
      .array(z.enum(REPORT_SECTIONS, { message: `Sections are ${REPORT_SECTIONS.join(", ")}` }))
      .min(1, { message: "Choose at least one section" }),
  );

export const surveyReportQuery = z
  .object({
    /** One board; absent = every board of the site. */
    boardId: z.uuid({ message: "boardId must be a UUID" }).optional(),
    sections: sectionList.optional(),
    photos: z.enum(["yes", "no"]).default("yes"),
    from: dateText.optional(),
    to: dateText.optional(),
    paper: z.enum(["a4", "letter"]).default("a4"),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, {
    message: "The start date must not be after the end date",
    path: ["from"],
  });
export type SurveyReportQuery = z.output<typeof surveyReportQuery>;

/** What to print labels for: explicit positions, a section or a board (only tagged components get a label). */
export const labelsQuery = z
  .object({
    boardId: z.uuid({ message: "boardId must be a UUID" }).optional(),
    sectionId: z.uuid({ message: "sectionId must be a UUID" }).optional(),
    positionIds: z
      .union([z.string(), z.array(z.string())])
      .transform((v) => (Array.isArray(v) ? v : v.split(",")).map((s) => s.trim()).filter(Boolean))
      .pipe(z.array(z.uuid({ message: "positionIds must be UUIDs" })).max(2000))
      .optional(),
    sheet: z.enum(LABEL_SHEET_IDS).default("a4-21"),
    /** 1-based label on a part-used sheet where printing starts (left to right, top to bottom). */
    start: z.coerce.number().int().min(1, { message: "Labels are numbered from 1" }).default(1),
    /** Copies of each label (one for the part, one for its bag). */
    copies: z.coerce.number().int().min(1).max(4).default(1),
  })
  .refine((q) => q.boardId || q.sectionId || q.positionIds?.length, {
    message: "Choose a board, a section or positions",
    path: ["boardId"],
  });
export type LabelsQuery = z.output<typeof labelsQuery>;

/** Give the next free tag numbers to the untagged components at these positions. */
export const assignTagsBody = z.object({
  positionIds: z
    .array(z.uuid({ message: "positionIds must be UUIDs" }))
    .min(1)
    .max(2000),
  /** Prefix of new tags, e.g. "KL-"; absent = the prefix most tags of the site already use (or "T-"). */
  prefix: z
    .string()
    .trim()
    .regex(/^[A-Za-z0-9]{0,8}-?$/, { message: "Up to 8 letters or digits, optionally ending in -" })
    .optional(),
});

/** A tag number as looked up (the path of GET /api/tags/:tag): typed, or read from a label's code. */
export const tagParams = z.object({
  tag: text().trim().min(1).max(40, { message: "A tag number has at most 40 characters" }),
});

export const tagLookupResponse = z.object({
  tag: z.string(),
  matches: z.array(
    z.object({
      siteId: z.string(),
      siteName: z.string(),
      boardId: z.string(),
      boardName: z.string(),
      positionId: z.string(),
      designation: z.string(),
    }),
  ),
});

/**
 * Prepared files: the condition survey report and large CSV exports made by a
 * background job into object storage, then downloaded from a link. Shared by the client's
 * page and notice and the server's routes.
 */
import { z } from "zod";
import type { Action } from "../domain/permissions";
import { text } from "./common";

export const PREPARED_KINDS = ["survey_report", "inventory_csv", "defects_csv", "parts_csv"] as const;
export type PreparedKind = (typeof PREPARED_KINDS)[number];
export const PREPARED_KIND_LABELS: Record<PreparedKind, string> = {
  survey_report: "Condition survey report (PDF)",
  inventory_csv: "Inventory spreadsheet (CSV)",
  defects_csv: "Defect register (CSV)",
  parts_csv: "Wanted parts (CSV)",
};
/** Who may ask for each kind: the same action as its direct download. */
export const PREPARED_KIND_ACTION: Record<PreparedKind, Action> = {
  survey_report: "reports.survey",
  inventory_csv: "site.read",
  defects_csv: "site.read",
  parts_csv: "site.read",
};

export const PREPARED_STATES = ["queued", "rendering", "ready", "failed", "expired"] as const;
export type PreparedState = (typeof PREPARED_STATES)[number];
/** Words on screen for each state (Tideline's own). */
export const PREPARED_STATE_LABELS: Record<PreparedState, string> = {
  queued: "Waiting its turn",
  rendering: "Being made",
  ready: "Ready to download",
  failed: "Could not be made",
  expired: "Removed after its keeping time",
};

/**
 * The same query the direct download takes (`survey.pdf?boardId=…&sections=…`), as strings;
 * the server parses it with that download's own schema, so both accept exactly the same.
 */
const queryParams = z
  .record(text().max(40), z.union([text().max(2000), z.array(text().max(200)).max(500)]), {
    message: "params is an object of query values",
  })
  .refine((o) => Object.keys(o).length <= 30, { message: "At most 30 params" })
  .default({});

export const prepareBody = z.object({
  kind: z.enum(PREPARED_KINDS, { message: `kind is one of ${PREPARED_KINDS.join(", ")}` }),
  params: queryParams,
});
export type PrepareBody = z.input<typeof prepareBody>;

export const preparedFileParams = z.object({
  siteId: z.uuid({ message: "siteId must be a UUID" }),
  fileId: z.uuid({ message: "fileId must be a UUID" }),
});

export const preparedFile = z.object({
  id: z.string(),
  siteId: z.string(),
  kind: z.enum(PREPARED_KINDS),
  params: z.record(z.string(), z.unknown()),
  state: z.enum(PREPARED_STATES),
  progressDone: z.number(),
  progressTotal: z.number().nullable(),
  attempts: z.number(),
  error: z.string().nullable(),
  fileName: z.string(),
  sizeBytes: z.number().nullable(),
  createdAt: z.string(),
  finishedAt: z.string().nullable(),
  expiresAt: z.string().nullable(),
  seenAt: z.string().nullable(),
  statusUrl: z.string(),
  downloadUrl: z.string().nullable(),
});
export type PreparedFile = z.infer<typeof preparedFile>;

export const preparedFileResponse = z.object({ file: preparedFile });
export const preparedListResponse = z.object({
  files: z.array(preparedFile),
  /** How long a made file is kept before the scheduled clean-up deletes it. */
  retentionHours: z.number(),
});
export const preparedNoticesResponse = z.object({
  notices: z.array(preparedFile.extend({ siteName: z.string() })),
});

/**
 * The worker thread's side of the import plan (see ./csv-plan-pool.ts): parse, check and plan
 * the file against the site's inventory that the main thread read. An AppError (a refused file)
 * comes back as data, since an error crossing threads keeps only its message.
 */
import type { DecodedText } from "../csv-read";
import { AppError } from "../errors";
import { planImport, type SiteState } from "./csv-import";

export type PlanOutcome =
  | ({ ok: true } & ReturnType<typeof planImport>)
  | { ok: false; status: number; code: string; message: string; fields?: Record<string, string> };

export default function plan({ decoded, state }: { decoded: DecodedText; state: SiteState }): PlanOutcome {
  try {
    return { ok: true, ...planImport(decoded, state) };
  } catch (e) {
    if (e instanceof AppError)
      return { ok: false, status: e.status, code: e.code, message: e.message, fields: e.fields ?? undefined };
    throw e;
  }
}

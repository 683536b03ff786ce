/**
 * Import plans run on a worker thread: piscina 5.3.2, the well-known worker pool for
 * Node.js. The main thread reads the site's inventory (one query each, on the caller's connection
 * or transaction, so a commit still plans under its lock) and hands it over with the decoded
 * file; parsing, zod checks per row, matching and the end-state checks run on the worker, so
 * `/api/health` and every other request keep being answered while a big file is checked.
 * One thread by default (`IMPORT_THREADS`): imports are rare, and each holds a whole file;
 * further imports wait in the pool's queue. The thread ends after 30 s idle.
 */
import { Piscina } from "piscina";
import type { DecodedText } from "../csv-read";
import { AppError } from "../errors";
import type { Db } from "../db";
import { siteState, type SiteState } from "./csv-import";
import type { PlanOutcome } from "./csv-plan-worker";

let pool: Piscina | undefined;

function poolOf(): Piscina {
  // The server runs TypeScript through tsx (`node --import tsx`); a worker thread needs the same
  // loader, which test runners (vitest) do not put in execArgv.
  const execArgv = process.execArgv.some((a) => a === "tsx" || a.includes("tsx/"))
    ? process.execArgv
    : [...process.execArgv, "--import", "tsx"];
  pool ??= new Piscina({
    filename: new URL("./csv-plan-worker.ts", import.meta.url).href,
    execArgv,
    minThreads: 0,
    maxThreads: Math.max(1, Number(process.env.IMPORT_THREADS ?? 1)),
    idleTimeout: 30_000,
  });
  return pool;
}

async function planOffThread(decoded: DecodedText, state: SiteState) {
  const out = (await poolOf().run({ decoded, state })) as PlanOutcome;
  if (!out.ok) throw new AppError(out.status, out.code, out.message, out.fields);
  return { response: out.response, planned: out.planned };
}

/**
 * Reads the site's inventory (on the caller's connection or transaction), then parses, checks and
 * plans the file on a worker thread (./csv-plan-worker.ts): a file of thousands of rows takes
 * seconds of CPU, and on the event loop that stalled every other request.
 */
export async function validateImport(db: Db, siteId: string, decoded: DecodedText) {
  const state = await siteState(db, siteId);
  const { response, planned } = await planOffThread(decoded, state);
  return { response, planned, state };
}

/** Ends the worker threads (graceful shutdown; tests). */
export async function closePlanPool() {
  const p = pool;
  pool = undefined;
  await p?.destroy();
}

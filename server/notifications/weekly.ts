/**
 * The weekly summary for each site's curators: counts for the seven days before `now`,
 * put into words by weekly-text.ts. Called by server/cli/weekly-summary.ts (a scheduler
 * runs `npm run mail:weekly`).
 */
import { paths } from "../../src/config/paths";
import type { Db } from "../db";
import type { MailDeps } from "../mail/mailer";
import { sendOrQueue } from "../mail/outbox";
import { optedOut } from "./prefs-repository";
import {
  allSites,
  curatorAddresses,
  defectsBlocking,
  defectsClosed,
  defectsOpened,
  inspectionsBetween,
} from "./repository";
import { buildWeeklySummary, type WeeklyInput } from "./weekly-text";

const WEEK_MS = 7 * 24 * 3600 * 1000;

const asSet = <T extends { total: number }>(rows: T[]) => ({ count: rows[0]?.total ?? 0, items: rows });

export async function gatherWeek(
  db: Db,
  site: { id: string; name: string; timeZone: string },
  now: Date,
  publicUrl: string,
): Promise<WeeklyInput> {
  const from = new Date(now.getTime() - WEEK_MS);
  const opened = await defectsOpened(db, site.id, from, now);
  const closed = await defectsClosed(db, site.id, from, now);
  const blockers = await defectsBlocking(db, site.id);
  return {
    siteName: site.name,
    timeZone: site.timeZone,
    from,
    to: now,
    siteUrl: `${publicUrl}${paths.site.href(site.id)}`,
    accountUrl: `${publicUrl}${paths.account.href()}`,
    inspections: await inspectionsBetween(db, site.id, from, now),
    opened: asSet(opened),
    closed: asSet(closed),
    blockers: asSet(blockers),
  };
}

export interface WeeklyResult {
  sites: number;
  sent: number;
  failed: number;
  switchedOff: number;
}

export async function sendWeeklySummaries(deps: MailDeps, opts: { now?: Date } = {}): Promise<WeeklyResult> {
  const now = opts.now ?? new Date();
  const out: WeeklyResult = { sites: 0, sent: 0, failed: 0, switchedOff: 0 };
  const sites = await allSites(deps.db);
  for (const site of sites) {
    const curators = await curatorAddresses(deps.db, site.id);
    if (!curators.length) continue;
    out.sites++;
    const off = await optedOut(
      deps.db,
      curators.map((c) => c.id),
      "weekly_summary",
    );
    const wanted = curators.filter((c) => !off.has(c.id));
    out.switchedOff += curators.length - wanted.length;
    if (!wanted.length) continue;
    const msg = buildWeeklySummary(await gatherWeek(deps.db, site, now, deps.publicUrl));
    for (const c of wanted) {
      const r = await sendOrQueue(deps, { to: c.email, ...msg });
      if (r.ok) out.sent++;
      else out.failed++;
    }
  }
  return out;
}

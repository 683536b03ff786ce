/**
 * The weekly summary for each site's curators: counts for the seven days before `now`,
 * put into words by weekly-text.ts. Called by server/cli/weekly-summary.ts (a scheduler
 * runs `npm run mail:weekly`).
 */
import { sql } from "kysely";
import type { Db } from "../db";
import type { MailDeps } from "../mail/mailer";
import { sendOrQueue } from "../mail/outbox";
import { optedOut } from "./prefs-repository";
import { buildWeeklySummary, LIST_LIMIT, type WeeklyInput } from "./weekly-text";

const WEEK_MS = 7 * 24 * 3600 * 1000;

const defectLines = (db: Db, siteId: string) =>
  db
    .selectFrom("defects")
    .innerJoin("boards", "boards.id", "defects.boardId")
    .leftJoin("positions", "positions.id", "defects.positionId")
    .select([
      "defects.title",
      "boards.name as board",
      "positions.designation",
      "defects.status",
      "defects.safetyCritical",
      "defects.blocksEnergisation",
      // The whole set's size on every row, so one query gives the first ten and the count.
      sql<number>`(count(*) over ())::int`.as("total"),
    ])
    .where("defects.siteId", "=", siteId)
    .orderBy("defects.priorityScore", "desc")
    .orderBy("defects.createdAt")
    .limit(LIST_LIMIT);

const asSet = <T extends { total: number }>(rows: T[]) => ({ count: rows[0]?.total ?? 0, items: rows });

async function inspectionsInWeek(db: Db, siteId: string, from: Date, now: Date) {
  const base = db
    .selectFrom("inspections")
    .where("siteId", "=", siteId)
    .where("inspectedAt", ">", from)
    .where("inspectedAt", "<=", now);
  const totals = await base
    .select([sql<number>`count(*)::int`.as("total"), sql<number>`count(distinct position_id)::int`.as("positions")])
    .executeTakeFirstOrThrow();
  const byBoard = await db
    .selectFrom("inspections")
    .innerJoin("positions", "positions.id", "inspections.positionId")
    .innerJoin("boards", "boards.id", "positions.boardId")
    .select(["boards.name as board", sql<number>`count(*)::int`.as("count")])
    .where("inspections.siteId", "=", siteId)
    .where("inspections.inspectedAt", ">", from)
    .where("inspections.inspectedAt", "<=", now)
    .groupBy("boards.name")
    .orderBy("boards.name")
    .execute();
  return { total: totals.total, positions: totals.positions, byBoard };
}

export async function gatherWeek(
  db: Db,
  site: { id: string; name: string },
  now: Date,
  publicUrl: string,
): Promise<WeeklyInput> {
  const from = new Date(now.getTime() - WEEK_MS);
  const opened = await defectLines(db, site.id)
    .where("defects.createdAt", ">", from)
    .where("defects.createdAt", "<=", now)
    .execute();
  const closed = await defectLines(db, site.id)
    .where("defects.status", "=", "closed")
    .where("defects.closedAt", ">", from)
    .where("defects.closedAt", "<=", now)
    .execute();
  // The same rule as the return-to-service gate: closed or accepted as is no longer blocks; deferred still does.
  const blockers = await defectLines(db, site.id)
    .where("defects.status", "not in", ["closed", "accepted_as_is"])
    .where((eb) => eb.or([eb("defects.blocksEnergisation", "=", true), eb("defects.safetyCritical", "=", true)]))
    .execute();
  return {
    siteName: site.name,
    from,
    to: now,
    siteUrl: `${publicUrl}/sites/${site.id}`,
    accountUrl: `${publicUrl}/account`,
    inspections: await inspectionsInWeek(db, site.id, from, now),
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
  const sites = await deps.db.selectFrom("sites").select(["id", "name"]).orderBy("name").execute();
  for (const site of sites) {
    const curators = await deps.db
      .selectFrom("memberships")
      .innerJoin("users", "users.id", "memberships.userId")
      .select(["users.id", "users.email"])
      .where("memberships.siteId", "=", site.id)
      .where("memberships.role", "=", "curator")
      .execute();
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

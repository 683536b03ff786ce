/**
 * The weekly summary's words, from numbers already counted: pure (no I/O, no clock),
 * so the wording is tested on its own (tests/server/weekly-text.test.ts).
 */
import { localDate } from "../../src/domain/local-time";
import { DEFECT_STATUS_LABELS, type DefectStatus } from "../../src/domain/vocab";
import { compose, type Composed } from "../mail/compose";

export interface DefectLine {
  title: string;
  board: string;
  designation: string | null;
}
export interface BlockerLine extends DefectLine {
  status: DefectStatus;
  safetyCritical: boolean;
  blocksEnergisation: boolean;
}
export interface WeeklyInput {
  siteName: string;
  /** The site's IANA time zone: the week's days are written on its calendar. */
  timeZone: string;
  from: Date;
  to: Date;
  siteUrl: string;
  accountUrl: string;
  inspections: { total: number; positions: number; byBoard: Array<{ board: string; count: number }> };
  opened: { count: number; items: DefectLine[] };
  closed: { count: number; items: DefectLine[] };
  blockers: { count: number; items: BlockerLine[] };
}

export const LIST_LIMIT = 10;
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;
const where = (d: DefectLine) => (d.designation ? `${d.board} ${d.designation}` : d.board);

function lines<T extends DefectLine>(items: T[], count: number, fmt: (d: T) => string): string[] {
  const out = items.slice(0, LIST_LIMIT).map(fmt);
  if (count > out.length) out.push(`…and ${count - out.length} more`);
  return out;
}

function blockerText(b: BlockerLine): string {
  const why = [b.blocksEnergisation ? "blocks re-energisation" : "", b.safetyCritical ? "safety-critical" : ""]
    .filter(Boolean)
    .join(", ");
  return `${b.title} — ${where(b)} (${why}; ${DEFECT_STATUS_LABELS[b.status].toLowerCase()})`;
}

export function buildWeeklySummary(w: WeeklyInput): Composed {
  const i = w.inspections;
  const quiet = i.total === 0 && w.opened.count === 0 && w.closed.count === 0;
  const body: Array<string | string[]> = [
    `Between ${localDate(w.from, w.timeZone)} and ${localDate(w.to, w.timeZone)} on ${w.siteName}:`,
    [
      `Surveyed: ${plural(i.total, "inspection")} logged on ${plural(i.positions, "position")}`,
      `Defects opened: ${w.opened.count}`,
      `Defects closed: ${w.closed.count}`,
      `Unresolved defects that block re-energisation or are safety-critical: ${w.blockers.count}`,
    ],
  ];
  if (quiet) body.push("No inspections were logged and no defects were opened or closed this week.");
  if (i.byBoard.length)
    body.push(
      "Inspections by board:",
      i.byBoard.map((b) => `${b.board}: ${b.count}`),
    );
  if (w.opened.count)
    body.push(
      "Opened:",
      lines(w.opened.items, w.opened.count, (d) => `${d.title} — ${where(d)}`),
    );
  if (w.closed.count)
    body.push(
      "Closed:",
      lines(w.closed.items, w.closed.count, (d) => `${d.title} — ${where(d)}`),
    );
  if (w.blockers.count)
    body.push(
      "Still blocking re-energisation or marked safety-critical:",
      lines(w.blockers.items, w.blockers.count, blockerText),
    );
  else
    body.push(
      "No unresolved defect is marked as blocking re-energisation or safety-critical. That is not a statement that any board is safe to energise: a qualified person decides.",
    );
  return compose({
    subject: `Tideline weekly: ${w.siteName}, ${localDate(w.from, w.timeZone)} to ${localDate(w.to, w.timeZone)}${w.blockers.count ? ` — ${plural(w.blockers.count, "blocker")}` : ""}`,
    greeting: "Hello,",
    body,
    action: { label: `Open ${w.siteName}`, url: w.siteUrl },
    footer: [
      `You get this as a curator of ${w.siteName}. Switch the weekly summary off on your account page: ${w.accountUrl}`,
    ],
  });
}

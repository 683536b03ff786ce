/**
 * The watch period after a stage is energised: left live for N hours, checked every M
 * hours. Which check is due next, whether one is overdue, and where the record has gaps.
 * Pure: `now` comes in. Common practice for staged re-energisation; the
 * 15-minute allowance before a check counts as late is Tideline's.
 */
export const WATCH_GRACE_MINUTES = 15;
const HOUR_MS = 3_600_000;

export interface WatchInput {
  energisedAt: string;
  watchHours: number;
  checkEveryHours: number;
  /** Times of the checks recorded since the energisation (any order). */
  checks: string[];
}
export interface WatchState {
  endsAt: string;
  complete: boolean;
  /** When the next check is due (null once the watch period is over). */
  nextDueAt: string | null;
  /** The due time that has passed without a check (beyond the grace), or null. */
  overdueSince: string | null;
  /** Stretches longer than the interval (plus grace) with no check, before now. */
  gaps: Array<{ from: string; to: string }>;
  checksDone: number;
}

const iso = (t: number) => new Date(t).toISOString();
const parse = (name: string, s: string) => {
  const t = Date.parse(s);
  if (Number.isNaN(t)) throw new RangeError(`${name} is not a date: ${s}`);
  return t;
};

/**
 * Due times run from the last check (or the energisation) every `checkEveryHours`; the
 * period ends `watchHours` after the energisation. A check counts late after the due time
 * plus WATCH_GRACE_MINUTES.
 * @throws RangeError for a non-positive interval, a negative period or unreadable dates
 */
export function watchSchedule(w: WatchInput, nowMs: number): WatchState {
  if (!(w.checkEveryHours > 0)) throw new RangeError("checkEveryHours must be above 0");
  if (!(w.watchHours >= 0)) throw new RangeError("watchHours must be 0 or more");
  const start = parse("energisedAt", w.energisedAt);
  const end = start + w.watchHours * HOUR_MS;
  const every = w.checkEveryHours * HOUR_MS;
  const grace = WATCH_GRACE_MINUTES * 60_000;
  const checks = w.checks
    .map((c) => parse("check", c))
    .filter((t) => t >= start && t <= nowMs)
    .sort((a, b) => a - b);
  const gaps: WatchState["gaps"] = [];
  let last = start;
  for (const t of checks) {
    if (t > end) break;
    if (t - last > every + grace) gaps.push({ from: iso(last), to: iso(t) });
    last = t;
  }
  const complete = nowMs >= end;
  // The stretch up to the end of the watch (or now) also counts.
  const upTo = Math.min(nowMs, end);
  let overdueSince: string | null = null;
  if (upTo - last > every + grace) {
    if (complete) gaps.push({ from: iso(last), to: iso(end) });
    else overdueSince = iso(last + every);
  }
  const nextDue = last + every;
  return {
    endsAt: iso(end),
    complete,
    nextDueAt: complete ? null : iso(Math.min(nextDue, end)),
    overdueSince,
    gaps,
    checksDone: checks.length,
  };
}

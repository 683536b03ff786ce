/**
 * A time a phone gives for something the person observed (a watch check kept on the phone with no
 * signal and sent hours later) is by the phone's own clock, which may be wrong. The phone also says
 * what its clock reads as it sends (`Tideline-Device-Time`), so the server can tell how far off it
 * is and put the observation on its own clock. Pure: the caller passes every time.
 *
 * The thresholds are this product's choices (no standard sets them): two minutes covers the time a
 * request spends in transit plus a phone clock that drifts between network syncs (phones set their
 * clocks from the network, typically to within a second — common practice); a day off is not a drift
 * but a clock set wrongly, and correcting by it would guess at a date.
 */

/** The request header the phone's outbox sends with what its clock reads as it sends (ISO 8601). */
export const DEVICE_TIME_HEADER = "Tideline-Device-Time";

/** Below this the phone's clock is taken as right (the difference includes the request's transit). */
export const CLOCK_SKEW_FLAG_S = 120;
/** Past this the phone's clock is set wrongly: refused, the person sets it and corrects the time. */
export const CLOCK_SKEW_REFUSE_S = 24 * 3600;
/** An observation later than the server's now by more than this has not happened yet. */
export const FUTURE_TOLERANCE_S = 120;

export interface DeviceTimeInput {
  /** The observed time the phone gave (by its clock); null: "now". */
  deviceAt: Date | null;
  /** What the phone's clock read as it sent; null when it did not say (an API client). */
  deviceNow: Date | null;
  /** The server's clock as it received the request. */
  serverNow: Date;
  /** When what was observed began (a stage energised); an observation before it is refused. */
  notBefore?: Date | null;
}

export type DeviceTimeResult =
  | {
      ok: true;
      /** The observed time on the server's clock: what schedules count. */
      at: Date;
      /** Phone clock minus server clock (s, rounded), null when the phone did not say. */
      skewS: number | null;
      /** The phone's clock was off by at least CLOCK_SKEW_FLAG_S, and `at` was corrected by it. */
      corrected: boolean;
    }
  | { ok: false; code: "future" | "clock_off" | "before_start"; message: string };

const minutes = (s: number) => {
  const m = Math.round(Math.abs(s) / 60);
  if (m < 120) return `${m} min`;
  const h = Math.round(Math.abs(s) / 3600);
  return h < 48 ? `${h} h` : `${Math.round(Math.abs(s) / 86400)} days`;
};

/** Words for a clock difference: "12 min ahead", "3 h behind". */
export function skewWords(skewS: number): string {
  return `${minutes(skewS)} ${skewS > 0 ? "ahead" : "behind"}`;
}

export function judgeDeviceTime(i: DeviceTimeInput): DeviceTimeResult {
  const skewS = i.deviceNow ? Math.round((i.deviceNow.getTime() - i.serverNow.getTime()) / 1000) : null;
  if (skewS !== null && Math.abs(skewS) > CLOCK_SKEW_REFUSE_S)
    return {
      ok: false,
      code: "clock_off",
      message: `The phone's clock is ${skewWords(skewS)} of the server's: set the phone's date and time, then correct the time of the check.`,
    };
  const corrected = skewS !== null && Math.abs(skewS) >= CLOCK_SKEW_FLAG_S;
  const given = i.deviceAt ?? i.deviceNow ?? i.serverNow;
  const at = corrected ? new Date(given.getTime() - skewS * 1000) : given;
  if (at.getTime() > i.serverNow.getTime() + FUTURE_TOLERANCE_S * 1000)
    return { ok: false, code: "future", message: "That time is in the future." };
  if (i.notBefore && at.getTime() < i.notBefore.getTime() - FUTURE_TOLERANCE_S * 1000)
    return {
      ok: false,
      code: "before_start",
      message:
        "That time is before the stage was energised: a check from an earlier energisation, or the phone's clock is wrong.",
    };
  return { ok: true, at, skewS, corrected };
}

/** A received record is "late" (kept on a phone, sent when the signal returned) past this. */
export const LATE_ARRIVAL_S = 10 * 60;

/**
 * What the log says beside a watch check about its time, or "" when there is nothing to say: the
 * phone's clock was off (and by how much, and what the phone said), and when it reached the server
 * if that was well after it was observed (it waited on the phone). `time` formats a time for people.
 */
export function clockNote(
  e: { at: string; clock?: { deviceAt: string | null; receivedAt: string; skewS: number | null } },
  time: (iso: string) => string,
): string {
  const c = e.clock;
  if (!c) return "";
  const parts: string[] = [];
  if (c.skewS !== null && Math.abs(c.skewS) >= CLOCK_SKEW_FLAG_S)
    parts.push(
      `phone's clock ${skewWords(c.skewS)}: it said ${c.deviceAt ? time(c.deviceAt) : "?"}, shown on the server's clock`,
    );
  if (Date.parse(c.receivedAt) - Date.parse(e.at) > LATE_ARRIVAL_S * 1000)
    parts.push(`kept on the phone, received ${time(c.receivedAt)}`);
  return parts.join("; ");
}

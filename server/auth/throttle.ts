/**
 * Throttles for sign-in, password-reset and invitation requests: rate-limiter-flexible's
 * PostgreSQL store over the app's own pool (table rate_limits, migration 2026_12_02_0200),
 * so several server instances share one count. If the database cannot be reached, an
 * in-memory limiter of the same shape stands in (the library's insuranceLimiter).
 *
 * Limits (OWASP Authentication Cheat Sheet, "Protect against automated attacks": lock out
 * per account after a handful of failures, for a while; the numbers are our own choice):
 * - sign-in: 10 failures per account in 15 min; 50 failures per address (IP) in 1 h;
 * - password reset: 5 requests per e-mail address and 20 per IP in 1 h;
 * - invitations: 40 sent (new or resent) per curator in 1 h; 20 accept attempts per IP in 15 min.
 */
import {
  RateLimiterMemory,
  RateLimiterPostgres,
  RateLimiterRes,
  type RateLimiterAbstract,
} from "rate-limiter-flexible";
import { poolOf, type Db } from "../db";
import { AppError } from "../errors";

export interface LimitSpec {
  keyPrefix: string;
  points: number;
  /** seconds */
  duration: number;
}

export const LIMITS = {
  signInAccount: { keyPrefix: "signin_acct", points: 10, duration: 15 * 60 },
  signInAddress: { keyPrefix: "signin_ip", points: 50, duration: 60 * 60 },
  resetEmail: { keyPrefix: "reset_email", points: 5, duration: 60 * 60 },
  resetAddress: { keyPrefix: "reset_ip", points: 20, duration: 60 * 60 },
  inviteSender: { keyPrefix: "invite_user", points: 40, duration: 60 * 60 },
  inviteAccept: { keyPrefix: "invite_accept_ip", points: 20, duration: 15 * 60 },
} satisfies Record<string, LimitSpec>;

export type LimitName = keyof typeof LIMITS;
export type Limiters = Record<LimitName, RateLimiterAbstract>;

function limiter(db: Db, spec: LimitSpec): RateLimiterAbstract {
  const pool = poolOf(db);
  const insurance = new RateLimiterMemory(spec);
  if (!pool) return insurance;
  return new RateLimiterPostgres({
    ...spec,
    storeClient: pool,
    storeType: "pool",
    tableName: "rate_limits",
    tableCreated: true,
    insuranceLimiter: insurance,
  });
}

export function createLimiters(db: Db): Limiters {
  return Object.fromEntries(Object.entries(LIMITS).map(([k, spec]) => [k, limiter(db, spec)])) as Limiters;
}

const minutes = (ms: number) => Math.max(1, Math.ceil(ms / 60_000));

/** 429 with Retry-After (RFC 6585 §4, RFC 9110 §10.2.3); the message says how long to wait. */
export function tooMany(what: string, msBeforeNext: number) {
  const wait = minutes(msBeforeNext);
  return new AppError(
    429,
    "too_many_requests",
    `${what} Try again in ${wait} minute${wait === 1 ? "" : "s"}.`,
    undefined,
    undefined,
    {
      "Retry-After": String(Math.max(1, Math.ceil(msBeforeNext / 1000))),
    },
  );
}

/** Counts one request against the limit; over it → 429. */
export async function hit(l: RateLimiterAbstract, key: string, what: string): Promise<RateLimiterRes> {
  try {
    return await l.consume(key);
  } catch (e) {
    if (e instanceof RateLimiterRes) throw tooMany(what, e.msBeforeNext);
    throw e;
  }
}

/** Refuses with 429 when the key has already used up its points in this window (nothing is counted). */
export async function refuseIfSpent(l: RateLimiterAbstract, key: string, what: string) {
  const r = await l.get(key);
  if (r && r.consumedPoints >= l.points) throw tooMany(what, r.msBeforeNext);
}

/** Counts a failure; returns the count in this window (never throws a RateLimiterRes). */
export async function countFailure(l: RateLimiterAbstract, key: string): Promise<number> {
  try {
    return (await l.consume(key)).consumedPoints;
  } catch (e) {
    if (e instanceof RateLimiterRes) return e.consumedPoints;
    throw e;
  }
}

export const accountKey = (email: string) => email.trim().toLowerCase();

/**
 * Errors that mean "the database is unreachable or went away", not "this request is
 * wrong": they answer 503 with a clear message, and the client retries later. Codes are
 * PostgreSQL's SQLSTATEs (PostgreSQL 15 documentation, Appendix A "PostgreSQL Error
 * Codes": class 08 connection exception, 57P01 admin_shutdown, 57P02 crash_shutdown,
 * 57P03 cannot_connect_now, 53300 too_many_connections, 25P03
 * idle_in_transaction_session_timeout, 57014 query_canceled) and Node's socket errnos.
 */
const SOCKET_ERRNOS = new Set([
  "ECONNREFUSED",
  "ECONNRESET",
  "EPIPE",
  "ETIMEDOUT",
  "EHOSTUNREACH",
  "ENETUNREACH",
  "EAI_AGAIN",
]);
const LOST_SQLSTATES = new Set(["57P01", "57P02", "57P03", "53300", "25P03"]);
const MESSAGES = [
  /Connection terminated/i, // pg: the socket closed (unexpectedly, or while we ended it)
  /timeout exceeded when trying to connect/i, // pg-pool: no free connection within connectionTimeoutMillis
  /Connection terminated due to connection timeout/i,
  /not queryable/i, // pg: a client that already lost its connection
  /Client was closed and is not queryable/i,
  /the database system is (starting up|shutting down|in recovery mode)/i,
];

/**
 * A checkout refused because the pool's waiting queue is full (server/db.ts `boundQueue`): "unavailable"
 * for now, answered at once instead of after the acquire timeout.
 */
export class PoolQueueFull extends Error {
  readonly code = "TIDELINE_POOL_QUEUE_FULL";
  constructor(readonly maxWaiting: number) {
    super(`database pool queue full (${maxWaiting} waiting)`);
    this.name = "PoolQueueFull";
  }
}

export type DbFailure = "unavailable" | "timeout";

/** "unavailable" (connection lost, refused, pool exhausted), "timeout" (statement cancelled), or null (not a database outage). */
export function dbFailureOf(err: unknown): DbFailure | null {
  if (!err || typeof err !== "object") return null;
  const e = err as { code?: unknown; message?: unknown; errors?: unknown; cause?: unknown };
  const code = typeof e.code === "string" ? e.code : "";
  if (code === "57014") return "timeout";
  if (err instanceof PoolQueueFull) return "unavailable";
  if (LOST_SQLSTATES.has(code) || /^08[0-9A-Z]{3}$/.test(code) || SOCKET_ERRNOS.has(code)) return "unavailable";
  const msg = typeof e.message === "string" ? e.message : "";
  if (MESSAGES.some((re) => re.test(msg))) return "unavailable";
  // Node's AggregateError (several addresses refused), or an error wrapping another.
  if (Array.isArray(e.errors) && e.errors.some((x) => dbFailureOf(x) === "unavailable")) return "unavailable";
  if (e.cause && e.cause !== err) return dbFailureOf(e.cause);
  return null;
}

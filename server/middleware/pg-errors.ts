/**
 * Last resort for input that got past the schemas: PostgreSQL's own refusal of a value
 * becomes a 4xx, never a 500. SQLSTATE classes from the PostgreSQL manual, Appendix A
 * ("PostgreSQL Error Codes"): class 22 is "Data Exception", class 23 "Integrity
 * Constraint Violation", class 40 "Transaction Rollback".
 */
export interface PgMapped {
  status: number;
  code: string;
  message: string;
}

export function mapPgError(err: unknown): PgMapped | null {
  const e = err as { code?: unknown; severity?: unknown; routine?: unknown };
  // pg's DatabaseError carries a five-character SQLSTATE plus severity; other errors have no such pair.
  if (typeof e?.code !== "string" || !/^[0-9A-Z]{5}$/.test(e.code) || e.severity === undefined) return null;
  const code = e.code;
  if (code.startsWith("22"))
    return {
      status: 400,
      code: "invalid_input",
      message:
        "A value in the request cannot be stored (out of range or malformed). Check the numbers, dates and text.",
    };
  if (code === "23505" || code === "23P01")
    return {
      status: 409,
      code: "conflict",
      message: "That clashes with a record saved a moment ago. Refresh and try again.",
    };
  if (code === "23503")
    return {
      status: 409,
      code: "conflict",
      message: "That refers to a record that no longer exists, or is still referred to. Refresh and try again.",
    };
  if (code === "23502" || code === "23514")
    return { status: 400, code: "invalid_input", message: "A value in the request is missing or not allowed." };
  if (code === "40001" || code === "40P01")
    return {
      status: 409,
      code: "conflict",
      message: "Someone changed the same records at the same moment. Try again.",
    };
  return null;
}

/** A unique-key clash (23505): two first saves of the same row at once. */
export const isUniqueViolation = (e: unknown) => (e as { code?: unknown })?.code === "23505";

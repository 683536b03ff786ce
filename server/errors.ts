/** An expected failure with its HTTP status; the error handler turns it into JSON. */
export class AppError extends Error {
  constructor(
    public status: number,
    public code: string,
    message: string,
    public fields?: Record<string, string>,
    public details?: unknown,
    /** Extra response headers, e.g. Retry-After on a 429. */
    public headers?: Record<string, string>,
  ) {
    super(message);
  }
}

export const notFound = (what = "That record") => new AppError(404, "not_found", `${what} was not found.`);
export const forbidden = (message = "Your role on this site does not allow that.") =>
  new AppError(403, "forbidden", message);
export const conflict = (message: string, current?: unknown) =>
  new AppError(409, "conflict", message, undefined, current);

import type { z } from "zod";

/** Every failed API call becomes one of these, with the server's code, message and fields. */
export class ApiError extends Error {
  constructor(
    public status: number,
    public code: string,
    message: string,
    public fields: Record<string, string> = {},
    /** On 409, the record as it is now on the server. */
    public current?: unknown,
    /** The server's id for this request (X-Request-Id), for a person to quote when reporting a fault. */
    public requestId?: string,
    /** The whole error object, for answers that carry more (an import's rows on 400/409). */
    public detail?: unknown,
  ) {
    super(message);
  }
}

type Method = "GET" | "POST" | "PATCH" | "PUT" | "DELETE";

async function request(method: Method, url: string, body?: unknown, signal?: AbortSignal): Promise<unknown> {
  let res: Response;
  try {
    res = await fetch(url, {
      method,
      credentials: "same-origin",
      // A Blob (a chosen file) goes as its bytes, so the server reads its encoding instead of the browser guessing.
      headers:
        body === undefined || body instanceof FormData
          ? {}
          : body instanceof Blob
            ? { "Content-Type": "text/csv" }
            : { "Content-Type": "application/json" },
      body:
        body === undefined ? undefined : body instanceof FormData || body instanceof Blob ? body : JSON.stringify(body),
      signal,
    });
  } catch (e) {
    if ((e as Error).name === "AbortError") throw e;
    throw new ApiError(0, "offline", "Tideline's server cannot be reached. Check the connection and try again.");
  }
  const text = await res.text();
  const data = text ? safeJson(text) : null;
  if (!res.ok) {
    const err = (
      data as {
        error?: {
          code?: string;
          message?: string;
          fields?: Record<string, string>;
          current?: unknown;
          requestId?: string;
        };
      } | null
    )?.error;
    const requestId = err?.requestId ?? res.headers.get("X-Request-Id") ?? undefined;
    let message = err?.message ?? `The server answered ${res.status}.`;
    // A fault of the server's is worth reporting: give the person the reference to quote.
    if (res.status >= 500 && requestId && !message.includes(requestId)) message += ` (Reference ${requestId}.)`;
    throw new ApiError(
      res.status,
      err?.code ?? "http_" + res.status,
      message,
      err?.fields,
      err?.current,
      requestId,
      err,
    );
  }
  return data;
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return null;
  }
}

/** Fetches and checks the response's shape with the shared zod schema. */
export const api = {
  get: <T extends z.ZodType>(url: string, schema: T, signal?: AbortSignal) =>
    request("GET", url, undefined, signal).then((d) => schema.parse(d) as z.infer<T>),
  send: <T extends z.ZodType>(method: Exclude<Method, "GET">, url: string, body: unknown, schema: T) =>
    request(method, url, body).then((d) => schema.parse(d) as z.infer<T>),
  raw: request,
};

/** Builds "?a=1&b=2" from defined values only. */
export function qs(params: Record<string, string | number | boolean | undefined | null | string[]>): string {
  const u = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) {
    if (v === undefined || v === null || v === "") continue;
    if (Array.isArray(v)) v.forEach((x) => u.append(k, x));
    else u.set(k, String(v));
  }
  const s = u.toString();
  return s ? `?${s}` : "";
}

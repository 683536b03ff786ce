import type { z } from "zod";
import { forgetReads, takeRead } from "./early-reads";

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
  // A GET the entry already started (src/lib/early-reads.ts) is taken up; a write drops those not yet taken.
  if (method !== "GET") forgetReads();
  const early = method === "GET" ? takeRead(url) : undefined;
  try {
    res = await (early ??
      fetch(url, {
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
          body === undefined
            ? undefined
            : body instanceof FormData || body instanceof Blob
              ? body
              : JSON.stringify(body),
        signal,
      }));
  } catch (e) {
    if ((e as Error).name === "AbortError") throw e;
    throw new ApiError(0, "offline", "Tideline's server cannot be reached. Check the connection and try again.");
  }
  const text = await res.text();
  const data = text ? safeJson(text) : null;
  // A large answer's JSON.parse is a piece of work of its own on a slow phone: let the page run before checking it.
  if (text.length > LARGE_ANSWER) await yieldToPage();
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

/** Answers past this many characters are parsed, then checked, in pieces between which the page runs. */
const LARGE_ANSWER = 64 * 1024;
/** How long one piece of checking a large list may hold the main thread, ms. */
const SLICE_MS = 12;
/** Lets the page run (input, rendering) before the rest of a large answer's work. */
const yieldToPage = (): Promise<void> => {
  const s = (globalThis as { scheduler?: { yield?: () => Promise<void> } }).scheduler;
  return s?.yield ? s.yield() : new Promise((resolve) => setTimeout(resolve, 0));
};

/** What parseInPieces reads of a zod 4 schema (its definition), without importing zod into the entry chunk. */
interface SchemaLike {
  parse(d: unknown): unknown;
  safeParse(d: unknown): { success: boolean; data?: unknown };
  omit?(mask: Record<string, true>): SchemaLike;
  _zod: { def: { type: string; shape?: Record<string, SchemaLike>; element?: SchemaLike; checks?: unknown[] } };
}
const plain = (s: SchemaLike) => !s._zod.def.checks?.length;

/**
 * schema.parse(data), the same result, but for an object answer holding a long list (a board's 500 tiles) the list's
 * items are checked in pieces of about SLICE_MS with the page running between them, instead of in one long task.
 * Any item that fails, or a schema this does not read (refinements on the object or the list), goes through
 * schema.parse whole, so the error thrown is the one it always was.
 */
async function parseInPieces<T extends z.ZodType>(schema: T, data: unknown): Promise<z.infer<T>> {
  const s = schema as unknown as SchemaLike;
  const { type, shape } = s._zod.def;
  const record = data as Record<string, unknown> | null;
  const key =
    type === "object" && shape && plain(s) && s.omit && record && typeof record === "object"
      ? Object.keys(shape).find((k) => {
          const list = shape[k]._zod.def;
          return list.type === "array" && plain(shape[k]) && Array.isArray(record[k]) && record[k].length > 64;
        })
      : undefined;
  if (!key) return schema.parse(data) as z.infer<T>;
  const rest = s.omit!({ [key]: true }).safeParse(data);
  const element = shape![key]._zod.def.element!;
  if (!rest.success) return schema.parse(data) as z.infer<T>;
  const items: unknown[] = [];
  let since = performance.now();
  for (const item of record![key] as unknown[]) {
    if (performance.now() - since > SLICE_MS) {
      await yieldToPage();
      since = performance.now();
    }
    const r = element.safeParse(item);
    if (!r.success) return schema.parse(data) as z.infer<T>;
    items.push(r.data);
  }
  // The keys in the schema's order, as schema.parse gives them.
  const parsed = rest.data as Record<string, unknown>;
  const out: Record<string, unknown> = {};
  for (const k of Object.keys(shape!)) {
    if (k === key) out[k] = items;
    else if (k in parsed) out[k] = parsed[k];
  }
  for (const k of Object.keys(parsed)) if (!(k in out)) out[k] = parsed[k];
  return out as z.infer<T>;
}

/** Fetches and checks the response's shape with the shared zod schema. */
export const api = {
  get: <T extends z.ZodType>(url: string, schema: T, signal?: AbortSignal) =>
    request("GET", url, undefined, signal).then((d) => parseInPieces(schema, d)),
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

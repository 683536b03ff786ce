/**
 * HTTP hardening for every response: only Tideline's own host names are served (a DNS
 * rebinding page cannot talk to the server under a foreign name), helmet's security
 * headers with a Content-Security-Policy the built client passes without inline scripts,
 * and a plain error page outside /api (no stack, no paths).
 */
import type { ErrorRequestHandler, RequestHandler } from "express";
import helmet from "helmet";
import { log } from "../log";

const LOOPBACK = ["localhost", "127.0.0.1", "[::1]", "::1"];

/** Host names from a comma- or space-separated list ("tideline.example.org, 10.0.0.5"); ports and schemes are dropped. */
export function parseHostList(list: string | undefined): string[] {
  return (list ?? "")
    .split(/[\s,]+/)
    .map((h) => h.trim().toLowerCase())
    .filter(Boolean)
    .map((h) => {
      try {
        return h.includes("://") ? new URL(h).hostname : new URL(`http://${h}`).hostname;
      } catch {
        return h;
      }
    });
}

/** Loopback names, the host of PUBLIC_URL and ALLOWED_HOSTS. */
export function allowedHostsFrom(opts: { publicUrl?: string; extra?: string[] }): Set<string> {
  const hosts = new Set(LOOPBACK);
  if (opts.publicUrl) for (const h of parseHostList(opts.publicUrl)) hosts.add(h);
  for (const h of opts.extra ?? []) for (const p of parseHostList(h)) hosts.add(p);
  return hosts;
}

/**
 * Refuses a request whose Host (or X-Forwarded-Host behind a trusted proxy) is not one
 * of ours, with 421 Misdirected Request (RFC 9110 §15.5.20). Ports do not matter: the
 * attack is a foreign name resolving to this machine.
 */
export function hostAllowlist(allowed: Set<string>): RequestHandler {
  return (req, res, next) => {
    const host = (req.hostname ?? "").toLowerCase();
    if (host && allowed.has(host)) return next();
    res.status(421);
    if (req.path.startsWith("/api/")) {
      res.json({
        error: {
          code: "unknown_host",
          message: "This server does not answer to that host name. Set PUBLIC_URL or ALLOWED_HOSTS.",
        },
      });
    } else {
      res.type("text/plain").send("This server does not answer to that host name.");
    }
  };
}

/**
 * helmet with Tideline's policy. Scripts, styles, fonts and data come only from this
 * origin; images also from data: (the favicon) and blob: (previews before upload).
 * Inline style *attributes* are allowed for the HTML part of e-mail shown in the admin's
 * local mailbox (a sandboxed srcdoc frame inherits this policy); inline scripts never.
 */
export function securityHeaders(opts: { https: boolean }): RequestHandler {
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        "default-src": ["'self'"],
        "script-src": ["'self'"],
        "style-src": ["'self'"],
        "style-src-attr": ["'unsafe-inline'"],
        "img-src": ["'self'", "data:", "blob:"],
        "font-src": ["'self'"],
        "connect-src": ["'self'"],
        "object-src": ["'none'"],
        "base-uri": ["'self'"],
        "form-action": ["'self'"],
        "frame-src": ["'self'"],
        "frame-ancestors": ["'none'"],
        ...(opts.https ? { "upgrade-insecure-requests": [] } : {}),
      },
    },
    // HSTS only means something over https; on a crew's http://127.0.0.1 it is left out.
    strictTransportSecurity: opts.https ? { maxAge: 15552000, includeSubDomains: false } : false,
    referrerPolicy: { policy: "no-referrer" },
    xFrameOptions: { action: "deny" },
  });
}

const page = (status: number, title: string) =>
  `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${title} · Tideline</title></head>` +
  `<body style="font-family:sans-serif;background:#0d141b;color:#e6edf2;padding:2rem"><h1>${title}</h1>` +
  `<p>Tideline could not serve that address (${status}). <a href="/" style="color:#e5b24f">Go to the start page</a>.</p></body></html>`;

/** Errors outside /api (a malformed path such as /%E0%A4%A, a failed file read): a plain page, never a stack. */
export const plainErrorPage: ErrorRequestHandler = (err, req, res, _next) => {
  const status =
    typeof err?.status === "number" && err.status >= 400 && err.status < 600
      ? err.status
      : typeof err?.statusCode === "number"
        ? err.statusCode
        : 500;
  if (status >= 500) (req.log ?? log).error({ err }, "error serving a page");
  if (res.headersSent) return void res.end();
  const title = status === 404 ? "Not found" : status < 500 ? "Bad request" : "Server error";
  res.status(status).type("html").send(page(status, title));
};

/**
 * A domain router entered only by paths it could match. Every domain router is mounted on the API router at "/",
 * so without a gate a request is matched against the route paths of every router mounted before its own (a
 * register request passed ~100 route layers' regular expressions first; DEVELOPERS.md "Server CPU per request,
 * profiled"). The gate reads the router's own route table once, at start-up, into a tree of path segments, and
 * lets a request in only when its path could match one of them; a request it turns away is passed on exactly as
 * the router would have passed it on after matching nothing.
 *
 * The tree errs one way only: anything it does not understand lets the request in. A segment is understood when it
 * is plain text (letters, digits, `.`, `_`, `~`, `-`) or a whole-segment parameter (`:name`); any other segment
 * (wildcards, optional groups, a parameter inside text), a path given as an array or a regular expression, a router
 * mounted under a path, or a middleware of the router's own (`router.use(fn)`) opens the gate from that point on.
 * Text is compared without case (Express routes are case-insensitive by default) and a parameter matches any
 * segment, even an empty one, so the gate admits at least what the router's matchers admit.
 * tests/server/path-gate.test.ts checks that property against the router's own matchers for every route of the
 * app, and the authorization matrix (tests/server/authorization.api.test.ts) calls every route through the gates.
 */
import type { NextFunction, Request, RequestHandler, Response, Router } from "express";

interface Node {
  text: Map<string, Node>;
  param?: Node;
  /** A route ends here (an optional trailing slash after it is also matched, as the router does). */
  end: boolean;
  /** A route goes on from here in a way the tree does not follow: every longer path is let in. */
  open: boolean;
}

/** What the gate reads of a router's layers (Express 5's router 2). */
interface Layer {
  route?: { path: unknown };
  handle?: { stack?: unknown };
  rawPath?: unknown;
}

const node = (): Node => ({ text: new Map(), end: false, open: false });
const TEXT = /^[A-Za-z0-9._~-]+$/;
const PARAM = /^:[A-Za-z_$][A-Za-z0-9_$]*$/;

function addPath(root: Node, path: unknown) {
  if (typeof path !== "string" || !path.startsWith("/")) {
    root.open = true;
    return;
  }
  const trimmed = path.replace(/\/+$/, ""); // the router matches routes with their trailing slashes removed
  let at = root;
  if (trimmed !== "") {
    for (const seg of trimmed.slice(1).split("/")) {
      if (TEXT.test(seg)) {
        const key = seg.toLowerCase();
        let next = at.text.get(key);
        if (!next) at.text.set(key, (next = node()));
        at = next;
      } else if (PARAM.test(seg)) at = at.param ??= node();
      else {
        at.open = true;
        return;
      }
    }
  }
  at.end = true;
}

function addStack(root: Node, stack: readonly Layer[]) {
  for (const layer of stack) {
    if (layer.route) addPath(root, layer.route.path);
    else if (Array.isArray(layer.handle?.stack) && layer.rawPath === "/") addStack(root, layer.handle.stack as Layer[]);
    else root.open = true; // a middleware of the router's own, or a router under a path: runs for more than routes
  }
}

function admits(at: Node, segs: readonly string[], i: number): boolean {
  if (at.open) return true;
  if (i === segs.length) return at.end;
  if (at.end && i === segs.length - 1 && segs[i] === "") return true;
  const t = at.text.get(segs[i].toLowerCase());
  if (t && admits(t, segs, i + 1)) return true;
  return !!at.param && admits(at.param, segs, i + 1);
}

/** Whether a path (as the router sees it: after its mount point, without the query) could reach `tree`. */
function admitsPath(tree: Node, path: string | undefined): boolean {
  if (path === undefined || !path.startsWith("/")) return true;
  return admits(tree, path.slice(1).split("/"), 0);
}

export type GatedRouter = RequestHandler & {
  /** The router's own stack, so that the route table (tests/helpers/routes.ts) reads through the gate. */
  stack: unknown[];
  /** Whether the gate lets a path in (tests). */
  admits(path: string): boolean;
};

/** `router`, entered only by requests whose path could match one of its routes. Call once its routes are added. */
export function pathGate(router: Router): GatedRouter {
  const tree = node();
  addStack(tree, router.stack as Layer[]);
  const gate = (req: Request, res: Response, next: NextFunction) => {
    if (admitsPath(tree, req.path)) router(req, res, next);
    else next();
  };
  return Object.assign(gate, { stack: router.stack, admits: (path: string) => admitsPath(tree, path) });
}

/**
 * The domain routers' path gates (server/middleware/path-gate.ts) change which routers a request is matched
 * against, never where it ends: read from createApp()'s own route table, every route's path (with several values
 * for its parameters, in other case, with a trailing slash, longer, shorter, encoded) reaches the same route
 * layer — the same guard and handler — with the gates as without them, and no gate turns away a path that one of
 * its router's layers would match (checked with the router's own matchers).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApp } from "../../server/app";
import type { GatedRouter } from "../../server/middleware/path-gate";
import { createTestDb, type TestDb } from "../helpers/db";

interface Layer {
  route?: { path: unknown; _handlesMethod(method: string): boolean };
  handle?: { stack?: Layer[] } & Partial<GatedRouter>;
  rawPath?: unknown;
  match(path: string): boolean;
}

let t: TestDb;
let gates: GatedRouter[];
beforeAll(async () => {
  t = await createTestDb();
  const app = createApp({ db: t.db });
  const top = (app as unknown as { router: { stack: Layer[] } }).router.stack;
  const api = top.find((l) => l.rawPath === "/api" && Array.isArray(l.handle?.stack))!;
  gates = api.handle!.stack!.filter((l) => typeof l.handle?.admits === "function").map((l) => l.handle as GatedRouter);
});
afterAll(async () => {
  await t.drop();
});

/** Every route layer under a router's stack, in the order the router tries them. */
function routeLayers(stack: readonly Layer[]): Layer[] {
  return stack.flatMap((l) => (l.route ? [l] : Array.isArray(l.handle?.stack) ? routeLayers(l.handle.stack) : []));
}

/** The route layer a request reaches: the first whose path and method match, walking routers in order. */
function reached(method: string, path: string, gated: boolean): Layer | undefined {
  for (const g of gates) {
    if (gated && !g.admits(path)) continue;
    const hit = routeLayers(g.stack as Layer[]).find((l) => l.match(path) && l.route!._handlesMethod(method));
    if (hit) return hit;
  }
  return undefined;
}

function routeTable(): { methods: string[]; path: string }[] {
  return gates.flatMap((g) =>
    routeLayers(g.stack as Layer[]).map((l) => ({
      path: String(l.route!.path),
      methods: ["GET", "POST", "PUT", "PATCH", "DELETE"].filter((m) => l.route!._handlesMethod(m)),
    })),
  );
}

const VALUES = ["0b7c5d1e-8f2a-4c3b-9d4e-5f6a7b8c9d0e", "x", "Mixed.Case~1", "%2F", "board-7"];

/** Concrete paths from a route's pattern: each parameter filled, then the usual ways a path is bent. */
function pathsOf(pattern: string): string[] {
  const out: string[] = [];
  VALUES.forEach((v, i) => {
    const p = pattern.replace(/:[A-Za-z_$][A-Za-z0-9_$]*/g, () => (i % 2 ? v : VALUES[(i + 1) % VALUES.length]));
    out.push(p, p.toUpperCase(), `${p}/`, `${p}//`, `${p}/extra`, p.replace(/\/[^/]*$/, ""), `${p}.csv`);
    out.push(p.replace(/s/, "%73"), p.replace(/\/[^/]+/, "/x"));
  });
  return out;
}

describe("path gates on the domain routers", () => {
  it("every domain router is gated and the route table is read through the gates", () => {
    expect(gates.length).toBe(14);
    expect(routeTable().length).toBeGreaterThan(150);
  });

  it("no gate turns away a path one of its router's layers would match", () => {
    const corpus = new Set<string>(["/", "", "//", "/unknown", "/SITES", "/sites//defects", "/sites/x/defects.CSV"]);
    for (const r of routeTable()) for (const p of pathsOf(r.path)) corpus.add(p);
    const wrong: string[] = [];
    for (const g of gates) {
      const layers = routeLayers(g.stack as Layer[]);
      for (const p of corpus) if (!g.admits(p) && layers.some((l) => l.match(p))) wrong.push(p);
    }
    expect(corpus.size).toBeGreaterThan(1000);
    expect(wrong).toEqual([]);
  });

  it("every route's paths reach the same route layer (guard and handler) with the gates as without", () => {
    const differ: string[] = [];
    let checked = 0;
    for (const r of routeTable())
      for (const p of pathsOf(r.path))
        for (const m of ["GET", "POST", "PUT", "PATCH", "DELETE"]) {
          checked++;
          if (reached(m, p, true) !== reached(m, p, false)) differ.push(`${m} ${p}`);
        }
    expect(checked).toBeGreaterThan(5000);
    expect(differ).toEqual([]);
  });

  it("a register, overview or board-list request enters only its own domain's router", () => {
    for (const p of ["/sites/s1/defects", "/sites/s1/overview", "/sites/s1/boards"]) {
      const entered = gates.filter((g) => g.admits(p));
      expect(entered.length, p).toBe(1);
      expect(
        routeLayers(entered[0].stack as Layer[]).some((l) => l.match(p)),
        p,
      ).toBe(true);
    }
  });
});

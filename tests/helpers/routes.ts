/** Every method + path mounted on an Express app, read from its router stack (Express 5 / router 2). */
import type { Express } from "express";

export interface MountedRoute {
  method: string;
  path: string;
}

interface Layer {
  route?: { path: string | string[]; methods: Record<string, boolean> };
  handle?: { stack?: Layer[] };
  rawPath?: string | string[];
}

export function listRoutes(app: Express): MountedRoute[] {
  const out: MountedRoute[] = [];
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
        for (const p of paths)
          for (const [m, on] of Object.entries(layer.route.methods))
            if (on && m !== "_all") out.push({ method: m.toUpperCase(), path: prefix + p });
      } else if (layer.handle?.stack) {
        const raw = Array.isArray(layer.rawPath) ? layer.rawPath[0] : layer.rawPath;
        walk(layer.handle.stack, prefix + (raw && raw !== "/" ? raw : ""));
      }
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, "");
  return out;
}

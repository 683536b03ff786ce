/**
 * Starts the bench's bare-HTTP side (server/bench/floor-server.ts) as its own process, as the bench starts the server:
 * the paths' plans and answers go in a temporary file, the process prints its port. Used by server/cli/bench.ts and by
 * tests/server/bench-floor.api.test.ts.
 */
import { spawn } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { FloorPath } from "./floor-server";

export interface Floor {
  base: string;
  pid: number;
  /** Stops the process (SIGTERM, then its exit) and removes the plans' file. */
  stop: () => Promise<void>;
}

export async function startFloor(url: string, paths: Record<string, FloorPath>, poolMax: number): Promise<Floor> {
  const dir = mkdtempSync(join(tmpdir(), "tideline-floor-"));
  const file = join(dir, "plans.json");
  writeFileSync(file, JSON.stringify(paths));
  const child = spawn(process.execPath, ["--import", "tsx", join(import.meta.dirname, "floor-server.ts"), file], {
    cwd: join(import.meta.dirname, "..", ".."),
    env: { ...process.env, DATABASE_URL: url, FLOOR_POOL_MAX: String(poolMax) },
    stdio: ["ignore", "pipe", "inherit"],
  });
  const stop = async () => {
    if (child.exitCode === null && child.signalCode === null) {
      child.kill("SIGTERM");
      await new Promise((r) => child.once("exit", r));
    }
    rmSync(dir, { recursive: true, force: true });
  };
  try {
    const port = await new Promise<number>((resolve, reject) => {
      let out = "";
      child.stdout!.on("data", (d: Buffer) => {
        out += d.toString();
        const m = /listening (\d+)/.exec(out);
        if (m) resolve(Number(m[1]));
      });
      child.once("exit", (code) => reject(new Error(`the bare-HTTP side exited (code ${code})`)));
    });
    return { base: `http://127.0.0.1:${port}`, pid: child.pid!, stop };
  } catch (e) {
    await stop();
    throw e;
  }
}

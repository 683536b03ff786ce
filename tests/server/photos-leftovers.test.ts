import { spawnSync } from "node:child_process";
import { mkdtemp, mkdir, readdir, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";

const dirs: string[] = [];
afterAll(async () => {
  for (const d of dirs) await rm(d, { recursive: true, force: true });
});

describe("partial photo files at start", () => {
  it("removes a zero-byte .partial left by a process that is gone, and keeps photos and another live writer's file", async () => {
    const root = await mkdtemp(join(tmpdir(), "tideline-leftovers-"));
    dirs.push(root);
    const folder = join(root, "sites", "s1", "p1");
    await mkdir(folder, { recursive: true });
    const gone = spawnSync(process.execPath, ["-e", ""]).pid!; // ran and exited
    const live = process.ppid; // our parent, running while this test runs
    await writeFile(join(folder, "original.jpg"), "jpeg bytes");
    await writeFile(join(folder, `display.jpg.${gone}.partial`), "");
    await writeFile(join(folder, `thumb.jpg.${live}.partial`), "half");
    const removed = await new LocalDiskStorage(root).removeLeftovers();
    expect(removed).toEqual([`sites/s1/p1/display.jpg.${gone}.partial`]);
    expect((await readdir(folder)).sort()).toEqual(["original.jpg", `thumb.jpg.${live}.partial`]);
  });
});

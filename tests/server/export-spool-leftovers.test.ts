import { spawnSync } from "node:child_process";
import { mkdtemp, readdir, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { removeSpoolLeftovers } from "../../server/export-stream";

const dirs: string[] = [];
afterAll(async () => {
  for (const d of dirs) await rm(d, { recursive: true, force: true });
});

describe("download spool files at start", () => {
  it("removes the files of a process that is gone, keeps a running process's and anything not a spool file", async () => {
    const dir = await mkdtemp(join(tmpdir(), "tideline-spool-"));
    dirs.push(dir);
    const gone = spawnSync(process.execPath, ["-e", ""]).pid!; // ran and exited
    const live = process.ppid; // our parent, running while this test runs
    const uuid = "0b7c6f3e-6a3f-4f0e-9a51-2f4d1c0e7a10";
    await writeFile(join(dir, `tideline-export-${gone}-${uuid}.part`), "half a csv");
    await writeFile(join(dir, `tideline-export-${live}-${uuid}.part`), "being sent");
    await writeFile(join(dir, "tideline-prepared-x.part"), "a prepared file's, not ours");
    expect(await removeSpoolLeftovers(dir)).toEqual([`tideline-export-${gone}-${uuid}.part`]);
    expect((await readdir(dir)).sort()).toEqual([`tideline-export-${live}-${uuid}.part`, "tideline-prepared-x.part"]);
    expect(await removeSpoolLeftovers(join(dir, "no-such-folder"))).toEqual([]);
  });
});

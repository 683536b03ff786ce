/**
 * The embedded cluster's backends keep the memory a statement used for the next one (db/pg.ts
 * `POSTGRES_MALLOC_TUNABLES`). Without it glibc's malloc hands the top of a backend's heap back to the kernel after
 * each statement of a few MB and the next one takes it afresh, one page fault per 4 kB page: the same sort of
 * 20,000 rows read ~615 minor faults a run and ~50 ms with glibc's defaults, 0 and ~24 ms with the settings
 * (2026-12-05, this machine; DEVELOPERS.md "PostgreSQL's memory kept between statements").
 * Sources: the GNU C Library manual, "Memory Allocation Tunables" (glibc.malloc.mmap_threshold,
 * glibc.malloc.trim_threshold; GLIBC_TUNABLES as colon-separated name=value pairs) and mallopt(3) (M_MMAP_THRESHOLD's
 * dynamic adjustment, M_TRIM_THRESHOLD); proc(5) for /proc/<pid>/stat (field 10, minflt) and /proc/<pid>/environ.
 */
import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import pg from "pg";
import { clusterTunables, POSTGRES_MALLOC_TUNABLES } from "../../db/pg";
import { createTestDb, type TestDb } from "../helpers/db";

let t: TestDb;
let c: pg.Client;
let pid: number;

beforeAll(async () => {
  t = await createTestDb();
  c = new pg.Client({ connectionString: t.url });
  await c.connect();
  pid = (await c.query<{ pid: number }>("SELECT pg_backend_pid() AS pid")).rows[0].pid;
});
afterAll(async () => {
  await c?.end();
  await t?.drop();
});

/** Minor page faults of the backend so far (proc(5): /proc/<pid>/stat, the 10th field; the name may hold spaces). */
const minorFaults = () => Number(readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ")[7]);

describe("the embedded PostgreSQL's memory between statements", () => {
  it("starts the server with glibc's malloc told to keep a statement's memory", () => {
    // A backend is forked from the server and keeps its environment. glibc 2.36 splits the value at its colons in
    // place, so the pairs are looked for one by one.
    const env = readFileSync(`/proc/${pid}/environ`, "utf8")
      .split(/[\0:]/)
      .map((e) => e.replace(/^GLIBC_TUNABLES=/, ""))
      .filter((e) => e.startsWith("glibc."));
    for (const pair of POSTGRES_MALLOC_TUNABLES.split(":")) expect(env).toContain(pair);
  });

  it("leaves a tunable the environment already sets to that setting (it comes after, and glibc applies them in order)", () => {
    expect(clusterTunables(undefined)).toBe(POSTGRES_MALLOC_TUNABLES);
    expect(clusterTunables("glibc.malloc.trim_threshold=0").split(":").at(-1)).toBe("glibc.malloc.trim_threshold=0");
  });

  it("does not take a repeated statement's memory from the kernel again each time", async () => {
    // A sort of 20,000 short texts in memory: a few MB of memory contexts, taken and freed by each run.
    const sort = "SELECT count(*) FROM (SELECT g, md5(g::text) AS h FROM generate_series(1, $1::int) g ORDER BY h) s";
    for (let i = 0; i < 3; i++) await c.query(sort, [20_000]);
    const before = minorFaults();
    const runs = 10;
    for (let i = 0; i < runs; i++) await c.query(sort, [20_000]);
    const perRun = (minorFaults() - before) / runs;
    // With glibc's defaults: ~615 a run on this machine. Kept memory: 0 (a few for anything else the backend does).
    expect(perRun, "restart the test cluster if it was started before db/pg.ts set GLIBC_TUNABLES").toBeLessThan(50);
  });
});

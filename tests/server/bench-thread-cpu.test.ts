import { Worker } from "node:worker_threads";
import { describe, expect, it } from "vitest";
import { threadCpuBetween, threadSampleOf, type ThreadSample } from "../../server/bench/load";

// The ingest bench's CPU by thread group (server/cli/bench-ingest.ts): counted thread by thread between two samples,
// never by subtracting two group sums — a thread that ended in between made such a difference negative.
const sample = (rows: [number, "main" | "vips" | "other", string, number][]): ThreadSample =>
  new Map(rows.map(([tid, group, comm, seconds]) => [tid, { group, comm, seconds }]));
const bySum = (s: ThreadSample) => {
  const g = { main: 0, vips: 0, other: 0 };
  for (const t of s.values()) g[t.group] += t.seconds;
  return g;
};

describe("CPU by thread between two samples", () => {
  it("a thread that ended in between counts nothing and is counted as ended; the group sums would have gone negative", () => {
    const before = sample([
      [100, "main", "node", 5],
      [101, "other", "libuv-worker", 2],
      [102, "other", "libuv-worker", 0.4],
    ]);
    const after = sample([
      [100, "main", "node", 5.25],
      [101, "other", "libuv-worker", 2.1],
    ]);
    expect(bySum(after).other - bySum(before).other).toBeCloseTo(-0.3); // the old figure
    // The process's own total keeps the ended thread's time: 0.05 s beyond the live threads' 0.35 s.
    before.process = 7.4;
    after.process = 7.8;
    const r = threadCpuBetween(before, after);
    expect(r.cpu.main).toBeCloseTo(0.25);
    expect(r.cpu.other).toBeCloseTo(0.1);
    expect(r.ended).toBe(1);
    expect(r.endedSeconds).toBeCloseTo(0.05);
  });

  it("a thread started in between counts all its seconds; so does a new thread given an old one's id", () => {
    const before = sample([
      [100, "main", "node", 1],
      [103, "vips", "vips-0", 3],
    ]);
    const after = sample([
      [100, "main", "node", 1],
      [103, "vips", "vips-1", 0.5], // reused id, another thread
      [104, "vips", "vips-2", 0.2],
    ]);
    const r = threadCpuBetween(before, after);
    expect(r.cpu).toEqual({ main: 0, vips: 0.7, other: 0 });
    expect(r.ended).toBe(0);
  });

  it("on this process: a worker thread that burns CPU and ends between the samples leaves no negative figure", async () => {
    const worker = new Worker(
      `const { parentPort } = require("node:worker_threads");
       const end = Date.now() + 300; let x = 0; while (Date.now() < end) x += Math.sqrt(x + 1);
       parentPort.postMessage("burnt");
       parentPort.once("message", () => process.exit(0));`,
      { eval: true },
    );
    await new Promise((r) => worker.once("message", r));
    const before = threadSampleOf(process.pid)!;
    worker.postMessage("go");
    await new Promise((r) => worker.once("exit", r));
    const after = threadSampleOf(process.pid)!;
    const r = threadCpuBetween(before, after);
    for (const v of Object.values(r.cpu)) expect(v).toBeGreaterThanOrEqual(0);
    expect(r.ended).toBeGreaterThanOrEqual(1);
    expect(r.endedSeconds).toBeGreaterThanOrEqual(0);
  });
});

/**
 * Measures for the bench's load phase: the server's event-loop delay as the product
 * itself exposes it (prom-client's `nodejs_eventloop_lag_*` on /api/metrics, a perf_hooks
 * monitorEventLoopDelay histogram that prom-client resets at every scrape), a do-nothing "canary"
 * process's own event-loop delay over the same seconds (what the machine's other load alone costs
 * a Node process: on a shared 2-core machine a runnable process waits for a core, and that wait
 * counts as event-loop delay too), and CPU time from /proc for the server and PostgreSQL.
 *
 * Both delays are reported beyond the histogram's resolution: monitorEventLoopDelay records the whole
 * interval between two of its timer ticks (an idle process at a resolution of 10 ms reads min ≈ 9,
 * mean ≈ 10.4 ms), so the resolution is subtracted to leave the time the loop was late.
 */
import { spawn } from "node:child_process";
import { readdirSync, readFileSync } from "node:fs";
import { EVENT_LOOP_RESOLUTION_MS } from "../observability/metrics";

/** A delay read from a monitorEventLoopDelay histogram, less its resolution (never below 0). */
const beyond = (ms: number) => Math.max(0, ms - EVENT_LOOP_RESOLUTION_MS);

/** CPU seconds (user + system) of one process, from /proc/<pid>/stat; NaN when it is gone. */
export function cpuSecondsOf(pid: number, statPath = `/proc/${pid}/stat`): number {
  try {
    const stat = readFileSync(statPath, "utf8");
    const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    // fields 14 and 15 (utime, stime) of proc(5), counted from field 3 (state) here
    return (Number(f[11]) + Number(f[12])) / 100; // USER_HZ is 100 on Linux
  } catch {
    return NaN;
  }
}

export type ThreadGroup = "main" | "vips" | "other";
/** One reading of a process's threads: each live thread's group and CPU seconds, by thread id. */
export type ThreadSample = Map<number, { group: ThreadGroup; comm: string; seconds: number }> & {
  /** The whole process's CPU seconds (/proc/<pid>/stat), which keeps the time of threads that have ended. */
  process?: number;
};

/**
 * CPU seconds of one process's threads, by thread id (from /proc/<pid>/task/<tid>/stat and comm), each in its group:
 * the main thread (JavaScript: HTTP, middleware, queries, streams, GC's main-thread part), libvips' worker threads
 * (sharp's image work), and the rest (libuv's pool for file I/O and hashing, V8's helpers). Null when the process
 * is gone.
 */
export function threadSampleOf(pid: number): ThreadSample | null {
  const out: ThreadSample = new Map();
  out.process = cpuSecondsOf(pid);
  let tids: string[];
  try {
    tids = readdirSync(`/proc/${pid}/task`);
  } catch {
    return null;
  }
  for (const tid of tids) {
    try {
      const comm = readFileSync(`/proc/${pid}/task/${tid}/comm`, "utf8").trim();
      const seconds = cpuSecondsOf(Number(tid), `/proc/${pid}/task/${tid}/stat`);
      if (Number.isNaN(seconds)) continue; // the thread ended between readdir and read
      const group: ThreadGroup = Number(tid) === pid ? "main" : /vips/i.test(comm) ? "vips" : "other";
      out.set(Number(tid), { group, comm, seconds });
    } catch {
      // the thread ended between readdir and read
    }
  }
  return out;
}

/**
 * The CPU seconds each group of threads used between two samples, thread by thread, so no figure can go below zero.
 * A thread summed by group before and after made one: a thread that ended in between took its seconds out of the
 * second sum ("other" read as much as −40 ms a photo). Now:
 * - a thread in both samples counts what it used in between;
 * - a thread only in the second started in between: all its seconds count (so does a thread id the kernel gave
 *   again to a new thread: a different name, or fewer seconds than the old one had);
 * - a thread only in the first ended in between: /proc keeps nothing of it, so it counts in no group and `ended`
 *   says how many; what it used after the first sample is `endedSeconds`: the process's own total (which keeps
 *   ended threads' time) less what the live threads used, never below zero (both are in 10 ms ticks).
 */
export function threadCpuBetween(before: ThreadSample | null, after: ThreadSample | null) {
  const cpu: Record<ThreadGroup, number> = { main: 0, vips: 0, other: 0 };
  if (!before || !after) return { cpu: { main: NaN, vips: NaN, other: NaN }, ended: 0, endedSeconds: NaN };
  for (const [tid, a] of after) {
    const b = before.get(tid);
    const same = b && b.comm === a.comm && b.seconds <= a.seconds;
    cpu[a.group] += same ? a.seconds - b.seconds : a.seconds;
  }
  let ended = 0;
  for (const tid of before.keys()) if (!after.has(tid)) ended++;
  const live = cpu.main + cpu.vips + cpu.other;
  const whole = (after.process ?? NaN) - (before.process ?? NaN);
  const endedSeconds = ended && Number.isFinite(whole) ? Math.max(0, whole - live) : 0;
  return { cpu, ended, endedSeconds };
}

/** The parent pid of a process (/proc/<pid>/stat field 4). */
export function parentOf(pid: number): number {
  const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
  return Number(stat.slice(stat.lastIndexOf(")") + 2).split(" ")[1]);
}

/** CPU seconds of each child of `postmaster` (the cluster's backends and helpers) running now, by pid. */
export function clusterCpu(postmaster: number): Map<number, number> {
  const out = new Map<number, number>();
  for (const name of readdirSync("/proc")) {
    if (!/^\d+$/.test(name)) continue;
    const pid = Number(name);
    try {
      if (parentOf(pid) === postmaster) out.set(pid, cpuSecondsOf(pid) || 0);
    } catch {
      // gone between readdir and read
    }
  }
  return out;
}

/**
 * CPU seconds the cluster spent between two snapshots: the growth of every process alive at the
 * end (a backend that started in between counts whole). A backend that ended in between is left
 * out (its time is gone with it), so this is a lower bound when pools close idle connections.
 */
export function cpuBetween(before: Map<number, number>, after: Map<number, number>): number {
  let sum = 0;
  for (const [pid, s] of after) sum += s - (before.get(pid) ?? 0);
  return sum;
}

/** Reads (and so resets) the server's event-loop delay figures from its /api/metrics, beyond the resolution. */
export async function eventLoopDelay(base: string, token: string): Promise<{ p99: number; max: number }> {
  const r = await fetch(`${base}/api/metrics`, { headers: { authorization: `Bearer ${token}` } });
  if (!r.ok) throw new Error(`/api/metrics answered ${r.status}`);
  const text = await r.text();
  const read = (name: string) => {
    const m = new RegExp(`^tideline_nodejs_eventloop_lag_${name}_seconds(?:\\{[^}]*\\})? ([0-9.eE+-]+)$`, "m").exec(
      text,
    );
    return m ? beyond(Number(m[1]) * 1000) : NaN;
  };
  return { p99: read("p99"), max: read("max") };
}

/** A Node process that does nothing but measure its own event-loop delay (beyond the resolution) until stopped. */
export function startCanary() {
  const child = spawn(
    process.execPath,
    [
      "-e",
      `const h = require("node:perf_hooks").monitorEventLoopDelay({ resolution: ${EVENT_LOOP_RESOLUTION_MS} }); h.enable();
       setInterval(() => {}, 1000);
       process.on("message", () => { process.send({ p99: h.percentile(99) / 1e6, max: h.max / 1e6 }, () => process.exit(0)); });`,
    ],
    { stdio: ["ignore", "ignore", "inherit", "ipc"] },
  );
  return {
    stop: () =>
      new Promise<{ p99: number; max: number }>((resolve) => {
        child.once("message", (m) => {
          const d = m as { p99: number; max: number };
          resolve({ p99: beyond(d.p99), max: beyond(d.max) });
        });
        child.send("read");
      }),
  };
}

/**
 * Times each of `paths` (default `/api/health`) every `everyMs`, each on its own keep-alive connection, from a process
 * of its own, until stopped; resolves with each path's answer times in ms (a failed or non-200 answer counts with the
 * time it took). The bench's 50 clients share one event loop in the bench's process: a probe timed there waits,
 * besides the server, for that loop to read its answer among the clients' (measured 2026-12-03: see DEVELOPERS "50
 * clients: where the delay is"). The bench times `/api/health` (a `select 1` on the probes' own connection) beside
 * `/api/health/live` (answered by the process alone): the difference is the database probe's own wait.
 */
export function startHealthProber(base: string, everyMs = 50, paths: string[] = ["/api/health"]) {
  const child = spawn(
    process.execPath,
    [
      "-e",
      `const http = require("node:http");
       const paths = ${JSON.stringify(paths)};
       let stop = false;
       process.on("message", () => { stop = true; });
       const loop = async (path) => {
         const agent = new http.Agent({ keepAlive: true, maxSockets: 1 });
         const times = [];
         const once = () => new Promise((resolve) => {
           const a = performance.now();
           const req = http.get(${JSON.stringify(base)} + path, { agent }, (res) => {
             res.resume(); res.on("end", () => resolve(performance.now() - a)); res.on("error", () => resolve(performance.now() - a));
           });
           req.on("error", () => resolve(performance.now() - a));
         });
         while (!stop) { times.push(await once()); await new Promise((r) => setTimeout(r, ${everyMs})); }
         agent.destroy();
         return times;
       };
       Promise.all(paths.map(loop)).then((all) => process.send(all, () => process.exit(0)));`,
    ],
    { stdio: ["ignore", "ignore", "inherit", "ipc"] },
  );
  return {
    stop: () =>
      new Promise<number[][]>((resolve) => {
        child.once("message", (m) => resolve(m as number[][]));
        child.send("stop");
      }),
  };
}

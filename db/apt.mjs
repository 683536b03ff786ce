// apt-get for the bootstrap (plain JavaScript: it runs before npm ci). When another
// package install holds the system's package lock (unattended upgrades, a second
// `npm start`), apt-get fails at once with "Could not get lock"; instead this waits,
// saying so, up to a bound (TIDELINE_APT_LOCK_WAIT_S, default 300 s), then gives up
// with a clear message. apt's own DPkg::Lock::Timeout covers the dpkg lock; the retry
// loop also covers the package lists' lock that `apt-get update` takes.
import { spawnSync } from "node:child_process";

const LOCK_HELD =
  /Could not get lock|Unable to acquire the dpkg frontend lock|Unable to lock (the )?(administration )?directory|is another process using it/i;

function sleepSync(ms) {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

/** Runs apt-get with `args`; returns its exit status. `say` prints a progress line. */
export function aptGet(args, { cwd, env = process.env, say = (m) => process.stdout.write(`[tideline] ${m}\n`) } = {}) {
  const bin = env.TIDELINE_APT_GET || "apt-get";
  const waitS = Number(env.TIDELINE_APT_LOCK_WAIT_S ?? 300);
  const retryMs = Number(env.TIDELINE_APT_LOCK_RETRY_MS ?? 5000);
  const deadline = Date.now() + waitS * 1000;
  let told = false;
  for (;;) {
    const left = Math.max(0, Math.ceil((deadline - Date.now()) / 1000));
    const r = spawnSync(bin, ["-o", `DPkg::Lock::Timeout=${left}`, ...args], {
      cwd,
      env,
      stdio: ["inherit", "pipe", "pipe"],
      encoding: "utf8",
    });
    if (r.error) throw r.error;
    const out = `${r.stdout ?? ""}${r.stderr ?? ""}`;
    if (r.status === 0 || !LOCK_HELD.test(out)) {
      process.stdout.write(r.stdout ?? "");
      process.stderr.write(r.stderr ?? "");
      return r.status ?? 1;
    }
    if (Date.now() >= deadline) {
      process.stderr.write(r.stderr ?? "");
      say(
        `another package install still holds the package lock after ${waitS} s; giving up. Run the command again when it has finished (or set TIDELINE_APT_LOCK_WAIT_S).`,
      );
      return r.status ?? 1;
    }
    if (!told) say(`another package install holds the package lock; waiting for it (up to ${waitS} s)…`);
    told = true;
    sleepSync(Math.min(retryMs, Math.max(0, deadline - Date.now())));
  }
}

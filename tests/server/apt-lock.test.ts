import { spawnSync } from "node:child_process";
import { chmodSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { projectRoot } from "../../db/pg";

const dir = mkdtempSync(join(tmpdir(), "tideline-apt-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A stand-in for apt-get that reports the lock as held for its first `busy` calls (apt's own wording). */
function fakeAptGet(busy: number) {
  const count = join(dir, `count-${busy}`);
  const script = join(dir, `apt-get-${busy}`);
  writeFileSync(count, "0");
  writeFileSync(
    script,
    `#!/bin/sh
n=$(cat ${count}); n=$((n+1)); echo $n > ${count}
echo "$@" >> ${count}.args
if [ $n -le ${busy} ]; then
  echo "E: Could not get lock /var/lib/dpkg/lock-frontend. It is held by process 4242 (apt-get)" >&2
  echo "E: Unable to acquire the dpkg frontend lock (/var/lib/dpkg/lock-frontend), is another process using it?" >&2
  exit 100
fi
echo "installed"
`,
  );
  chmodSync(script, 0o755);
  return {
    script,
    calls: () => Number(readFileSync(count, "utf8").trim()),
    args: () => readFileSync(`${count}.args`, "utf8"),
  };
}

function runApt(script: string, waitS: number) {
  const code = `import("./db/apt.mjs").then((m) => process.exit(m.aptGet(["install", "-y", "postgresql"])))`;
  return spawnSync(process.execPath, ["-e", code], {
    cwd: projectRoot,
    encoding: "utf8",
    env: {
      ...process.env,
      TIDELINE_APT_GET: script,
      TIDELINE_APT_LOCK_WAIT_S: String(waitS),
      TIDELINE_APT_LOCK_RETRY_MS: "100",
    },
  });
}

describe("apt-get while another install holds the package lock (db/apt.mjs)", () => {
  it("waits, says so once, and goes on when the lock is released", () => {
    const apt = fakeAptGet(3);
    const r = runApt(apt.script, 30);
    expect(r.status).toBe(0);
    expect(apt.calls()).toBe(4);
    expect(r.stdout.match(/holds the package lock; waiting for it \(up to 30 s\)/g)).toHaveLength(1);
    expect(r.stdout).toContain("installed");
    expect(apt.args()).toMatch(/-o DPkg::Lock::Timeout=\d+ install -y postgresql/);
  });

  it("gives up after its bound with a clear message and apt's failure status", () => {
    const apt = fakeAptGet(1_000_000);
    const r = runApt(apt.script, 1);
    expect(r.status).toBe(100);
    expect(r.stdout).toMatch(/still holds the package lock after 1 s; giving up/);
  });
});

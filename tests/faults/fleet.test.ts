/**
 * The proof: Tideline as a fleet runs it. Three processes against ONE test
 * database, ONE S3-compatible store (s3rver) and ONE SMTP server:
 *   A — `server/index.ts`, web + worker (the default of `npm start`),
 *   B — `server/index.ts` with TIDELINE_WORKER=off (a web-only instance),
 *   W — `server/cli/worker.ts` (what `npm run worker` runs): jobs and schedules, no web.
 * This is the same arrangement as server/deploy/compose.yaml (two web instances and a
 * worker behind a proxy); here the test plays the proxy: it sends each request to the
 * next instance and, like a proxy, retries on another one only when it could not connect.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtemp, rm } from "node:fs/promises";
import { request } from "node:http";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { CreateBucketCommand } from "@aws-sdk/client-s3";
import { sql } from "kysely";
import S3rver from "s3rver";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { projectRoot } from "../../db/pg";
import { OVERDUE_WATCH_JOB } from "../../server/jobs/registry";
import { FakeMailbox, startFakeSmtp, type FakeSmtp } from "../../server/mail/fake-smtp";
import { S3Storage } from "../../server/photos/storage/s3";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew, makeUser } from "../helpers/fixtures";
import { Client, TEST_PASSWORD } from "../helpers/http";
import { form, makeBoard, noisyJpeg } from "../helpers/photo-fixtures";
import { freePort, sleep, stallableRelay, waitFor } from "./helpers";

interface Proc {
  name: string;
  child: ChildProcess;
  output: string;
  exit: Promise<{ code: number | null; signal: string | null }>;
  base?: string;
}

let t: TestDb;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let s3: S3rver;
let s3dir: string;
let store: S3Storage;
let smtp: FakeSmtp | null;
let smtpPort: number;
const mailbox = new FakeMailbox();
let A: Proc;
let B: Proc;
let W: Proc;
/** How each process was started, to start it again after the kill -9 test. */
const launch = new Map<string, { script: string; env: Record<string, string>; base?: string }>();
/** The object store as the instances reach it: through a relay that can stall it. */
let relay: Awaited<ReturnType<typeof stallableRelay>>;
const BUCKET = "tideline-fleet";

function start(name: string, script: string, env: Record<string, string>): Proc {
  launch.set(name, { script, env });
  // `node --import tsx`, as the container runs it: signals reach the server itself. (The tsx
  // command-line wrapper relays SIGTERM and SIGKILLs a child that does not confirm within 30 ms.)
  const child = spawn(process.execPath, ["--import", "tsx", script], {
    cwd: projectRoot,
    env: { ...process.env, ...env, VITEST: "", LOG_LEVEL: "info" },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const p: Proc = {
    name,
    child,
    output: "",
    exit: new Promise((r) => child.once("exit", (code, signal) => r({ code, signal }))),
  };
  child.stdout!.on("data", (d) => (p.output += d));
  child.stderr!.on("data", (d) => (p.output += d));
  return p;
}

/** JSON log lines a process wrote (pino: one object per line). */
const logLines = (p: Proc) =>
  p.output
    .split("\n")
    .filter((l) => l.startsWith("{"))
    .map((l) => JSON.parse(l) as Record<string, unknown>);

async function startSmtp() {
  smtp = await startFakeSmtp({ port: smtpPort, mailbox });
  expect(smtp.port).toBe(smtpPort);
}

beforeAll(async () => {
  t = await createTestDb();
  fx = await makeCrew(t.db);
  s3dir = await mkdtemp(join(tmpdir(), "tideline-fleet-s3-"));
  s3 = new S3rver({ address: "127.0.0.1", port: 0, directory: s3dir, silent: true });
  const s3port = ((await s3.run()) as AddressInfo).port;
  relay = await stallableRelay(s3port);
  const s3env = {
    PHOTO_STORAGE: "s3",
    S3_BUCKET: BUCKET,
    S3_ENDPOINT: `http://127.0.0.1:${relay.port}`,
    S3_REGION: "us-east-1",
    S3_ACCESS_KEY_ID: "S3RVER",
    S3_SECRET_ACCESS_KEY: "S3RVER",
    S3_FORCE_PATH_STYLE: "1",
  };
  store = new S3Storage({
    bucket: BUCKET,
    endpoint: `http://127.0.0.1:${s3port}`, // the test's own view of the store, never stalled
    region: "us-east-1",
    accessKeyId: "S3RVER",
    secretAccessKey: "S3RVER",
    forcePathStyle: true,
  });
  await store.client.send(new CreateBucketCommand({ Bucket: BUCKET }));
  smtpPort = await freePort();
  await startSmtp();

  const [portA, portB] = [await freePort(), await freePort()];
  const common = {
    ...s3env,
    DATABASE_URL: t.url,
    SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
    PUBLIC_URL: `http://127.0.0.1:${portA}`,
    TIDELINE_JOB_POLL_SECONDS: "0.5",
    TIDELINE_MAIL_RETRY_DELAY_SECONDS: "1",
    // The overdue watch check on a one-minute schedule, so a test sees it fire within a minute.
    RTS_OVERDUE_CRON: "* * * * *",
    DATABASE_POOL_MAX: "5",
    // A render's lease (server/jobs leaseSeconds) short, and the queue's maintenance frequent, so
    // the kill -9 case sees the render retried within seconds rather than a minute and a half.
    PREPARED_FILE_LEASE_SECONDS: "8",
    TIDELINE_JOB_MAINTENANCE_SECONDS: "2",
    PREPARED_FILE_RETRY_DELAY_SECONDS: "1",
  };
  // One at a time: on a cold clone each process compiles the server through tsx, and three
  // compiling at once on two cores once took more than two minutes (CI). A's start fills tsx's
  // transform cache, so B and W then start in seconds.
  A = start("A", "server/index.ts", { ...common, PORT: String(portA), SHUTDOWN_DRAIN_DELAY_MS: "3000" });
  A.base = `http://127.0.0.1:${portA}`;
  await untilReady(A);
  B = start("B", "server/index.ts", { ...common, PORT: String(portB), TIDELINE_WORKER: "off" });
  B.base = `http://127.0.0.1:${portB}`;
  W = start("W", "server/cli/worker.ts", { ...common });
  await untilReady(B);
  await untilUp(W, "the worker to start", () => W.output.includes("worker running"));
}, 600_000);

/**
 * Waits for a started process, but says why when it does not come: it failed at once if the
 * process exited, and on a timeout it gives `what` (read then, so it can name the last answer) and
 * the process's log.
 */
async function untilUp(
  p: Proc,
  what: string | (() => string),
  probe: () => boolean | Promise<boolean>,
  timeoutMs = 240_000,
) {
  const until = Date.now() + timeoutMs;
  const waitingFor = () => (typeof what === "string" ? what : what());
  let exited: { code: number | null; signal: string | null } | null = null;
  void p.exit.then((e) => (exited = e));
  for (;;) {
    if (await Promise.resolve(probe()).catch(() => false)) return;
    if (exited)
      throw new Error(
        `${p.name} exited (${JSON.stringify(exited)}) before ${waitingFor()}; its log:\n${p.output.slice(-4000)}`,
      );
    if (Date.now() > until)
      throw new Error(
        `timed out after ${timeoutMs / 1000} s waiting for ${waitingFor()}; its log:\n${p.output.slice(-4000)}`,
      );
    await sleep(250);
  }
}

async function untilReady(p: Proc) {
  let last = "no answer yet";
  await untilUp(
    p,
    () => `instance ${p.name} to be ready (last readiness answer: ${last})`,
    async () => {
      const r = await fetch(`${p.base}/api/health/ready`).catch((e: Error) => {
        last = `no answer (${e.message})`;
        throw e;
      });
      last = `${r.status} ${await r.text()}`;
      return r.status === 200;
    },
  );
}

afterAll(async () => {
  for (const p of [A, B, W]) if (p && p.child.exitCode === null) p.child.kill("SIGTERM");
  await Promise.all([A, B, W].filter(Boolean).map((p) => Promise.race([p.exit, sleep(15_000)])));
  store?.client.destroy();
  await smtp?.stop();
  await relay?.close();
  await s3?.close();
  await t?.drop();
  if (s3dir) await rm(s3dir, { recursive: true, force: true });
});

/** Starts a process again as it was first started (same port for a web instance). */
async function restart(p: Proc): Promise<Proc> {
  const l = launch.get(p.name)!;
  const q = start(p.name, l.script, l.env);
  q.base = p.base;
  if (q.base) await untilReady(q);
  else await untilUp(q, "the worker to start", () => q.output.includes("worker running"));
  return q;
}

/** A client of one instance that carries a cookie got from another (what a load balancer does to a browser). */
const clientOn = (p: Proc, cookie = "") => Object.assign(new Client(p.base!), { cookie });

describe("two web instances and a worker on one database, one object store and one mail server", () => {
  it("a session made through A is a session on B; signing out on B ends it on A", async () => {
    const viaA = clientOn(A);
    await viaA.signIn(fx.crew.curator.email);
    const onB = clientOn(B, viaA.cookie);
    const me = await onB.get("/api/session");
    expect(me.status).toBe(200);
    expect(JSON.stringify(me.body)).toContain(fx.crew.curator.email);
    expect((await onB.post("/api/auth/sign-out")).status).toBeLessThan(300);
    expect((await clientOn(A, viaA.cookie).get("/api/session")).status).toBe(401);
  });

  it("a photo uploaded through B (no worker there) gets its renditions from a worker, and A serves them", async () => {
    const board = await makeBoard(t.db, fx.siteId, ["3-1"]);
    const photographer = clientOn(B);
    await photographer.signIn(fx.crew.photographer.email);
    const original = await noisyJpeg(800, 600);
    const up = await photographer.call(
      "POST",
      `/api/sites/${fx.siteId}/photos`,
      form([{ name: "IMG_3-1.jpg", data: original }], { positionId: board.positions["3-1"].id }),
    );
    expect(up.status).toBe(201);
    const id = up.body.photos[0].id as string;
    expect(up.body.photos[0].renditionState).toBe("processing");
    const onA = clientOn(A, photographer.cookie);
    const photo = await waitFor(
      "the renditions",
      async () => {
        const r = await onA.get(`/api/sites/${fx.siteId}/photos/${id}`);
        return r.body?.photo?.renditionState === "ready" ? r.body.photo : null;
      },
      60_000,
      250,
    );
    expect(photo).toBeTruthy();
    const get = async (rendition: string) => {
      const res = await fetch(`${A.base}/api/sites/${fx.siteId}/photos/${id}/${rendition}`, {
        headers: { cookie: photographer.cookie },
      });
      return { status: res.status, body: Buffer.from(await res.arrayBuffer()) };
    };
    const original2 = await get("original");
    expect(original2.status).toBe(200);
    expect(original2.body.equals(original)).toBe(true); // byte for byte through the store
    const display = await get("display");
    expect(display.status).toBe(200);
    expect((await sharp(display.body).metadata()).format).toBe("jpeg");
    // The files are in the shared store, not on either instance's disk.
    expect((await store.listKeys(`sites/${fx.siteId}/${id}/`)).length).toBe(3);
  });

  it("sign-in throttling counts failures made on A and on B together", async () => {
    const u = await makeUser(t.db, { siteId: fx.siteId, role: "viewer" });
    const [a, b] = [clientOn(A), clientOn(B)];
    for (let i = 0; i < 10; i++) {
      const r = await (i % 2 ? b : a).post("/api/auth/sign-in", { email: u.email, password: "wrong-password-123" });
      expect(r.status).toBe(401);
    }
    // The account's allowance (10 failures) is spent across both instances; either now refuses.
    for (const c of [a, b]) {
      const r = await c.post("/api/auth/sign-in", { email: u.email, password: TEST_PASSWORD });
      expect(r.status).toBe(429);
      expect(Number(r.headers.get("retry-after"))).toBeGreaterThan(0);
    }
  });

  it("an invitation queued while the mail server is down is delivered once after it comes back", async () => {
    await smtp!.stop();
    smtp = null;
    const curator = clientOn(A);
    await curator.signIn(fx.crew.curator.email);
    const email = "late.letter@example.test";
    const r = await curator.post(`/api/sites/${fx.siteId}/invitations`, { email, role: "volunteer" });
    expect(r.status).toBe(201);
    // The worker tries, fails and keeps the message queued; the curator sees "not sent yet".
    await waitFor(
      "a failed attempt",
      async () => {
        const row = await t.db
          .selectFrom("mailOutbox")
          .select(["status", "attempts"])
          .where("toAddress", "=", email)
          .executeTakeFirst();
        return row && row.attempts >= 1 && row.status === "retrying";
      },
      60_000,
      200,
    );
    const listed = await clientOn(B, curator.cookie).get(`/api/sites/${fx.siteId}/invitations`);
    expect(listed.body.invitations.find((i: { email: string }) => i.email === email).sendStatus).not.toBe("sent");
    await startSmtp();
    await waitFor(
      "the invitation to arrive",
      async () => mailbox.list().some((m) => m.to.includes(email)),
      90_000,
      200,
    );
    await sleep(3000); // time for a duplicate to show up, if the queue were to send twice
    expect(mailbox.list().filter((m) => m.to.includes(email))).toHaveLength(1);
    const row = await t.db
      .selectFrom("mailOutbox")
      .select(["status"])
      .where("toAddress", "=", email)
      .executeTakeFirstOrThrow();
    expect(row.status).toBe("sent");
    const after = await clientOn(B, curator.cookie).get(`/api/sites/${fx.siteId}/invitations`);
    expect(after.body.invitations.find((i: { email: string }) => i.email === email).sendStatus).toBe("sent");
  });

  it("a scheduled job (kept in the database) runs once per tick although A and W both run schedules", async () => {
    const ticks = await waitFor(
      "the one-minute schedule to fire",
      async () => {
        const { rows } = await sql<{ minute: string; n: number; done: number }>`
          select date_trunc('minute', created_on)::text as minute, count(*)::int as n,
                 count(*) filter (where state = 'completed')::int as done
          from pgboss.job where name = ${OVERDUE_WATCH_JOB} group by 1`.execute(t.db);
        return rows.some((r) => r.done > 0) ? rows : null;
      },
      150_000,
      1000,
    );
    for (const tick of ticks) expect(tick.n, `jobs made for the tick at ${tick.minute}`).toBe(1);
  });

  it("kill -9 of the process making a prepared file mid-render: another worker makes it; one file, one notice, one e-mail", async () => {
    const { boardId } = await makeBoard(t.db, fx.siteId, ["7-1", "7-2", "7-3"], "Aft emergency board");
    const curator = clientOn(B); // asked through the web-only instance; A or W renders
    await curator.signIn(fx.crew.curator.email);
    const readyMails = () =>
      mailbox.list().filter((m) => m.to.includes(fx.crew.curator.email) && m.subject.includes("is ready"));
    const mailsBefore = readyMails().length;
    // The object store stops answering: the render gets as far as storing the finished PDF and
    // hangs there, mid-job, on whichever worker took it.
    relay.stall();
    let fileId = "";
    let runner: Proc;
    try {
      const asked = await curator.post(`/api/sites/${fx.siteId}/prepared-files`, {
        kind: "survey_report",
        params: { boardId },
      });
      expect(asked.status).toBe(202);
      fileId = asked.body.file.id;
      const rendering = (p: Proc, attempt: number) =>
        logLines(p).some((l) => l.msg === "preparing file" && l.fileId === fileId && l.attempt === attempt);
      runner = await waitFor(
        "a worker to take the render and reach the store",
        async () => {
          const p = [A, W].find((x) => rendering(x, 1));
          return p && relay.held > 0 ? p : null;
        },
        90_000,
        100,
      );
      const row = await t.db
        .selectFrom("preparedFiles")
        .select(["state", "attempts"])
        .where("id", "=", fileId)
        .executeTakeFirstOrThrow();
      expect(row).toEqual({ state: "rendering", attempts: 1 });
      runner.child.kill("SIGKILL");
      expect(await runner.exit).toEqual({ code: null, signal: "SIGKILL" });
    } finally {
      relay.release();
    }
    const other = runner === A ? W : A;
    // Its lease lapses (8 s here), the queue's maintenance fails the job, the other worker retries it.
    const file = await waitFor(
      "the other worker to make the file",
      async () => {
        const r = await curator.get(`/api/sites/${fx.siteId}/prepared-files/${fileId}`);
        return r.body?.file?.state === "ready" ? r.body.file : null;
      },
      120_000,
      250,
    );
    expect(file.attempts).toBe(2);
    expect(
      logLines(other).some((l) => l.msg === "preparing file" && l.fileId === fileId && l.attempt === 2),
      `${other.name} made the second attempt`,
    ).toBe(true);
    // One file: only the second attempt's object is stored, and it is the report.
    expect(await store.listKeys(`prepared/${fx.siteId}/${fileId}/`)).toEqual([`prepared/${fx.siteId}/${fileId}/2.pdf`]);
    const pdf = await fetch(`${B.base}${file.downloadUrl}`, { headers: { cookie: curator.cookie } });
    expect(pdf.status).toBe(200);
    expect(
      Buffer.from(await pdf.arrayBuffer())
        .subarray(0, 5)
        .toString(),
    ).toBe("%PDF-");
    // One notice on the page, one e-mail.
    const notices = await curator.get("/api/prepared-files/notices");
    expect(notices.body.notices.filter((n: { id: string }) => n.id === fileId)).toHaveLength(1);
    await waitFor("the ready e-mail", async () => readyMails().length > mailsBefore, 60_000, 250);
    await sleep(3000); // time for a second one to show up, if the kill had made two
    expect(readyMails().length - mailsBefore).toBe(1);

    // The killed process comes back, so the fleet is whole again for what follows.
    if (runner! === A) A = await restart(A);
    else W = await restart(W);
  }, 400_000);

  it("SIGTERM on A during a burst: A stops being ready, finishes what it took, exits; no request and no queued job is lost", async () => {
    const curator = clientOn(A);
    await curator.signIn(fx.crew.curator.email);
    // Work queued just before the stop: ten invitations (ten e-mails for the workers).
    const emails = Array.from({ length: 10 }, (_, i) => `rolling.${i}@example.test`);
    for (const email of emails)
      expect((await curator.post(`/api/sites/${fx.siteId}/invitations`, { email, role: "viewer" })).status).toBe(201);

    // The test's "proxy", as a load balancer does it: round robin over the instances whose
    // /api/health/ready answered 200 at the last check (every 250 ms); a refused connection is
    // retried on another. A stopping instance fails its readiness for SHUTDOWN_DRAIN_DELAY_MS
    // (3 s here) before it closes its listener, so the proxy stops sending to it first.
    const inRotation = new Set([A, B]);
    let checking = true;
    const checker = (async () => {
      while (checking) {
        for (const p of [A, B]) {
          const ok = await fetch(`${p.base}/api/health/ready`)
            .then((r) => r.status === 200)
            .catch(() => false);
          if (ok) inRotation.add(p);
          else inRotation.delete(p);
        }
        await sleep(250);
      }
    })();
    let next = 0;
    const send = (base: string, body: string) =>
      new Promise<number>((resolve, reject) => {
        const req = request(
          `${base}/api/sites/${fx.siteId}/boards`,
          {
            method: "POST",
            agent: false, // a connection per request, as a proxy's upstream without keep-alive
            headers: { cookie: curator.cookie, origin: base, "content-type": "application/json" },
          },
          (res) => {
            res.resume();
            res.on("end", () => resolve(res.statusCode ?? 0));
          },
        );
        req.on("error", reject);
        req.end(body);
      });
    const viaProxy = async (body: string) => {
      for (let attempt = 0; ; attempt++) {
        const instances = inRotation.size ? [...inRotation] : [B];
        const p = instances[next++ % instances.length];
        try {
          const status = await send(p.base!, body);
          servedBy[p.name as "A" | "B"]++;
          return status;
        } catch (e) {
          // Only a connection that was never made is safe to try elsewhere.
          if ((e as NodeJS.ErrnoException).code !== "ECONNREFUSED" || attempt > 4) throw e;
        }
      }
    };
    // The burst goes on, four requests at a time, from before the signal until A has exited and a
    // few rounds beyond, so it spans the drain, the closing of A's listener and A's exit.
    const names: string[] = [];
    const servedBy = { A: 0, B: 0 };
    const statuses: number[] = [];
    let sawDraining = false;
    let aExited = false;
    void A.exit.then(() => (aExited = true));
    const lost: string[] = [];
    const burst = (async () => {
      for (let round = 0, after = 0; after < 3 && round < 2000; round++) {
        if (aExited) after++;
        const batch = Array.from(
          { length: 4 },
          (_, k) => `Rolling restart board ${String(round * 4 + k).padStart(4, "0")}`,
        );
        names.push(...batch);
        const got = await Promise.all(
          batch.map((name) =>
            viaProxy(JSON.stringify({ name })).catch((e: NodeJS.ErrnoException) => {
              lost.push(`${name}: ${e.code ?? e.message}`); // a request cut after it was accepted
              return 0;
            }),
          ),
        );
        statuses.push(...got);
      }
    })();
    await sleep(500);
    A.child.kill("SIGTERM");
    // While it drains (SHUTDOWN_DRAIN_DELAY_MS) A says it is not ready, and still answers.
    await waitFor(
      "A's readiness to fail",
      async () => {
        const r = await fetch(`${A.base}/api/health/ready`);
        if (r.status === 503) sawDraining = ((await r.json()) as { draining?: boolean }).draining === true;
        return r.status === 503;
      },
      20_000,
      100,
    );
    await burst;
    checking = false;
    await checker;
    const exit = await Promise.race([A.exit, sleep(60_000).then(() => null)]);
    expect(exit, `A exits by itself; its log:\n${A.output.slice(-3000)}`).toEqual({ code: 0, signal: null });
    expect(sawDraining).toBe(true);
    expect(lost, "requests cut off after they were accepted").toEqual([]);
    expect(
      statuses.filter((s) => s !== 201),
      "requests that failed",
    ).toEqual([]);
    const made = await t.db
      .selectFrom("boards")
      .select("name")
      .where("siteId", "=", fx.siteId)
      .where("name", "like", "Rolling restart board %")
      .execute();
    expect(made.map((b) => b.name).sort()).toEqual(names.sort()); // each once: none lost, none doubled
    // The burst did span the stop: A answered some before it left the rotation, B the rest.
    expect(servedBy.A).toBeGreaterThan(0);
    expect(servedBy.B).toBeGreaterThan(0);
    expect(logLines(A).some((l) => String(l.msg).startsWith("shutting down"))).toBe(true);

    // The queued e-mails are all delivered (by W now, if A had not taken them), each once.
    await waitFor(
      "the ten invitations",
      async () => emails.every((e) => mailbox.list().some((m) => m.to.includes(e))),
      90_000,
      250,
    );
    await sleep(2000);
    for (const e of emails) expect(mailbox.list().filter((m) => m.to.includes(e))).toHaveLength(1);
    // B is still serving.
    expect((await fetch(`${B.base}/api/health/ready`)).status).toBe(200);
  });
});

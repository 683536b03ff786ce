/**
 * Prepared files: the survey report and large CSV exports asked for with a
 * 202, made by the job worker into storage, announced by a notice, downloaded with the
 * same checks as any route, kept for a while and then removed by the scheduled clean-up.
 * The PDF is read back with poppler-utils' pdftotext (Debian); each CSV must be byte for
 * byte the file its direct download gives. Demo: MV Kestrel Lantern (invented).
 */
import { execFile } from "node:child_process";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seedDemo } from "../../server/seed/demo";
import { DEMO_PASSWORD } from "../../server/seed/people";
import { startJobs } from "../../server/jobs/registry";
import { memoryMailer } from "../../server/mail/mailer";
import { storageFromEnv, StorageNotFound } from "../../server/photos/storage";
import { failOrphaned, purgeExpired, RENDER_JOB } from "../../server/prepared-files/service";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";

const run = promisify(execFile);

// One retry a second after the first failure, so the failure path is quick.
process.env.PREPARED_FILE_RETRY_LIMIT = "1";
process.env.PREPARED_FILE_RETRY_DELAY_SECONDS = "1";

let t: TestDb;
let server: TestServer;
let viewer: Client;
let curator: Client;
let siteId: string;
let mainId: string;
let dir: string;
const storage = storageFromEnv();

beforeAll(async () => {
  t = await createTestDb();
  await seedDemo(t.db);
  server = await startTestServer({ db: t.db, photoStorage: storage });
  viewer = server.client();
  await viewer.signIn("viewer@tideline.test", DEMO_PASSWORD);
  curator = server.client();
  await curator.signIn("curator@tideline.test", DEMO_PASSWORD);
  siteId = (await t.db.selectFrom("sites").select("id").executeTakeFirstOrThrow()).id;
  mainId = (await t.db.selectFrom("boards").select("id").where("name", "like", "Main%").executeTakeFirstOrThrow()).id;
  dir = await mkdtemp(join(tmpdir(), "tideline-prepared-test-"));
}, 90_000);
afterAll(async () => {
  await server?.close();
  await t?.drop();
  if (dir) await rm(dir, { recursive: true, force: true });
});

async function getBytes(c: Client, path: string) {
  const res = await fetch(server.base + path, { headers: c.cookie ? { cookie: c.cookie } : {} });
  return { status: res.status, headers: res.headers, bytes: Buffer.from(await res.arrayBuffer()) };
}

/** Polls the status URL (as the page does) until the file is ready or failed. */
async function settled(c: Client, statusUrl: string, timeoutMs = 120_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    // A PDF rendering in this same process can hold the event loop past the keep-alive timeout, so a
    // reused connection may be reset as a poll goes out: poll again, as a browser retries an idempotent GET.
    const r = await c.get(statusUrl).catch((e) => {
      if (Date.now() > until) throw e;
      return null;
    });
    if (!r) continue;
    expect(r.status).toBe(200);
    if (r.body.file.state === "ready" || r.body.file.state === "failed") return r.body.file;
    if (Date.now() > until) throw new Error(`file still ${r.body.file.state} after ${timeoutMs} ms`);
    await new Promise((res) => setTimeout(res, 300));
  }
}

describe("the condition survey report as a background job", () => {
  let file: any;

  it("answers 202 at once with a status URL, then the worker makes the PDF", async () => {
    const r = await viewer.post(`/api/sites/${siteId}/prepared-files`, {
      kind: "survey_report",
      params: { boardId: mainId, photos: "no", paper: "a4" },
    });
    expect(r.status).toBe(202);
    expect(r.body.file.state).toBe("queued");
    expect(r.headers.get("location")).toBe(r.body.file.statusUrl);
    expect(r.body.file.downloadUrl).toBeNull();
    file = await settled(viewer, r.body.file.statusUrl);
    expect(file.state).toBe("ready");
    expect(file.error).toBeNull();
    const positions = await t.db
      .selectFrom("positions")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .where("boardId", "=", mainId)
      .executeTakeFirstOrThrow();
    expect(file.progressTotal).toBe(Number(positions.n));
    expect(file.progressDone).toBe(file.progressTotal);
    expect(file.fileName).toMatch(/^condition-survey-.*\.pdf$/);
    expect(new Date(file.expiresAt).getTime() - new Date(file.finishedAt).getTime()).toBeCloseTo(72 * 3600_000, -4);
  }, 150_000);

  it("downloads as the PDF the direct route makes (pdftotext reads its sections and the caution)", async () => {
    const d = await getBytes(viewer, file.downloadUrl);
    expect(d.status).toBe(200);
    expect(d.headers.get("content-type")).toBe("application/pdf");
    expect(d.headers.get("content-disposition")).toContain(file.fileName);
    expect(Number(d.headers.get("content-length"))).toBe(file.sizeBytes);
    expect(d.bytes.subarray(0, 5).toString()).toBe("%PDF-");
    const path = join(dir, "report.pdf");
    await writeFile(path, d.bytes);
    const text = (await run("pdftotext", ["-layout", path, "-"], { maxBuffer: 64 << 20 })).stdout;
    expect(text).toContain("MV Kestrel Lantern");
    expect(text).toMatch(/certifies\s+nothing/i);
    expect(text).toMatch(/NFPA 70E/);
  }, 60_000);

  it("shows a notice with the link until the person dismisses it, and e-mails them", async () => {
    const n = await viewer.get("/api/prepared-files/notices");
    expect(n.status).toBe(200);
    const mine = n.body.notices.find((x: any) => x.id === file.id);
    expect(mine).toMatchObject({ state: "ready", downloadUrl: file.downloadUrl, siteName: "MV Kestrel Lantern" });
    // Nobody else hears of it.
    expect((await curator.get("/api/prepared-files/notices")).body.notices.map((x: any) => x.id)).not.toContain(
      file.id,
    );
    const seen = await viewer.post(`${file.statusUrl}/seen`);
    expect(seen.status).toBe(200);
    expect(seen.body.file.seenAt).not.toBeNull();
    expect((await viewer.get("/api/prepared-files/notices")).body.notices.map((x: any) => x.id)).not.toContain(file.id);
    const mail = await t.db
      .selectFrom("mailOutbox")
      .select(["toAddress", "subject", "textBody"])
      .where("refType", "=", "prepared_file")
      .where("refId", "=", file.id)
      .executeTakeFirstOrThrow();
    expect(mail.toAddress).toBe("viewer@tideline.test");
    expect(mail.subject).toMatch(/condition survey report .*is ready/i);
    expect(mail.textBody).toContain(`/sites/${siteId}/reports#prepared-files`);
  });

  it("lists the person's files with the keeping time", async () => {
    const l = await viewer.get(`/api/sites/${siteId}/prepared-files`);
    expect(l.status).toBe(200);
    expect(l.body.retentionHours).toBe(72);
    expect(l.body.files[0].id).toBe(file.id);
    expect((await curator.get(`/api/sites/${siteId}/prepared-files`)).body.files.map((f: any) => f.id)).not.toContain(
      file.id,
    );
  });

  it("keeps another member, a non-member and a signed-out caller away from the file", async () => {
    expect((await curator.get(file.statusUrl)).status).toBe(404);
    expect((await getBytes(curator, file.downloadUrl)).status).toBe(404);
    expect((await curator.post(`${file.statusUrl}/seen`)).status).toBe(404);
    const { crew, siteId: otherSite } = await makeCrew(t.db);
    const outsider = server.client();
    await outsider.signIn(crew.outsider.email);
    expect((await getBytes(outsider, file.downloadUrl)).status).toBe(404);
    expect((await outsider.post(`/api/sites/${siteId}/prepared-files`, { kind: "inventory_csv" })).status).toBe(404);
    expect(otherSite).toBeTruthy();
    const anon = server.client();
    expect((await getBytes(anon, file.downloadUrl)).status).toBe(401);
    expect((await anon.get("/api/prepared-files/notices")).status).toBe(401);
  });

  it("after its keeping time the clean-up removes the stored object and the link answers 410", async () => {
    const row = await t.db
      .selectFrom("preparedFiles")
      .select("storageKey")
      .where("id", "=", file.id)
      .executeTakeFirstOrThrow();
    expect(row.storageKey).toMatch(new RegExp(`^prepared/${siteId}/${file.id}/\\d+\\.pdf$`));
    await (await storage.get(row.storageKey!)).destroy();
    const early = await purgeExpired({ db: t.db, photoStorage: storage }, new Date());
    expect(early.removed).toBe(0);
    const later = await purgeExpired({ db: t.db, photoStorage: storage }, new Date(Date.now() + 73 * 3600_000));
    expect(later.removed).toBeGreaterThanOrEqual(1);
    await expect(storage.get(row.storageKey!)).rejects.toBeInstanceOf(StorageNotFound);
    const d = await getBytes(viewer, file.downloadUrl);
    expect(d.status).toBe(410);
    expect(JSON.parse(d.bytes.toString()).error.code).toBe("file_expired");
    expect((await viewer.get(file.statusUrl)).body.file.state).toBe("expired");
    // Asked for again, it is made again.
    const again = await viewer.post(`${file.statusUrl}/retry`);
    expect(again.status).toBe(202);
    expect((await settled(viewer, file.statusUrl)).state).toBe("ready");
  }, 150_000);
});

describe("large CSV exports as background jobs", () => {
  for (const [kind, direct] of [
    ["inventory_csv", "inventory.csv"],
    ["defects_csv", "defects.csv?status=raised&sort=priority"],
    ["parts_csv", "parts.csv?status=all"],
  ] as const) {
    it(`${kind}: the stored file is byte for byte the direct download`, async () => {
      const query = Object.fromEntries(new URLSearchParams(direct.split("?")[1] ?? ""));
      const r = await curator.post(`/api/sites/${siteId}/prepared-files`, { kind, params: query });
      expect(r.status).toBe(202);
      const f = await settled(curator, r.body.file.statusUrl);
      expect(f.state).toBe("ready");
      expect(f.progressTotal).toBeGreaterThan(0);
      const stored = await getBytes(curator, f.downloadUrl);
      expect(stored.status).toBe(200);
      expect(stored.headers.get("content-type")).toBe("text/csv; charset=utf-8");
      const now = await getBytes(curator, `/api/sites/${siteId}/${direct}`);
      expect(now.status).toBe(200);
      expect(stored.bytes.equals(now.bytes)).toBe(true);
    }, 120_000);
  }
});

describe("bad requests and failures", () => {
  it("refuses a bad kind or bad params with 400 and stores nothing", async () => {
    const before = await t.db
      .selectFrom("preparedFiles")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .executeTakeFirstOrThrow();
    for (const body of [
      { kind: "everything" },
      { kind: "survey_report", params: { boardId: "not-a-uuid" } },
      { kind: "survey_report", params: { sections: "gossip" } },
      { kind: "survey_report", params: { from: "2026-12-02", to: "2026-01-01" } },
      { kind: "defects_csv", params: { sort: "nonsense" } },
      { kind: "parts_csv", params: "status=all" },
      { kind: "inventory_csv", params: { x: "\u0000" } },
    ]) {
      const r = await viewer.post(`/api/sites/${siteId}/prepared-files`, body);
      expect(r.status, JSON.stringify(body)).toBe(400);
      expect(r.body.error.requestId).toBeTruthy();
    }
    expect((await viewer.get(`/api/sites/${siteId}/prepared-files/not-a-uuid`)).status).toBe(400);
    const after = await t.db
      .selectFrom("preparedFiles")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n));
  });

  it("a file that cannot be made is retried, then shown failed with its reason, and can be asked for again", async () => {
    const r = await viewer.post(`/api/sites/${siteId}/prepared-files`, {
      kind: "survey_report",
      params: { boardId: "00000000-0000-4000-8000-000000000000", photos: "no" },
    });
    expect(r.status).toBe(202);
    const f = await settled(viewer, r.body.file.statusUrl);
    expect(f.state).toBe("failed");
    expect(f.attempts).toBe(2); // the first try and one retry
    expect(f.error).toBe("That board was not found.");
    expect(f.downloadUrl).toBeNull();
    expect((await getBytes(viewer, `${f.statusUrl}/download`)).status).toBe(409);
    const n = (await viewer.get("/api/prepared-files/notices")).body.notices.find((x: any) => x.id === f.id);
    expect(n).toMatchObject({ state: "failed", error: "That board was not found." });
    const again = await viewer.post(`${f.statusUrl}/retry`);
    expect(again.status).toBe(202);
    expect(again.body.file).toMatchObject({ state: "queued", error: null });
    expect((await settled(viewer, f.statusUrl)).state).toBe("failed");
  }, 150_000);
});

describe("without a worker running (a web-only instance)", () => {
  let t2: TestDb;
  let web: TestServer;
  beforeAll(async () => {
    t2 = await createTestDb();
    const jobs = await startJobs(
      { db: t2.db, mailer: memoryMailer(), publicUrl: "http://127.0.0.1", photoStorage: storage },
      { work: false },
    );
    web = await startTestServer({ db: t2.db, jobs, photoStorage: storage });
  }, 60_000);
  afterAll(async () => {
    await web?.close();
    await web?.jobs.stop(1000);
    await t2?.drop();
  });

  it("queues the file (it waits for a worker), answers 409 to a download or a retry, and caps a person's queue", async () => {
    const { siteId: s, crew } = await makeCrew(t2.db);
    const c = web.client();
    await c.signIn(crew.volunteer.email);
    const first = await c.post(`/api/sites/${s}/prepared-files`, { kind: "inventory_csv" });
    expect(first.status).toBe(202);
    const jobRow = await t2.db
      .selectFrom("pgboss.job" as any)
      .select(["state"] as any)
      .where("name" as any, "=", "prepared-files.render")
      .executeTakeFirst();
    expect(jobRow).toMatchObject({ state: "created" });
    const dl = await c.get(`${first.body.file.statusUrl}/download`);
    expect(dl.status).toBe(409);
    expect(dl.body.error.code).toBe("file_not_ready");
    const retry = await c.post(`${first.body.file.statusUrl}/retry`);
    expect(retry.status).toBe(409);
    expect(retry.body.error.code).toBe("not_retryable");
    for (let i = 0; i < 4; i++)
      expect((await c.post(`/api/sites/${s}/prepared-files`, { kind: "parts_csv" })).status).toBe(202);
    const sixth = await c.post(`/api/sites/${s}/prepared-files`, { kind: "parts_csv" });
    expect(sixth.status).toBe(429);
    expect(sixth.body.error.code).toBe("too_many_prepared_files");
    expect(sixth.headers.get("retry-after")).toBe("30");
    // A viewer may have the CSVs and the report, as with the direct downloads.
    const v = web.client();
    await v.signIn(crew.viewer.email);
    expect((await v.post(`/api/sites/${s}/prepared-files`, { kind: "survey_report" })).status).toBe(202);
  });
});

describe("a file whose job is gone", () => {
  it("is failed by the clean-up with a notice; one still queued, or started only just now, is left alone", async () => {
    const me = await t.db
      .selectFrom("users")
      .select("id")
      .where("email", "=", "viewer@tideline.test")
      .executeTakeFirstOrThrow();
    const ago = (min: number) => new Date(Date.now() - min * 60_000);
    const row = (state: "queued" | "rendering", startedAt: Date | null, createdAt: Date) =>
      t.db
        .insertInto("preparedFiles")
        .values({
          siteId,
          requestedBy: me.id,
          kind: "defects_csv",
          params: JSON.stringify({}),
          fileName: "defects-csv.csv",
          contentType: "text/csv",
          state,
          startedAt,
          createdAt,
          attempts: state === "rendering" ? 2 : 0,
        })
        .returning("id")
        .executeTakeFirstOrThrow();
    const cutOff = await row("rendering", ago(20), ago(30)); // its worker died on the last attempt
    const fresh = await row("rendering", ago(1), ago(2)); // within the grace: its job may not be visible yet
    const waiting = await row("queued", null, ago(30)); // behind a long queue: its job is still there
    await server.jobs.enqueue(RENDER_JOB, { fileId: waiting.id }, { startAfter: new Date(Date.now() + 3600_000) });

    expect(await failOrphaned({ db: t.db, jobs: server.jobs })).toEqual({ failed: 1 });
    const states = await t.db
      .selectFrom("preparedFiles")
      .select(["id", "state", "error", "seenAt"])
      .where("id", "in", [cutOff.id, fresh.id, waiting.id])
      .execute();
    const by = Object.fromEntries(states.map((r) => [r.id, r]));
    expect(by[cutOff.id]).toMatchObject({ state: "failed", seenAt: null });
    expect(by[cutOff.id].error).toMatch(/cut off/);
    expect(by[fresh.id].state).toBe("rendering");
    expect(by[waiting.id].state).toBe("queued");
    // The person sees it among their notices, as any failed file.
    const notices = await viewer.get("/api/prepared-files/notices");
    expect(JSON.stringify(notices.body)).toContain(cutOff.id);
    // Run again: nothing more to do.
    expect(await failOrphaned({ db: t.db, jobs: server.jobs })).toEqual({ failed: 0 });
  });
});

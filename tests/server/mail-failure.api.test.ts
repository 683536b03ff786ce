import { SMTPServer } from "smtp-server";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { smtpMailer } from "../../server/mail/mailer";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type TestServer, type Client } from "../helpers/http";
import { SUPERSEDED } from "../../server/mail/outbox";

// A real SMTP server that refuses every message while `refusing` is set, so the
// invitation's e-mail fails the way a provider's outage or rejection does.
let refusing = true;
let received = 0;
const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ["STARTTLS"],
  logger: false,
  onData(stream, _s, cb) {
    stream.on("data", () => {});
    stream.on("end", () => {
      if (refusing)
        return cb(Object.assign(new Error("Mailbox unavailable: relay refused (test)"), { responseCode: 554 }));
      received++;
      cb();
    });
  },
});

// Retries a second apart, so a message held back by an outage goes out within the test.
process.env.TIDELINE_MAIL_RETRY_DELAY_SECONDS = "1";
process.env.TIDELINE_MAIL_RETRY_LIMIT = "3";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
let admin: Client;

beforeAll(async () => {
  await new Promise<void>((r) => smtp.listen(0, "127.0.0.1", () => r()));
  const port = (smtp.server.address() as { port: number }).port;
  t = await createTestDb();
  server = await startTestServer({ db: t.db, mailer: smtpMailer({ url: `smtp://127.0.0.1:${port}` }) });
  fx = await makeCrew(t.db);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
  admin = server.client();
  await admin.signIn(fx.crew.admin.email);
});
afterAll(async () => {
  await server.close();
  await new Promise<void>((r) => smtp.close(() => r()));
  await t.drop();
});

describe("when the mail server fails", () => {
  it("the invitation is saved and listed as not sent; only an admin sees the reason; resend delivers it once", async () => {
    const r = await curator.post(`/api/sites/${fx.siteId}/invitations`, {
      email: "stormbound@example.test",
      role: "volunteer",
    });
    expect(r.status).toBe(201);
    expect(r.body.invitation).toMatchObject({
      email: "stormbound@example.test",
      sendStatus: "pending",
      sendError: null,
      lastSentAt: null,
    });
    await server.jobsIdle();
    const row = await t.db
      .selectFrom("invitations")
      .selectAll()
      .where("email", "=", "stormbound@example.test")
      .executeTakeFirstOrThrow();
    const listed = await curator.get(`/api/sites/${fx.siteId}/invitations`);
    expect(listed.body.invitations[0]).toMatchObject({ sendStatus: "failed", sendError: null });
    const asAdmin = await admin.get(`/api/sites/${fx.siteId}/invitations`);
    expect(asAdmin.body.invitations[0]).toMatchObject({
      sendStatus: "failed",
      sendError: expect.stringMatching(/554|relay refused/),
    });

    refusing = false;
    const again = await curator.post(`/api/sites/${fx.siteId}/invitations/${row.id}/resend`);
    expect(again.status).toBe(200);
    expect(again.body.invitation).toMatchObject({ sendStatus: "pending" });
    await server.jobsIdle();
    const after = await admin.get(`/api/sites/${fx.siteId}/invitations`);
    expect(after.body.invitations[0]).toMatchObject({ sendStatus: "sent", sendError: null });
    // The first message (with the old link) was withdrawn, so its retries never deliver it.
    await new Promise((res) => setTimeout(res, 2500));
    await server.jobsIdle();
    expect(received).toBe(1);
    const outbox = await t.db
      .selectFrom("mailOutbox")
      .select(["status", "lastError"])
      .where("refId", "=", row.id)
      .orderBy("createdAt")
      .execute();
    expect(outbox).toEqual([
      { status: "failed", lastError: SUPERSEDED },
      { status: "sent", lastError: null },
    ]);
    refusing = true;
  });

  it("a message refused while the mail server is down goes out once, by itself, when it is back", async () => {
    received = 0;
    const r = await curator.post(`/api/sites/${fx.siteId}/invitations`, {
      email: "heldback@example.test",
      role: "viewer",
    });
    expect(r.status).toBe(201);
    await server.jobsIdle();
    expect(
      (await curator.get(`/api/sites/${fx.siteId}/invitations`)).body.invitations.find(
        (i: { email: string }) => i.email === "heldback@example.test",
      ).sendStatus,
    ).toBe("failed");
    refusing = false;
    const until = Date.now() + 15_000;
    let status = "";
    while (Date.now() < until && status !== "sent") {
      await new Promise((res) => setTimeout(res, 250));
      status = (await curator.get(`/api/sites/${fx.siteId}/invitations`)).body.invitations.find(
        (i: { email: string }) => i.email === "heldback@example.test",
      ).sendStatus;
    }
    expect(status).toBe("sent");
    await server.jobsIdle();
    expect(received).toBe(1);
    refusing = true;
  });

  it("a mail server that cannot be reached at all also leaves the invitation saved and marked not sent", async () => {
    const dead = await startTestServer({ db: t.db, mailer: smtpMailer({ url: "smtp://127.0.0.1:1" }) });
    // Only the dead server's worker may take the job, so stop the other one's.
    await server.jobs.stop(2000);
    const c = dead.client();
    await c.signIn(fx.crew.curator.email);
    const r = await c.post(`/api/sites/${fx.siteId}/invitations`, { email: "nosignal@example.test", role: "viewer" });
    expect(r.status).toBe(201);
    await dead.jobsIdle();
    const list = (await c.get(`/api/sites/${fx.siteId}/invitations`)).body.invitations;
    expect(list.find((i: { email: string }) => i.email === "nosignal@example.test").sendStatus).toBe("failed");
    await dead.close();
  });

  it("without the fake server the dev mailbox answers 404, even to an admin", async () => {
    const res = await admin.get("/api/admin/mailbox");
    expect(res.status).toBe(404);
  });
});

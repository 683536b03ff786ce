import { SMTPServer } from "smtp-server";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { smtpMailer } from "../../server/mail/mailer";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type TestServer, type Client } from "../helpers/http";

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
      if (refusing) return cb(Object.assign(new Error("Mailbox unavailable: relay refused (test)"), { responseCode: 554 }));
      received++;
      cb();
    });
  },
});

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
  it("the invitation is saved and listed as not sent; only an admin sees the reason; resend delivers it later", async () => {
    const r = await curator.post(`/api/sites/${fx.siteId}/invitations`, { email: "stormbound@example.test", role: "volunteer" });
    expect(r.status).toBe(201);
    expect(r.body.invitation).toMatchObject({ email: "stormbound@example.test", sendStatus: "failed", sendError: null, lastSentAt: null });
    const row = await t.db.selectFrom("invitations").selectAll().where("email", "=", "stormbound@example.test").executeTakeFirstOrThrow();
    expect(row.sendStatus).toBe("failed");
    expect(row.sendError).toMatch(/554|relay refused/);

    const asAdmin = await admin.get(`/api/sites/${fx.siteId}/invitations`);
    expect(asAdmin.body.invitations[0]).toMatchObject({ sendStatus: "failed", sendError: expect.stringMatching(/relay refused/) });

    refusing = false;
    const again = await curator.post(`/api/sites/${fx.siteId}/invitations/${row.id}/resend`);
    expect(again.status).toBe(200);
    expect(again.body.invitation).toMatchObject({ sendStatus: "sent", sendError: null });
    expect(received).toBe(1);
    refusing = true;
  });

  it("a mail server that cannot be reached at all also leaves the invitation saved and marked not sent", async () => {
    const dead = await startTestServer({ db: t.db, mailer: smtpMailer({ url: "smtp://127.0.0.1:1" }) });
    const c = dead.client();
    await c.signIn(fx.crew.curator.email);
    const r = await c.post(`/api/sites/${fx.siteId}/invitations`, { email: "nosignal@example.test", role: "viewer" });
    expect(r.status).toBe(201);
    expect(r.body.invitation.sendStatus).toBe("failed");
    expect(r.body.invitations.map((i: { email: string }) => i.email)).toContain("nosignal@example.test");
    await dead.close();
  });

  it("without the fake server the dev mailbox answers 404, even to an admin", async () => {
    const res = await admin.get("/api/admin/mailbox");
    expect(res.status).toBe(404);
  });
});

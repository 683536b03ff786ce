/**
 * The local fake mail server for development and tests: smtp-server on loopback that
 * accepts every message and keeps it in memory, parsed by mailparser, so a person (the
 * admin-only mailbox page) or a test can read invitations and reset links.
 */
import { randomUUID } from "node:crypto";
import { EventEmitter } from "node:events";
import { simpleParser, type AddressObject } from "mailparser";
import { SMTPServer } from "smtp-server";
import { log } from "../log";

export interface StoredMessage {
  id: string;
  receivedAt: string;
  from: string;
  to: string;
  subject: string;
  text: string;
  html: string | null;
}

const KEEP = 200;

/** The messages received, newest first; waitFor() lets tests wait for one. */
export class FakeMailbox {
  private messages: StoredMessage[] = [];
  private events = new EventEmitter();

  add(m: StoredMessage) {
    this.messages.unshift(m);
    this.messages.length = Math.min(this.messages.length, KEEP);
    this.events.emit("message", m);
  }
  list(): StoredMessage[] {
    return [...this.messages];
  }
  clear() {
    this.messages = [];
  }
  /** Resolves with the first message (already there or arriving) that matches. */
  waitFor(match: (m: StoredMessage) => boolean, timeoutMs = 5000): Promise<StoredMessage> {
    const found = this.messages.find(match);
    if (found) return Promise.resolve(found);
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => {
        this.events.off("message", on);
        reject(new Error("no matching message arrived in the fake mailbox"));
      }, timeoutMs);
      const on = (m: StoredMessage) => {
        if (!match(m)) return;
        clearTimeout(timer);
        this.events.off("message", on);
        resolve(m);
      };
      this.events.on("message", on);
    });
  }
}

export interface FakeSmtp {
  port: number;
  url: string;
  mailbox: FakeMailbox;
  stop(): Promise<void>;
}

const addresses = (a: AddressObject | AddressObject[] | undefined) =>
  Array.isArray(a) ? a.map((x) => x.text).join(", ") : (a?.text ?? "");

function createServer(mailbox: FakeMailbox) {
  return new SMTPServer({
    authOptional: true,
    allowInsecureAuth: true,
    onAuth: (_auth, _session, cb) => cb(null, { user: "fake" }),
    disabledCommands: ["STARTTLS"],
    size: 10 * 1024 * 1024,
    logger: false,
    onData(stream, _session, cb) {
      simpleParser(stream)
        .then((p) => {
          mailbox.add({
            id: randomUUID(),
            receivedAt: new Date().toISOString(),
            from: p.from?.text ?? "",
            to: addresses(p.to),
            subject: p.subject ?? "",
            text: p.text ?? "",
            html: typeof p.html === "string" ? p.html : null,
          });
          cb();
        })
        .catch((e: Error) => cb(e));
    },
  });
}

function listen(server: SMTPServer, port: number, host: string): Promise<number> {
  return new Promise((resolve, reject) => {
    // smtp-server re-emits its socket's errors on itself; unheard, one would end the process.
    const onError = (e: Error) => reject(e);
    server.once("error", onError);
    server.listen(port, host, () => {
      server.off("error", onError);
      server.on("error", (e: Error) => log.error({ err: e }, "fake mail server error"));
      const addr = server.server.address();
      resolve(typeof addr === "object" && addr ? addr.port : port);
    });
  });
}

/** Starts on host:port; when that port is taken (another checkout), on a free one. */
export async function startFakeSmtp(
  opts: { port?: number; host?: string; mailbox?: FakeMailbox } = {},
): Promise<FakeSmtp> {
  const host = opts.host ?? "127.0.0.1";
  const mailbox = opts.mailbox ?? new FakeMailbox();
  let server = createServer(mailbox);
  let port: number;
  try {
    port = await listen(server, opts.port ?? 0, host);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== "EADDRINUSE") throw e;
    log.info(`port ${opts.port} is taken; the fake mail server uses a free port instead`);
    server = createServer(mailbox);
    port = await listen(server, 0, host);
  }
  return {
    port,
    url: `smtp://${host}:${port}`,
    mailbox,
    stop: () => new Promise((r) => server.close(() => r())),
  };
}

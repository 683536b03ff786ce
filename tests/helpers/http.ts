import type { AddressInfo } from "node:net";
import { createServer, type Server } from "node:http";
import { createApp, type AppDeps } from "../../server/app";
import { keepConnectionsAlive } from "../../server/shutdown";
import { createJobs, type Jobs } from "../../server/jobs";
import { startJobs } from "../../server/jobs/registry";
import { memoryMailer } from "../../server/mail/mailer";
import { storageFromEnv } from "../../server/photos/storage";
import { jobsIdle } from "./jobs";

export interface Res<T = any> {
  status: number;
  body: T;
  headers: Headers;
}

/** One browser-like client: keeps its cookie and sends Tideline's own Origin. */
export class Client {
  cookie = "";
  constructor(
    public base: string,
    public origin = base,
  ) {}

  async call<T = any>(
    method: string,
    path: string,
    body?: unknown,
    headers: Record<string, string> = {},
  ): Promise<Res<T>> {
    const h: Record<string, string> = { ...headers };
    if (this.cookie) h.cookie = this.cookie;
    if (method !== "GET" && this.origin) h.origin = this.origin;
    let payload: RequestInit["body"];
    if (body instanceof FormData || typeof body === "string" || body instanceof Uint8Array)
      payload = body as RequestInit["body"];
    else if (body !== undefined) {
      h["content-type"] = "application/json";
      payload = JSON.stringify(body);
    }
    const res = await fetch(this.base + path, { method, headers: h, body: payload, redirect: "manual" });
    const set = res.headers.getSetCookie();
    for (const c of set) {
      const [pair] = c.split(";");
      const [name, value] = pair.split("=");
      if (name === "tideline_session") this.cookie = value ? `${name}=${value}` : "";
    }
    const text = await res.text();
    let parsed: unknown = text;
    try {
      parsed = text ? JSON.parse(text) : null;
    } catch {
      /* not JSON: keep text */
    }
    return { status: res.status, body: parsed as T, headers: res.headers };
  }
  get = <T = any>(p: string) => this.call<T>("GET", p);
  post = <T = any>(p: string, b?: unknown) => this.call<T>("POST", p, b ?? {});
  patch = <T = any>(p: string, b?: unknown) => this.call<T>("PATCH", p, b ?? {});
  put = <T = any>(p: string, b?: unknown) => this.call<T>("PUT", p, b ?? {});
  del = <T = any>(p: string) => this.call<T>("DELETE", p);

  async signIn(email: string, password = TEST_PASSWORD) {
    const r = await this.post("/api/auth/sign-in", { email, password });
    if (r.status !== 200) throw new Error(`sign-in of ${email} failed: ${r.status} ${JSON.stringify(r.body)}`);
    return r;
  }
}

export const TEST_PASSWORD = "correct-horse-battery";

export interface TestServer {
  base: string;
  jobs: Jobs;
  client(): Client;
  /** Waits until every background job that is due has run (e-mail sent, renditions made). */
  jobsIdle(timeoutMs?: number): Promise<void>;
  close(): Promise<void>;
}

/**
 * The app with its job queue and a worker in this process, as `npm start` runs it.
 * Without a mailer, e-mail is kept in memory and goes nowhere; links point at this server.
 */
export async function startTestServer(deps: AppDeps): Promise<TestServer> {
  const server: Server = keepConnectionsAlive(createServer());
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", () => resolve()));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const full = {
    mailer: memoryMailer(),
    publicUrl: base,
    photoStorage: deps.photoStorage ?? storageFromEnv(),
    ...deps,
  };
  const jobDeps = { db: full.db, mailer: full.mailer, publicUrl: full.publicUrl, photoStorage: full.photoStorage };
  // A test of an unreachable database gets a queue that never started (enqueue then fails like the database).
  const jobs =
    deps.jobs ??
    (await startJobs(jobDeps, { work: true, pollingIntervalSeconds: 0.5 }).catch(() =>
      createJobs({ db: full.db, work: false }),
    ));
  server.on("request", createApp({ ...full, jobs }));
  return {
    base,
    jobs,
    client: () => new Client(base),
    jobsIdle: (timeoutMs) => jobsIdle(full.db, timeoutMs),
    async close() {
      await new Promise<void>((r) => {
        server.closeAllConnections();
        server.close(() => r());
      });
      if (!deps.jobs) await jobs.stop(2000);
    },
  };
}

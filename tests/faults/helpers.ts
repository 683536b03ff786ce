import { request, type IncomingMessage } from "node:http";
import { createServer } from "node:net";
import pg from "pg";
import type { Db } from "../../server/db";

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Polls `probe` until it returns something truthy, or fails after `timeoutMs`. */
export async function waitFor<T>(
  what: string,
  probe: () => Promise<T | null | undefined | false>,
  timeoutMs = 30_000,
  everyMs = 100,
): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await probe().catch(() => null);
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await sleep(everyMs);
  }
}

/** A free TCP port on 127.0.0.1 (the kernel's choice). */
export async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, "127.0.0.1", () => r()));
  const port = (s.address() as { port: number }).port;
  await new Promise((r) => s.close(r));
  return port;
}

/** A superuser connection to the test cluster, for pg_stat_activity and pg_terminate_backend. */
export async function adminClient(adminUrl: string) {
  const c = new pg.Client({ connectionString: adminUrl });
  c.on("error", () => {});
  await c.connect();
  return c;
}

/** Backends of `database` (other than the caller's) doing `filter`; e.g. waiting on a lock. */
export async function backendsOf(admin: pg.Client, database: string, where = "true"): Promise<number[]> {
  const r = await admin.query(
    `SELECT pid FROM pg_stat_activity WHERE datname = $1 AND pid <> pg_backend_pid() AND backend_type = 'client backend' AND ${where}`,
    [database],
  );
  return r.rows.map((x) => x.pid as number);
}

export async function terminate(admin: pg.Client, pids: number[]) {
  for (const pid of pids) await admin.query("SELECT pg_terminate_backend($1)", [pid]);
}

/**
 * A download through node:http whose reading can be paused: a paused response stops
 * reading its socket, so the kernel buffers fill and the server's writes block, as with
 * a phone that stopped reading.
 */
export interface Download {
  res: IncomingMessage;
  /** Resumes reading and resolves with every byte, or rejects when the server cut it. */
  readAll(): Promise<Buffer>;
  /** Resolves when the connection is gone (closed by either side). */
  closed: Promise<void>;
  destroy(): void;
}

export function openDownload(url: string, cookie: string, opts: { paused?: boolean } = {}): Promise<Download> {
  return new Promise((resolve, reject) => {
    const req = request(url, { headers: { cookie }, agent: false }, (res) => {
      const chunks: Buffer[] = [];
      let ended = false;
      let failed: Error | null = null;
      const closed = new Promise<void>((r) => res.socket.once("close", () => r()));
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => (ended = true));
      res.on("aborted", () => (failed = new Error("aborted by the server")));
      res.on("error", (e) => (failed = e));
      if (opts.paused) res.pause();
      resolve({
        res,
        closed,
        destroy: () => req.destroy(),
        readAll: async () => {
          res.resume();
          await Promise.race([new Promise((r) => res.once("end", r)), closed]);
          await sleep(20);
          if (failed || !ended) throw failed ?? new Error("the connection closed before the end of the body");
          return Buffer.concat(chunks);
        },
      });
    });
    req.on("error", reject);
    req.end();
  });
}

/** `n` defects on a new board with long descriptions, so an export runs to many megabytes. */
export async function bulkDefects(db: Db, siteId: string, n: number, descriptionBytes = 4000) {
  const { sql } = await import("kysely");
  const board = await db
    .insertInto("boards")
    .values({ siteId, name: `Bulk board ${Math.random().toString(36).slice(2, 8)}` })
    .returning("id")
    .executeTakeFirstOrThrow();
  await sql`
    INSERT INTO defects (site_id, board_id, title, description, category, severity)
    SELECT ${siteId}, ${board.id}, 'Verdigris on bus bar ' || g, repeat('Salt crust and green corrosion along the bar. ', ${Math.ceil(descriptionBytes / 46)}), 'corrosion', 'degraded'
    FROM generate_series(1, ${n}) AS g`.execute(db);
  return board.id;
}

/**
 * A TCP relay in front of a service (the fleet test puts it before the object store) that can
 * hold what clients send: while stalled, bytes from clients are kept, not forwarded, so a client
 * hangs mid-request as against a store that stopped answering. `held` counts the bytes kept;
 * `release()` forwards them and relays again. A client that goes away (killed) drops its bytes.
 */
export async function stallableRelay(targetPort: number) {
  const { connect } = await import("node:net");
  let stalled = false;
  let held = 0;
  const open = new Set<{ flush(): void; end(): void }>();
  const server = createServer((client) => {
    const upstream = connect(targetPort, "127.0.0.1");
    let queue: Buffer[] = [];
    const conn = {
      flush() {
        for (const b of queue) upstream.write(b);
        queue = [];
      },
      end: () => end(),
    };
    open.add(conn);
    client.on("data", (b: Buffer) => {
      if (stalled || queue.length) {
        queue.push(b);
        held += b.length;
      } else upstream.write(b);
    });
    upstream.on("data", (b: Buffer) => client.write(b));
    const end = () => {
      open.delete(conn);
      queue = [];
      client.destroy();
      upstream.destroy();
    };
    client.on("close", end);
    upstream.on("close", end);
    client.on("error", end);
    upstream.on("error", end);
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  return {
    port: (server.address() as { port: number }).port,
    get held() {
      return held;
    },
    stall() {
      stalled = true;
      held = 0;
    },
    release() {
      stalled = false;
      for (const c of open) c.flush();
    },
    close: () =>
      new Promise<void>((r) => {
        server.close(() => r());
        for (const c of [...open]) c.end(); // keep-alive connections would hold close() open
      }),
  };
}

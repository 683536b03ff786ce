/**
 * Listens. Used by `npm start` after set-up, and on its own for a deployment that
 * brings its own PostgreSQL (DATABASE_URL): `node --import tsx server/index.ts`.
 * The process keeps no state of its own, so several can run behind a load balancer.
 */
import type { Server } from "node:http";
import { join } from "node:path";
import { createApp } from "./app";
import { createDb, type Db } from "./db";
import { mailFromEnv } from "./mail/setup";
import { storageFromEnv } from "./photos/storage";
import { LocalDiskStorage } from "./photos/storage/local-disk";

/** Also sets up e-mail from the environment (SMTP_URL, or the local fake server); it stops with the server. */
export async function serve(opts: { db: Db; port: number; host?: string; clientDir?: string }): Promise<Server> {
  const mail = await mailFromEnv({ port: opts.port });
  const photoStorage = storageFromEnv();
  if (photoStorage instanceof LocalDiskStorage) {
    const removed = await photoStorage.removeLeftovers();
    if (removed.length) console.log(`[tideline] removed ${removed.length} partial photo file(s) left by an interrupted upload`);
  }
  const app = createApp({
    photoStorage,
    db: opts.db,
    clientDir: opts.clientDir,
    trustProxy: process.env.TRUST_PROXY === "1",
    mailer: mail.mailer,
    mailbox: mail.mailbox,
    publicUrl: mail.publicUrl,
  });
  return new Promise((resolve, reject) => {
    const server = app.listen(opts.port, opts.host ?? process.env.HOST ?? "127.0.0.1", (err?: Error) =>
      err ? reject(err) : resolve(server),
    );
    server.on("error", (e) => void mail.stop().finally(() => reject(e)));
    server.on("close", () => void mail.stop());
  });
}

if (import.meta.url === `file://${process.argv[1]}`) {
  process.env.NODE_ENV ??= "production";
  if (!process.env.DATABASE_URL) {
    console.error("Set DATABASE_URL, or use `npm start` for the embedded database.");
    process.exit(1);
  }
  const db = createDb(process.env.DATABASE_URL);
  const port = Number(process.env.PORT ?? 3000);
  const server = await serve({ db, port, clientDir: join(import.meta.dirname, "..", "dist", "client") });
  console.log(`Tideline listening on http://127.0.0.1:${port}`);
  const stop = () => server.close(() => void db.destroy().then(() => process.exit(0)));
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
}

/**
 * Graceful HTTP shutdown: stop accepting connections, let requests already being
 * answered finish, close idle keep-alive connections at once, and after `limitMs`
 * cut whatever is left (a stuck upload must not hold a rolling restart forever).
 */
import type { Server } from "node:http";

export function shutdownHttp(server: Server, limitMs: number): Promise<void> {
  return new Promise((resolve) => {
    if (!server.listening) return resolve();
    const timer = setTimeout(() => server.closeAllConnections(), limitMs);
    timer.unref();
    // A response finished while closing tells its client to reconnect elsewhere.
    server.on("request", (_req, res) => {
      if (!res.headersSent) res.setHeader("Connection", "close");
    });
    server.close(() => {
      clearTimeout(timer);
      resolve();
    });
    server.closeIdleConnections();
  });
}

/**
 * How long an idle keep-alive connection stays open. Node's default (5 s) is shorter than the
 * idle timeout of the usual load balancers (60 s), so a balancer — or any client — may send a
 * request on a connection at the very moment Node closes it, and gets a reset instead of an
 * answer; a large upload then fails outright, since a POST is not retried. The server must
 * outlast its clients' idle timeout (common practice for Node behind a balancer), and the header
 * timeout must be longer still. Shutdown closes idle connections at once, so a long keep-alive
 * never delays a rolling restart.
 */
export const KEEP_ALIVE_MS = 65_000;

export function keepConnectionsAlive(server: Server): Server {
  server.keepAliveTimeout = KEEP_ALIVE_MS;
  server.headersTimeout = KEEP_ALIVE_MS + 1_000;
  return server;
}

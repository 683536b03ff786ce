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

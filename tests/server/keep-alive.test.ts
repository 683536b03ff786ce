import { Agent, createServer, request } from "node:http";
import type { AddressInfo } from "node:net";
import { setTimeout as sleep } from "node:timers/promises";
import { describe, expect, it } from "vitest";
import { KEEP_ALIVE_MS, keepConnectionsAlive, shutdownHttp } from "../../server/shutdown";

// Node's own default keep-alive is 5 s (Node.js http docs, server.keepAliveTimeout); a load
// balancer's idle timeout is commonly 60 s (common practice). The server must hold idle
// connections longer than its clients do, or a request sent as it closes one is reset.
describe("idle keep-alive connections", () => {
  it("outlast the usual balancer idle timeout, and the header timeout outlasts them", () => {
    const s = keepConnectionsAlive(createServer());
    expect(KEEP_ALIVE_MS).toBeGreaterThan(60_000);
    expect(s.keepAliveTimeout).toBe(KEEP_ALIVE_MS);
    expect(s.headersTimeout).toBeGreaterThan(s.keepAliveTimeout);
  });

  it("a connection idle past Node's default 5 s is still open for the next request; shutdown closes it at once", async () => {
    let connections = 0;
    const server = keepConnectionsAlive(createServer((_req, res) => res.end("ok")));
    server.on("connection", () => connections++);
    await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
    const port = (server.address() as AddressInfo).port;
    const agent = new Agent({ keepAlive: true, maxSockets: 1 });
    const get = () =>
      new Promise<number>((resolve, reject) => {
        const req = request({ host: "127.0.0.1", port, path: "/", agent }, (res) => {
          res.resume();
          res.on("end", () => resolve(res.statusCode ?? 0));
        });
        req.on("error", reject);
        req.end();
      });
    expect(await get()).toBe(200);
    await sleep(6_000);
    expect(await get()).toBe(200);
    expect(connections).toBe(1);
    const t0 = Date.now();
    await shutdownHttp(server, 10_000);
    expect(Date.now() - t0).toBeLessThan(2_000);
    agent.destroy();
  }, 30_000);
});

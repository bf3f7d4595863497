import http from "node:http";
import type { AddressInfo } from "node:net";
import express from "express";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mountDevProxy } from "@/server/dev-proxy";

// `npm run dev` passes page requests on to the Expo dev server. That server restarts and dies while you work; the
// proxy must answer a clear 502 when it can, and never try to once the answer has begun (that would throw).
let upstream: http.Server;
let proxy: http.Server;
let proxyUrl: string;
const uncaught: unknown[] = [];
const onUncaught = (error: unknown) => uncaught.push(error);

async function listening(server: http.Server): Promise<number> {
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  return (server.address() as AddressInfo).port;
}

beforeAll(async () => {
  process.on("uncaughtException", onUncaught);
  upstream = http.createServer((req, res) => {
    if (req.url === "/bundle.js") {
      // Headers and part of the body, then the dev server goes away.
      res.writeHead(200, { "Content-Type": "application/javascript" });
      res.write("console.log('first part');\n".repeat(200), () => res.socket?.destroy());
      return;
    }
    res.writeHead(200, { "Content-Type": "text/html" }).end("<!doctype html><p>from the dev server</p>");
  });
  const upstreamPort = await listening(upstream);
  const app = express();
  mountDevProxy(app, `http://127.0.0.1:${upstreamPort}`);
  proxy = http.createServer(app);
  proxyUrl = `http://127.0.0.1:${await listening(proxy)}`;
});
afterAll(async () => {
  process.off("uncaughtException", onUncaught);
  proxy.closeAllConnections();
  await new Promise((r) => proxy.close(r));
  upstream.closeAllConnections();
  await new Promise((r) => upstream.close(r));
});

describe("the development proxy", () => {
  it("passes a page on from the dev server", async () => {
    const res = await fetch(`${proxyUrl}/datasets`);
    expect(res.status).toBe(200);
    expect(await res.text()).toContain("from the dev server");
  });

  it(
    "cuts the connection, rather than writing a 502 into a started answer, when the dev server dies mid-way",
    { timeout: 5_000 },
    async () => {
      const res = await fetch(`${proxyUrl}/bundle.js`);
      expect(res.status).toBe(200);
      await expect(res.text()).rejects.toThrow();
      // The proxy keeps serving, and nothing was thrown outside a request.
      expect((await fetch(`${proxyUrl}/datasets`)).status).toBe(200);
      expect(uncaught).toEqual([]);
    },
  );

  it("answers 502 in words when the dev server is not there", async () => {
    const app = express();
    const closed = http.createServer();
    const port = await listening(closed);
    await new Promise((r) => closed.close(r));
    mountDevProxy(app, `http://127.0.0.1:${port}`);
    const server = http.createServer(app);
    const url = `http://127.0.0.1:${await listening(server)}`;
    try {
      const res = await fetch(`${url}/`);
      expect(res.status).toBe(502);
      expect(await res.text()).toMatch(/Expo dev server .* is not answering/);
    } finally {
      await new Promise((r) => server.close(r));
    }
  });
});

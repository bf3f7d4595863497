import http from "node:http";
import net from "node:net";
import type { Express } from "express";

/**
 * Development only: pass every non-API request (and the bundler's hot-reload WebSocket) on to the Expo dev server,
 * so the app and the API share one origin and the session cookie works as in production.
 */
export function mountDevProxy(app: Express, target: string) {
  const to = new URL(target);
  app.use((req, res, next) => {
    if (req.path.startsWith("/api/")) return next();
    const upstream = http.request(
      { host: to.hostname, port: to.port, method: req.method, path: req.originalUrl, headers: { ...req.headers, host: to.host } },
      (answer) => {
        res.writeHead(answer.statusCode ?? 502, answer.headers);
        answer.pipe(res);
        // The dev server died mid-answer (a restart, a crash): end the browser's connection too, or it waits forever.
        answer.on("error", (error) => res.destroy(error));
      },
    );
    upstream.on("error", (error) => {
      // A status can be sent only before the answer has begun; after that, cutting the connection is all that is left.
      if (res.headersSent) return res.destroy(error);
      res.status(502).type("text/plain").send(`The Expo dev server at ${target} is not answering yet.`);
    });
    // The browser went away: stop the dev server's work for it.
    res.on("close", () => {
      if (!res.writableFinished) upstream.destroy();
    });
    req.pipe(upstream);
  });
}

export function proxyUpgrades(server: http.Server, target: string) {
  const to = new URL(target);
  server.on("upgrade", (req, socket, head) => {
    const upstream = net.connect(Number(to.port), to.hostname, () => {
      const lines = [`${req.method} ${req.url} HTTP/${req.httpVersion}`];
      for (let i = 0; i < req.rawHeaders.length; i += 2) lines.push(`${req.rawHeaders[i]}: ${req.rawHeaders[i + 1]}`);
      upstream.write(lines.join("\r\n") + "\r\n\r\n");
      upstream.write(head);
      socket.pipe(upstream).pipe(socket);
    });
    upstream.on("error", () => socket.destroy());
    socket.on("error", () => upstream.destroy());
  });
}

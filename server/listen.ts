import type http from "node:http";
import type { AddressInfo } from "node:net";

/** Bind the port; a port in use or a host that does not exist rejects with a message that says what to change. */
export function listen(server: http.Server, port: number, host: string): Promise<AddressInfo> {
  return new Promise((resolve, reject) => {
    const failed = (error: NodeJS.ErrnoException) => {
      const hint = error.code === "EADDRINUSE" ? ` Port ${port} is in use on ${host}; set PORT to another one (0 picks a free one).` : "";
      reject(new Error(`Plotbank could not listen on ${host}:${port}: ${error.message}.${hint}`, { cause: error }));
    };
    server.once("error", failed);
    server.listen(port, host, () => {
      server.off("error", failed);
      resolve(server.address() as AddressInfo);
    });
  });
}

/** The address a browser on this machine opens: a wildcard host is shown as localhost, IPv6 in brackets. */
export function localUrl({ address, port }: AddressInfo): string {
  const host = address === "0.0.0.0" || address === "::" ? "localhost" : address.includes(":") ? `[${address}]` : address;
  return `http://${host}:${port}`;
}

/**
 * Stop accepting connections and let requests in flight finish (a long CSV download, an upload), then cut what is
 * still open after `graceMs`, so a stop never hangs on a slow client.
 */
export function closeServer(server: http.Server, graceMs: number): Promise<void> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => server.closeAllConnections(), graceMs);
    server.close((error) => {
      clearTimeout(timer);
      if (error && (error as NodeJS.ErrnoException).code !== "ERR_SERVER_NOT_RUNNING") reject(error);
      else resolve();
    });
    // Keep-alive connections that sit idle would otherwise hold close() up until they time out.
    server.closeIdleConnections();
  });
}

import type { AddressInfo } from "node:net";
import express from "express";
import type { AppConfig } from "@/server/config";
import { createFakeDataCite, type FakeDataCite } from "@/server/doi/fake-datacite";

const fakeDoiCredentials = { user: "PLOTBANK.TEST", password: "fake-secret" };
export const fakeDoiPrefix = "10.80555";

/** The local DataCite fake on a loopback port, and the app configuration that points at it (or at `url`). */
export async function startFakeDoiService(): Promise<{ fake: FakeDataCite; datacite: (url?: string) => AppConfig["datacite"] }> {
  const fake = createFakeDataCite({ ...fakeDoiCredentials, prefixes: [fakeDoiPrefix] });
  const started = await fake.start();
  return { fake, datacite: (url = started) => ({ url, ...fakeDoiCredentials, prefix: fakeDoiPrefix }) };
}

interface DoiCall {
  method: string;
  path: string;
  /** The DOI the call is about: from the path, or from the body of a POST. */
  doi: string | undefined;
  status: number;
}

/**
 * The fake behind a front that records every call (method, path, status) and can hold calls back first: a slow DOI
 * service for tests that stop a process in the middle of a job. A call whose client went away while held back is
 * dropped, as a request that never reached the service.
 */
export async function startObservedFakeDoiService(options: { delayMs?: (method: string, path: string) => number } = {}) {
  const fake = createFakeDataCite({ ...fakeDoiCredentials, prefixes: [fakeDoiPrefix] });
  const calls: DoiCall[] = [];
  const front = express();
  front.use(express.json({ type: ["application/json", "application/vnd.api+json"], limit: "1mb" }));
  front.use((req, res, next) => {
    const delay = options.delayMs?.(req.method, req.path) ?? 0;
    const path = decodeURIComponent(req.path);
    const bodyDoi = (req.body as { data?: { attributes?: { doi?: string } } } | undefined)?.data?.attributes?.doi;
    const doi = (path.startsWith("/dois/") ? path.slice("/dois/".length) : bodyDoi)?.toLowerCase();
    res.on("finish", () => calls.push({ method: req.method, path, doi, status: res.statusCode }));
    setTimeout(() => {
      if (req.socket.destroyed) return;
      fake.app(req, res, next);
    }, delay);
  });
  const server = front.listen(0, "127.0.0.1");
  await new Promise<void>((resolve, reject) => server.once("listening", resolve).once("error", reject));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  return {
    fake,
    calls,
    url,
    datacite: { url, ...fakeDoiCredentials, prefix: fakeDoiPrefix } satisfies AppConfig["datacite"],
    /** The DOIs of calls that created one (POST answered 201), once per creation. */
    created(): string[] {
      return calls.filter((c) => c.method === "POST" && c.status === 201).map((c) => c.doi ?? "");
    },
    stop: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}

import path from "node:path";
import type { AppConfig } from "@/server/config";
import { createFakeDataCite } from "./fake-datacite";

/**
 * Unless DATACITE_URL names a real DataCite-compatible service, run the local fake in this process on a free
 * loopback port and point the configuration at it. Its DOIs are kept inside the database's folder (PostgreSQL leaves
 * files it does not know alone), so they survive a restart, go with that folder, and never land in its parent, which
 * may be shared with anything.
 */
export async function startLocalDataCiteUnlessConfigured(config: AppConfig): Promise<{ stop(): Promise<void> }> {
  if (config.datacite.url) return { stop: async () => {} };
  const fake = createFakeDataCite({
    user: config.datacite.user,
    password: config.datacite.password,
    prefixes: [config.datacite.prefix],
    storeFile: path.join(config.dataDir, "fake-datacite.json"),
  });
  config.datacite.url = await fake.start();
  console.log(`DOIs: the local DataCite fake is answering at ${config.datacite.url} (set DATACITE_URL for a real service)`);
  return fake;
}

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

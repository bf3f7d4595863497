import { describe, expect, it } from "vitest";
import { latestPublishedByDataset, latestPublishedOf, pickVersion, versionGone } from "@/server/services/latest-version";

const v = (semver: string, state: string, datasetId = "a") => ({ semver, state, datasetId });

describe("the latest published version", () => {
  it("is the highest published semantic version, compared as numbers (1.10.0 above 1.9.0)", () => {
    expect(latestPublishedOf([v("1.9.0", "published"), v("1.10.0", "published"), v("1.2.0", "published")])?.semver).toBe("1.10.0");
  });

  it("never a withdrawn version, a draft or one in review, even when higher", () => {
    const versions = [v("1.0.0", "published"), v("1.1.0", "withdrawn"), v("1.2.0", "in_review"), v("1.3.0", "draft")];
    expect(latestPublishedOf(versions)?.semver).toBe("1.0.0");
    expect(latestPublishedOf([v("1.1.0", "withdrawn")])).toBeUndefined();
  });

  it("per dataset, leaving out datasets with nothing published", () => {
    const latest = latestPublishedByDataset([
      v("2.0.0", "published", "a"),
      v("2.1.0", "published", "a"),
      v("1.0.0", "withdrawn", "b"),
      v("0.9.0", "published", "c"),
    ]);
    expect(Object.fromEntries([...latest].map(([id, version]) => [id, version.semver]))).toEqual({ a: "2.1.0", c: "0.9.0" });
  });

  it("answers to `latest`; a named version is found as it is, withdrawn or not", () => {
    const versions = [v("1.0.0", "withdrawn"), v("1.1.0", "published")];
    expect(pickVersion(versions, "latest")?.semver).toBe("1.1.0");
    expect(pickVersion(versions, "1.0.0")?.state).toBe("withdrawn");
    expect(pickVersion(versions, "3.0.0")).toBeUndefined();
  });
});

describe("a withdrawn version's rows", () => {
  it("are gone: one 410 naming the version, the reason and the date, whoever serves them", () => {
    const gone = versionGone("tb-soy", "1.0.0", "Blocks 2 and 3 were swapped.", new Date("2026-05-01T00:00:00Z"));
    expect(gone.status).toBe(410);
    expect(gone.detail).toBe(
      'Version 1.0.0 of "tb-soy" was withdrawn: Blocks 2 and 3 were swapped. Its metadata stays available; its rows are no longer served.',
    );
    expect(gone.extra).toEqual({ withdrawnReason: "Blocks 2 and 3 were swapped.", withdrawnAt: "2026-05-01T00:00:00.000Z" });
    expect(versionGone("tb-soy", "1.0.0", null).detail).toContain("was withdrawn (no reason given). Its metadata stays available");
  });
});

import { HttpProblem } from "@/server/errors";
import { compareSemver } from "./catalogue";

/**
 * Which version a reader gets. `latest` is an alias for the highest published semantic version of a dataset
 * (compared as versions, not text: 1.10.0 is above 1.9.0); withdrawn versions, drafts and versions in review never
 * answer to it. A named version is found among the released ones, and a withdrawn one serves its metadata but not
 * its rows. Every read that resolves a version goes through here, so the rule and its 410 are written once.
 */

export const latestAlias = "latest";

interface Candidate {
  semver: string;
  state: string;
}

/** The latest published version among some versions of one dataset, if any is published. */
export function latestPublishedOf<T extends Candidate>(versions: readonly T[]): T | undefined {
  let latest: T | undefined;
  for (const version of versions) {
    if (version.state !== "published") continue;
    if (!latest || compareSemver(version.semver, latest.semver) > 0) latest = version;
  }
  return latest;
}

/** The latest published version of each dataset among versions of several, by dataset id. */
export function latestPublishedByDataset<T extends Candidate & { datasetId: string }>(versions: readonly T[]): Map<string, T> {
  const byDataset = new Map<string, T[]>();
  for (const version of versions) byDataset.set(version.datasetId, [...(byDataset.get(version.datasetId) ?? []), version]);
  const latest = new Map<string, T>();
  for (const [datasetId, mine] of byDataset) {
    const found = latestPublishedOf(mine);
    if (found) latest.set(datasetId, found);
  }
  return latest;
}

/** A version named in a path or a filter: `latest`, or an exact semantic version among the given ones. */
export function pickVersion<T extends Candidate>(versions: readonly T[], semver: string): T | undefined {
  return semver === latestAlias ? latestPublishedOf(versions) : versions.find((version) => version.semver === semver);
}

/** A withdrawn version keeps its metadata (a tombstone), but its rows are gone for good: 410, with the reason. */
export function versionGone(slug: string, semver: string, reason: string | null, withdrawnAt?: Date | null): HttpProblem {
  const because = reason ? `: ${reason.trim().replace(/\.+$/, "")}.` : " (no reason given).";
  return new HttpProblem(
    410,
    "Gone",
    `Version ${semver} of "${slug}" was withdrawn${because} Its metadata stays available; its rows are no longer served.`,
    {
      withdrawnReason: reason,
      ...(withdrawnAt ? { withdrawnAt: withdrawnAt.toISOString() } : {}),
    },
  );
}

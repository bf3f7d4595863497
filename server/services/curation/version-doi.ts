import type { DoiRegistration } from "@/schemas/curation";
import type { AppContext } from "@/server/context";
import { conflict, forbidden } from "@/server/errors";
import { versionDoiName } from "@/server/services/citation/citable-version";
import { queueDoiWork } from "@/server/services/citation/doi-queue";
import { canEditDataset, isReviewer, versionById, type Dataset, type User, type Version } from "./access";

const released = (v: Version) => v.state === "published" || v.state === "withdrawn";
const mayManageDoi = async (ctx: AppContext, user: User | undefined, dataset: Dataset) =>
  isReviewer(user) || (await canEditDataset(ctx.db, user, dataset));

/**
 * A released version's DOI registration as its dataset's editors and reviewers see it; null for anyone else.
 * `canEdit` is the caller's canEditDataset answer, which the version desk has already read.
 */
export function doiRegistrationOf(
  ctx: AppContext,
  user: User | undefined,
  dataset: Dataset,
  v: Version,
  canEdit: boolean,
): DoiRegistration | null {
  if (!released(v) || !(isReviewer(user) || canEdit)) return null;
  return {
    status: v.doiStatus,
    doi: v.doi,
    intendedDoi: versionDoiName(ctx.config.datacite.prefix, dataset.slug, v.semver),
    attempts: v.doiAttempts,
    lastError: v.doiLastError,
    canRequeue: !!ctx.config.datacite.url && (v.doiStatus === "failed" || v.doiStatus === "pending"),
  };
}

/**
 * Send a failed (or still pending) DOI registration again now, without waiting for the back-off: after the service
 * was fixed, or after a curator corrected what it refused. The work runs in the background like every DOI pass.
 */
export async function requeueVersionDoi(ctx: AppContext, user: User, versionId: string): Promise<void> {
  const { version, dataset } = await versionById(ctx.db, versionId);
  if (!(await mayManageDoi(ctx, user, dataset))) {
    throw forbidden(`Only reviewers and the editors of dataset "${dataset.slug}" may send its DOI registrations again.`);
  }
  if (!released(version))
    throw conflict(`Version ${version.semver} is ${version.state.replace("_", " ")}; only a published or withdrawn version has a DOI.`);
  if (!ctx.config.datacite.url) throw conflict("No DOI service is configured (DATACITE_URL), so there is nothing to send.");
  if (version.doiStatus !== "failed" && version.doiStatus !== "pending") {
    throw conflict(
      `The DOI of version ${version.semver} is ${version.doiStatus === "registered" ? "registered already" : "not due for registration"}; only a failed or pending registration can be sent again.`,
    );
  }
  await queueDoiWork(ctx, versionId, ["failed", "pending"]);
}

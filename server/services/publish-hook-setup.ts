import { notifyFollowers } from "@/server/services/accounts/notifications";
import { queueDoiWork } from "@/server/services/citation/doi-queue";
import { onVersionPublished } from "@/server/services/publish-hooks";

/**
 * The work that follows every publication, registered once where the app is built. Follower notices are sent before
 * the reviewer's answer; the DOI is only queued (the DOI service may be slow or down), and a background pass
 * registers it.
 */
export function registerPublishHooks() {
  onVersionPublished("register-doi", async (ctx, versionId) => {
    await queueDoiWork(ctx, versionId, ["none"]);
  });
  onVersionPublished("notify-followers", async (ctx, versionId) => {
    await notifyFollowers(ctx, versionId);
  });
}

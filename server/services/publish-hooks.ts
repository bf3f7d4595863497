import type { AppContext } from "@/server/context";

/**
 * Work that follows a publication: DOI registration, follower notices. Hooks run after the publishing transaction
 * has committed, and a failing hook never undoes the publication (it records its own failure and retries later).
 */
export type PublishHook = (ctx: AppContext, versionId: string) => Promise<void>;

const hooks: { name: string; run: PublishHook }[] = [];

export function onVersionPublished(name: string, run: PublishHook) {
  if (!hooks.some((h) => h.name === name)) hooks.push({ name, run });
}

export async function runPublishHooks(ctx: AppContext, versionId: string): Promise<void> {
  for (const hook of hooks) {
    try {
      await hook.run(ctx, versionId);
    } catch (error) {
      console.error(`publish hook ${hook.name} failed for version ${versionId}:`, error);
    }
  }
}

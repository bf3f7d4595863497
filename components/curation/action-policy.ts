import type { Role } from "@/schemas/account";
import type { VersionDetail } from "@/schemas/curation";
import type { VersionState } from "@/schemas/dataset";

export type WorkbenchAction = "submit" | "approve" | "return" | "withdraw";

export interface PolicyUser {
  id: string;
  role: Role;
}

/** The server's answers about what the signed-in user may do with a version. */
export type PolicyVersion = Pick<VersionDetail, "canEdit" | "canReview" | "canReturn" | "canWithdraw">;

/**
 * Which review-flow buttons a user sees for a version: exactly what the server's answer permits (it decides again on
 * every request). The client recomputes no rights, so a rule changed on the server changes the buttons too.
 */
export function versionActions(version: PolicyVersion): Set<WorkbenchAction> {
  const out = new Set<WorkbenchAction>();
  if (version.canEdit) out.add("submit");
  if (version.canReview) out.add("approve");
  if (version.canReturn) out.add("return");
  if (version.canWithdraw) out.add("withdraw");
  return out;
}

/** A new version starts only when the dataset has no draft or submitted version open, and only for its editors. */
export function canStartVersion(
  user: PolicyUser | null | undefined,
  dataset: { canEdit: boolean; versions: readonly { state: VersionState }[] },
): boolean {
  if (!user || !dataset.canEdit || (user.role !== "curator" && user.role !== "admin")) return false;
  return !dataset.versions.some((v) => v.state === "draft" || v.state === "in_review");
}

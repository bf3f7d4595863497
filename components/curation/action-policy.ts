import type { VersionDetail } from "@/schemas/curation";

export type WorkbenchAction = "submit" | "approve" | "return" | "withdraw";

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

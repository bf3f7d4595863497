import type { Role } from "@/schemas/account";
import type { VersionState } from "@/schemas/dataset";

export type WorkbenchAction = "submit" | "approve" | "return" | "withdraw";

export interface PolicyUser {
  id: string;
  role: Role;
}

export interface PolicyVersion {
  state: VersionState;
  /** The server's answer: the user may edit this draft. */
  canEdit: boolean;
  createdBy: string;
  submittedBy: string | null;
}

const reviews = (role: Role) => role === "reviewer" || role === "admin";

/**
 * Which review-flow buttons a user sees for a version. The server checks every one of these again; this only keeps
 * people from being offered what they may not do. Approving publishes, and nobody approves a version they created
 * or submitted, so a reviewer who curated it does not see the button at all.
 */
export function versionActions(user: PolicyUser | null | undefined, version: PolicyVersion, datasetCanEdit: boolean): Set<WorkbenchAction> {
  const out = new Set<WorkbenchAction>();
  if (!user) return out;
  const own = version.createdBy === user.id || version.submittedBy === user.id;
  if (version.state === "draft" && version.canEdit) out.add("submit");
  if (version.state === "in_review" && reviews(user.role)) {
    if (!own) out.add("approve");
    out.add("return");
  }
  if (version.state === "published" && (reviews(user.role) || datasetCanEdit)) out.add("withdraw");
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

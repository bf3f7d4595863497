import { describe, expect, it } from "vitest";
import { canStartVersion, versionActions, type PolicyVersion } from "@/components/curation/action-policy";

const curator = { id: "u-curator", role: "curator" as const };
const reviewer = { id: "u-reviewer", role: "reviewer" as const };

const answer = (over: Partial<PolicyVersion> = {}): PolicyVersion => ({
  canEdit: false,
  canReview: false,
  canReturn: false,
  canWithdraw: false,
  ...over,
});
const list = (s: Set<string>) => [...s].sort();

// Who may do what is the server's answer (tests/server/version-permissions.test.ts); the buttons follow it exactly.
describe("which review steps a user is offered", () => {
  it("exactly the steps the server's answer permits", () => {
    expect(list(versionActions(answer()))).toEqual([]);
    expect(list(versionActions(answer({ canEdit: true })))).toEqual(["submit"]);
    expect(list(versionActions(answer({ canReview: true, canReturn: true })))).toEqual(["approve", "return"]);
    expect(list(versionActions(answer({ canReturn: true })))).toEqual(["return"]);
    expect(list(versionActions(answer({ canWithdraw: true })))).toEqual(["withdraw"]);
  });

  it("a new version starts only for an editor and only with no open draft or review", () => {
    expect(canStartVersion(curator, { canEdit: true, versions: [] })).toBe(true);
    expect(canStartVersion(curator, { canEdit: true, versions: [{ state: "published" }, { state: "withdrawn" }] })).toBe(true);
    expect(canStartVersion(curator, { canEdit: true, versions: [{ state: "draft" }] })).toBe(false);
    expect(canStartVersion(curator, { canEdit: true, versions: [{ state: "in_review" }] })).toBe(false);
    expect(canStartVersion(curator, { canEdit: false, versions: [] })).toBe(false);
    expect(canStartVersion(reviewer, { canEdit: true, versions: [] })).toBe(false);
  });
});

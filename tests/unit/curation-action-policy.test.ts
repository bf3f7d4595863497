import { describe, expect, it } from "vitest";
import { versionActions, type PolicyVersion } from "@/components/curation/action-policy";
import { canStartVersion } from "@/server/services/curation/access";

const curator = { id: "u-curator", role: "curator" as const } as Express.User;
const reviewer = { id: "u-reviewer", role: "reviewer" as const } as Express.User;

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

  // The server decides (and sends canStartVersion in the dataset answer); the screen shows the button as told.
  it("a new version starts only for an editor and only with no open draft or review", () => {
    expect(canStartVersion(curator, true, [])).toBe(true);
    expect(canStartVersion(curator, true, ["published", "withdrawn"])).toBe(true);
    expect(canStartVersion(curator, true, ["draft"])).toBe(false);
    expect(canStartVersion(curator, true, ["in_review"])).toBe(false);
    expect(canStartVersion(curator, false, [])).toBe(false);
    expect(canStartVersion(reviewer, true, [])).toBe(false);
    expect(canStartVersion(undefined, true, [])).toBe(false);
  });
});

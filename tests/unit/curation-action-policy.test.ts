import { describe, expect, it } from "vitest";
import { canStartVersion, versionActions, type PolicyVersion } from "@/components/curation/action-policy";

const curator = { id: "u-curator", role: "curator" as const };
const reviewer = { id: "u-reviewer", role: "reviewer" as const };
const admin = { id: "u-admin", role: "admin" as const };

const version = (over: Partial<PolicyVersion> = {}): PolicyVersion => ({ state: "draft", canEdit: false, createdBy: curator.id, submittedBy: null, ...over });
const list = (s: Set<string>) => [...s].sort();

describe("which review steps a user is offered", () => {
  it("a curator submits their own draft and nothing else", () => {
    expect(list(versionActions(curator, version({ canEdit: true }), true))).toEqual(["submit"]);
    expect(list(versionActions(curator, version({ state: "in_review", submittedBy: curator.id }), true))).toEqual([]);
  });

  it("a reviewer approves or returns someone else's submission", () => {
    expect(list(versionActions(reviewer, version({ state: "in_review", submittedBy: curator.id }), false))).toEqual(["approve", "return"]);
  });

  it("a reviewer never sees Approve on a version they created or submitted", () => {
    expect(versionActions(reviewer, version({ state: "in_review", createdBy: reviewer.id, submittedBy: curator.id }), false).has("approve")).toBe(false);
    expect(versionActions(admin, version({ state: "in_review", createdBy: curator.id, submittedBy: admin.id }), true).has("approve")).toBe(false);
    expect(versionActions(admin, version({ state: "in_review", createdBy: curator.id, submittedBy: admin.id }), true).has("return")).toBe(true);
  });

  it("withdrawing a published version is for reviewers and the dataset's editors", () => {
    expect(list(versionActions(curator, version({ state: "published" }), true))).toEqual(["withdraw"]);
    expect(list(versionActions(curator, version({ state: "published" }), false))).toEqual([]);
    expect(list(versionActions(reviewer, version({ state: "published" }), false))).toEqual(["withdraw"]);
    expect(list(versionActions(reviewer, version({ state: "withdrawn" }), false))).toEqual([]);
  });

  it("visitors are offered nothing", () => {
    expect(versionActions(null, version({ canEdit: true }), true).size).toBe(0);
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

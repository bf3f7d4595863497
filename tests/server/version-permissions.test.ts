import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { versionDetail } from "@/schemas/curation";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, type Agent, type Fixture } from "./curation-fixtures";

/**
 * The version desk shows the review steps the server's answer permits (canEdit, canReview, canReturn, canWithdraw);
 * the client recomputes nothing. Each answer is checked against what the same caller's request then gets.
 */
let t: TestApp;
let f: Fixture;
let admin: Agent;
let otherCurator: Agent;

const rights = async (agent: Agent, versionId: string) => {
  const v = versionDetail.parse((await agent.get(`/api/v1/curation/versions/${versionId}`).expect(200)).body);
  return { canEdit: v.canEdit, canReview: v.canReview, canReturn: v.canReturn, canWithdraw: v.canWithdraw };
};
const none = { canEdit: false, canReview: false, canReturn: false, canWithdraw: false };

beforeAll(async () => {
  t = await testApp();
  f = await draftWithData(t.app, t.ctx);
  admin = await signedInAgent(t.app, (await makeUser(t.ctx, "admin")).email);
  otherCurator = await signedInAgent(t.app, (await makeUser(t.ctx, "curator")).email);
});
afterAll(async () => t?.close());

describe("what the server says each caller may do with a version", () => {
  it("a draft: its curator may submit it; nobody reviews it yet", async () => {
    expect(await rights(f.curatorAgent, f.versionId)).toEqual({ ...none, canEdit: true });
    expect(await rights(f.reviewerAgent, f.versionId)).toEqual(none);
  });

  it("in review, submitted by an admin: another reviewer approves or returns it; the admin may only return it", async () => {
    await admin.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release: 2021 season." }).expect(200);
    expect(await rights(f.reviewerAgent, f.versionId)).toEqual({ ...none, canReview: true, canReturn: true });
    expect(await rights(admin, f.versionId)).toEqual({ ...none, canReturn: true });
    expect(await rights(f.curatorAgent, f.versionId)).toEqual(none);
    // The answers hold: the submitting admin is refused, the other reviewer publishes.
    expect((await admin.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(403)).body.detail).toMatch(
      /another reviewer/,
    );
    await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
  });

  it("published: reviewers and the dataset's editors may withdraw it, a curator of another dataset may not", async () => {
    expect(await rights(f.reviewerAgent, f.versionId)).toEqual({ ...none, canWithdraw: true });
    expect(await rights(f.curatorAgent, f.versionId)).toEqual({ ...none, canWithdraw: true });
    expect(await rights(otherCurator, f.versionId)).toEqual(none);
    await otherCurator.post(`/api/v1/curation/versions/${f.versionId}/withdraw`).send({ reason: "Not mine to withdraw." }).expect(403);
  });
});

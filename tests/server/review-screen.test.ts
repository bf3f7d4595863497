import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { metaAnalysisResult } from "@/schemas/analysis";
import { versionDetail, versionDiff } from "@/schemas/curation";
import { reviewComments, reviewSummary, versionDiffRows, versionRowsPage } from "@/schemas/review";
import { fSurvival, rcbdAnova } from "@/stats";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";
import { signedInAgent } from "@/tests/support/sign-in";
import { draftWithData, plotsCsv, upload, type Agent, type Fixture } from "./curation-fixtures";

/** The reviewer's screen: rows, per-site-year results and flags, the draft's Evidence preview, diffs with values, comments. */

let t: TestApp;
let f: Fixture;
let v2: string;
let otherCurator: Agent;
let member: Agent;
let secondReviewer: Agent;

// The fixture's plot TB-01-2021/101 (CHK, block 1) is 3600 + 37·3 = 3711 kg/ha; the draft corrects it.
const corrected = "TB-01-2021,101,1,CHK,3650,13.1";
// A plot keyed more than three times too high: the studentised-residual rule must name it.
const outlier = "TB-02-2021,203,2,BAND,14000,13.7";

beforeAll(async () => {
  t = await testApp();
  f = await draftWithData(t.app, t.ctx);
  await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
  await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
  v2 = versionDetail.parse((await f.curatorAgent.post(`/api/v1/datasets/${f.slug}/versions`).send({}).expect(201)).body).id;
  const plots = await upload(
    f.curatorAgent,
    v2,
    "plots",
    plotsCsv({ override: { "TB-01-2021/101": corrected, "TB-02-2021/203": outlier } }),
  );
  expect(plots.status, JSON.stringify(plots.body).slice(0, 1000)).toBe(201);
  await upload(f.curatorAgent, v2, "site_years", "site_year,site,crop,year,blocks\nTB-01-2022,TB-01,soybean,2022,4\n").expect(201);
  otherCurator = await signedInAgent(t.app, (await makeUser(t.ctx, "curator")).email);
  member = await signedInAgent(t.app, (await makeUser(t.ctx, "member")).email);
  secondReviewer = await signedInAgent(t.app, (await makeUser(t.ctx, "reviewer")).email);
}, 180_000);
afterAll(() => t.close());

describe("the diff against the published version, with values", () => {
  it("summarises each resource first: counts and the fields that changed; explains the bump in words", async () => {
    const d = versionDiff.parse((await f.reviewerAgent.get(`/api/v1/curation/diff?from=${f.versionId}&to=${v2}`).expect(200)).body);
    expect(d.rows.plots).toMatchObject({ added: 0, removed: 0, changed: 2, fields: [{ field: "yield_kg_ha", rows: 2 }] });
    expect(d.rows.site_years).toMatchObject({ added: 1, removed: 0, changed: 0, fields: [] });
    expect(d.suggestedBump).toBe("minor");
    expect(d.explanation).toBe(
      "minor: 1 site-year added (TB-01-2022), 2 published rows changed (plots: yield_kg_ha) at TB-01-2021, TB-02-2021",
    );
  });

  it("pages the changed rows with the old and new value of every cell", async () => {
    const url = `/api/v1/curation/diff/rows?from=${f.versionId}&to=${v2}&resource=plots&limit=1`;
    const first = versionDiffRows.parse((await f.reviewerAgent.get(`${url}&page=1`).expect(200)).body);
    expect(first).toMatchObject({ total: 2, page: 1, limit: 1 });
    expect(first.rows).toHaveLength(1);
    const row = first.rows[0]!;
    expect(row).toMatchObject({ key: "TB-01-2021/101", siteYear: "TB-01-2021", change: "changed" });
    expect(row.cells.find((c) => c.field === "yield_kg_ha")).toEqual({ field: "yield_kg_ha", old: "3711", new: "3650", changed: true });
    expect(row.cells.filter((c) => c.changed).map((c) => c.field)).toEqual(["yield_kg_ha"]);
    const second = versionDiffRows.parse((await f.reviewerAgent.get(`${url}&page=2`).expect(200)).body);
    expect(second.rows.map((r) => r.key)).toEqual(["TB-02-2021/203"]);
    expect(second.rows[0]!.cells.find((c) => c.field === "yield_kg_ha")).toMatchObject({ new: "14000", changed: true });
    const beyond = versionDiffRows.parse((await f.reviewerAgent.get(`${url}&page=3`).expect(200)).body);
    expect(beyond.rows).toEqual([]);
  });

  it("gives added rows their new values only, and filters by change", async () => {
    const res = versionDiffRows.parse(
      (await f.curatorAgent.get(`/api/v1/curation/diff/rows?from=${f.versionId}&to=${v2}&resource=site_years&change=added`).expect(200))
        .body,
    );
    expect(res.total).toBe(1);
    const cells = Object.fromEntries(res.rows[0]!.cells.map((c) => [c.field, c]));
    expect(cells.site_year).toEqual({ field: "site_year", old: null, new: "TB-01-2022", changed: false });
    expect(cells.year!.new).toBe("2022");
  });

  it("refuses a bad page or resource, naming the parameter", async () => {
    const bad = await f.reviewerAgent.get(`/api/v1/curation/diff/rows?from=${f.versionId}&to=${v2}&resource=plots&limit=0`).expect(400);
    expect(JSON.stringify(bad.body)).toContain("limit");
    await f.reviewerAgent.get(`/api/v1/curation/diff/rows?from=${f.versionId}&to=${v2}&resource=plotz`).expect(400);
  });
});

describe("per-site-year results and flags", () => {
  it("gives each site-year its responses and its own ANOVA: F, p, LSD and CV", async () => {
    const s = reviewSummary.parse((await f.reviewerAgent.get(`/api/v1/curation/versions/${v2}/review`).expect(200)).body);
    expect(s.comparedTo?.id).toBe(f.versionId);
    expect(s.siteYears.map((y) => y.siteYear)).toEqual(["TB-01-2021", "TB-01-2022", "TB-02-2021"]);
    const tb01 = s.siteYears[0]!;
    expect(tb01.responses.map((r) => r.treatment)).toEqual(["BAND", "BC", "IF"]);
    // The same plots through the RCBD ANOVA (itself checked against R's aov in tests/stats).
    const lines = plotsCsv({ override: { "TB-01-2021/101": corrected } })
      .trim()
      .split("\n")
      .slice(1)
      .map((l) => l.split(","))
      .filter((c) => c[0] === "TB-01-2021");
    const anova = rcbdAnova(lines.map((c) => ({ block: c[2]!, treatment: c[3]!, y: Number(c[4]) })));
    expect(tb01.anova!.f).toBeCloseTo(anova.treatment.fStatistic!, 9);
    expect(tb01.anova!.dfTreatment).toBe(3);
    expect(tb01.anova!.dfError).toBe(9);
    expect(tb01.anova!.pValue).toBeCloseTo(fSurvival(anova.treatment.fStatistic!, 3, 9), 12);
    expect(tb01.anova!.lsd05KgHa).toBeCloseTo(anova.meanSeparation!.lsd.alpha05, 9);
    expect(tb01.anova!.cvPct).toBeCloseTo(anova.cvPercent!, 9);
    expect(tb01.flags, JSON.stringify(tb01.flags)).toEqual([]);
    expect(s.rules.map((r) => r.code)).toEqual([
      "outlier-plot",
      "unbalanced",
      "check-off",
      "response-implausible",
      "high-cv",
      "no-responses",
    ]);
  });

  it("flags the outlying plot, the implausible response, the imprecise trial and the site-year without responses", async () => {
    const s = reviewSummary.parse((await f.reviewerAgent.get(`/api/v1/curation/versions/${v2}/review?flagged=true`).expect(200)).body);
    expect(s.flaggedSiteYears).toBe(2);
    expect(s.siteYears.map((y) => y.siteYear)).toEqual(["TB-01-2022", "TB-02-2021"]);
    const [noPlots, tb02] = s.siteYears;
    expect(noPlots!.flags).toEqual([{ code: "no-responses", message: "no plots or summary means yet" }]);
    const codes = tb02!.flags.map((x) => x.code);
    expect(codes).toContain("outlier-plot");
    expect(codes).toContain("response-implausible");
    expect(codes).toContain("high-cv");
    expect(tb02!.flags.find((x) => x.code === "outlier-plot")!.message).toMatch(/^Plot 203 \(block 2, BAND, 14,000 kg\/ha\)/);
  });

  it("pages the site-years", async () => {
    const s = reviewSummary.parse((await f.reviewerAgent.get(`/api/v1/curation/versions/${v2}/review?limit=1&page=3`).expect(200)).body);
    expect(s).toMatchObject({ total: 3, page: 3, limit: 1 });
    expect(s.siteYears.map((y) => y.siteYear)).toEqual(["TB-02-2021"]);
  });

  it("pages a resource's rows as its file prints them", async () => {
    const page = versionRowsPage.parse(
      (await f.reviewerAgent.get(`/api/v1/curation/versions/${v2}/rows/plots?limit=10&page=4`).expect(200)).body,
    );
    expect(page.total).toBe(32);
    expect(page.rows).toHaveLength(2);
    expect(page.fields.slice(0, 5)).toEqual(["site_year", "plot", "block", "treatment", "yield_kg_ha"]);
    expect(page.rows[1]!.slice(0, 2)).toEqual(["TB-02-2021", "404"]);
    await otherCurator.get(`/api/v1/curation/versions/${v2}/rows/plots`).expect(404);
  });

  it("is for the dataset's editors and reviewers only", async () => {
    await f.curatorAgent.get(`/api/v1/curation/versions/${v2}/review`).expect(200);
    await otherCurator.get(`/api/v1/curation/versions/${v2}/review`).expect(404);
    await member.get(`/api/v1/curation/versions/${v2}/review`).expect(404);
    await request(t.app).get(`/api/v1/curation/versions/${v2}/review`).expect(404);
  });
});

describe("the draft preview of the Evidence screen", () => {
  const q = "crop=soybean&nutrient=P&placement=2x2-band";
  it("runs the meta-analysis on the draft's own responses for its editors and reviewers; others get 404", async () => {
    const asEditor = metaAnalysisResult.parse(
      (await f.curatorAgent.get(`/api/v1/curation/versions/${v2}/preview/meta?${q}`).expect(200)).body,
    );
    const asReviewer = metaAnalysisResult.parse(
      (await f.reviewerAgent.get(`/api/v1/curation/versions/${v2}/preview/meta?${q}`).expect(200)).body,
    );
    expect(asEditor.k).toBe(2);
    expect(asEditor.provenance.versions).toEqual([expect.objectContaining({ dataset: f.slug, version: "1.1.0", siteYearsUsed: 2 })]);
    expect(asReviewer.pooled!.estimate).toBe(asEditor.pooled!.estimate);
    // The draft's corrected and outlying plots move the estimate away from the published one.
    const published = metaAnalysisResult.parse((await request(t.app).get(`/api/v1/analyses/meta?${q}&dataset=${f.slug}`).expect(200)).body);
    expect(published.pooled!.estimate).not.toBe(asEditor.pooled!.estimate);
    for (const agent of [otherCurator, member, request(t.app)])
      await agent.get(`/api/v1/curation/versions/${v2}/preview/meta?${q}`).expect(404);
  });

  it("on a published version gives the public answer for that version", async () => {
    const preview = metaAnalysisResult.parse(
      (await f.reviewerAgent.get(`/api/v1/curation/versions/${f.versionId}/preview/meta?${q}`).expect(200)).body,
    );
    const published = metaAnalysisResult.parse((await request(t.app).get(`/api/v1/analyses/meta?${q}&dataset=${f.slug}`).expect(200)).body);
    expect(preview.pooled).toEqual(published.pooled);
    expect(preview.k).toBe(published.k);
  });

  it("refuses dataset and version parameters: the draft is the one version read", async () => {
    const res = await f.curatorAgent.get(`/api/v1/curation/versions/${v2}/preview/meta?dataset=${f.slug}`).expect(400);
    expect(JSON.stringify(res.body)).toContain("dataset");
  });
});

describe("reviewers' comments on site-years", () => {
  it("a reviewer comments while the version is in review; the comments stay through a return and a re-submission", async () => {
    const comment = { siteYear: "TB-02-2021", body: "Plot 203 reads 14,000 kg/ha: a keying error?" };
    // Not in review yet.
    await f.reviewerAgent.post(`/api/v1/curation/versions/${v2}/comments`).send(comment).expect(409);
    await f.curatorAgent
      .post(`/api/v1/curation/versions/${v2}/submit`)
      .send({ changelog: "Adds TB-01-2022; corrects a plot." })
      .expect(200);
    const made = reviewComments.parse(
      (await f.reviewerAgent.post(`/api/v1/curation/versions/${v2}/comments`).send(comment).expect(201)).body,
    );
    expect(made.items).toEqual([
      expect.objectContaining({ siteYear: "TB-02-2021", body: comment.body, stateWhenMade: "in_review", resolvedAt: null }),
    ]);
    // Curators answer by changing the data, not by commenting; other curators and members are told nothing.
    await f.curatorAgent.post(`/api/v1/curation/versions/${v2}/comments`).send(comment).expect(403);
    await otherCurator.post(`/api/v1/curation/versions/${v2}/comments`).send(comment).expect(404);
    await member.get(`/api/v1/curation/versions/${v2}/comments`).expect(404);
    const unknown = await f.reviewerAgent
      .post(`/api/v1/curation/versions/${v2}/comments`)
      .send({ siteYear: "TB-09-2021", body: "Which site is this?" })
      .expect(400);
    expect(JSON.stringify(unknown.body)).toContain("body.siteYear");
    const control = await f.reviewerAgent
      .post(`/api/v1/curation/versions/${v2}/comments`)
      .send({ siteYear: "TB-02-2021", body: "bad \u0007 bell" })
      .expect(400);
    expect(JSON.stringify(control.body)).toContain("body");

    await f.reviewerAgent.post(`/api/v1/curation/versions/${v2}/return`).send({ comment: "See the comment on TB-02-2021." }).expect(200);
    const afterReturn = reviewComments.parse((await f.curatorAgent.get(`/api/v1/curation/versions/${v2}/comments`).expect(200)).body);
    expect(afterReturn.items.map((c) => c.body)).toEqual([comment.body]);
    const summary = reviewSummary.parse((await f.curatorAgent.get(`/api/v1/curation/versions/${v2}/review`).expect(200)).body);
    expect(summary.siteYears.find((y) => y.siteYear === "TB-02-2021")!.comments).toBe(1);
    expect(summary.canComment).toBe(false);

    // The curator fixes the plot, marks the comment dealt with and submits again.
    await upload(f.curatorAgent, v2, "plots", plotsCsv({ override: { "TB-01-2021/101": corrected } })).expect(201);
    const resolved = reviewComments.parse(
      (await f.curatorAgent.post(`/api/v1/curation/versions/${v2}/comments/${made.items[0]!.id}/resolve`).expect(200)).body,
    );
    expect(resolved.items[0]!.resolvedAt).not.toBeNull();
    await otherCurator.post(`/api/v1/curation/versions/${v2}/comments/${made.items[0]!.id}/resolve`).expect(404);
    await f.curatorAgent
      .post(`/api/v1/curation/versions/${v2}/submit`)
      .send({ changelog: "Adds TB-01-2022; corrects two plots." })
      .expect(200);
    const again = reviewComments.parse((await secondReviewer.get(`/api/v1/curation/versions/${v2}/comments`).expect(200)).body);
    expect(again.items).toHaveLength(1);
    expect(again.items[0]!.resolvedByName).toBeTruthy();
    // Commenting does not make a reviewer an author: the four-eyes rule still lets them approve.
    await f.reviewerAgent.post(`/api/v1/curation/versions/${v2}/approve`).send({}).expect(200);
  });
});

import { readFileSync } from "node:fs";
import path from "node:path";
import Papa from "papaparse";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { metaAnalysisResult } from "@/schemas/analysis";
import { predictiveProbabilityAbove, pricedDecision } from "@/stats/decision";
import { insertAnalysisFixture } from "@/tests/support/analysis-fixture";
import { testApp, type TestApp } from "@/tests/support/test-app";

const reference = path.resolve(__dirname, "../fixtures/reference");
// dat.michael2013 (Michael et al. 2013, Psychon Bull Rev 20:720-725), copied from the shared check files.
const michael = Papa.parse<Record<string, string>>(
  readFileSync(path.join(reference, "meta_michael2013_md_data.csv"), "utf8")
    .split("\n")
    .filter((l) => !l.startsWith("#"))
    .join("\n"),
  { header: true, skipEmptyLines: true },
).data;
// metafor 3.8-1 predict() on rma(yi, vi, mods = ~ 0 + included_critique): meta_michael2013_md_subgroup_predict.R.
const predicted = JSON.parse(readFileSync(path.join(reference, "meta_michael2013_md_subgroup_predict.json"), "utf8"));

// The critique moderator rides on the placement column: Critique → in-furrow, No_critique → 2x2-band.
const placementOf: Record<string, string> = { Critique: "in-furrow", No_critique: "2x2-band" };
const levelOf: Record<string, string> = { "in-furrow": "Critique", "2x2-band": "No_critique" };

let t: TestApp;
const get = async (query: string) => metaAnalysisResult.parse((await request(t.app).get(`/api/v1/analyses/meta${query}`).expect(200)).body);
const close = (actual: number | null | undefined, expected: number, tolerance = 1e-7) =>
  expect(Math.abs((actual ?? Number.NaN) - expected), `${actual} vs ${expected}`).toBeLessThanOrEqual(
    tolerance * Math.max(1, Math.abs(expected)),
  );

beforeAll(async () => {
  t = await testApp();
  await insertAnalysisFixture(t.ctx, {
    slug: "michael-check",
    responses: michael.map((row) => ({
      siteYear: `MC-${row.study_id!.padStart(2, "0")}-2019`,
      year: 2019,
      treatment: "T1",
      crop: "corn",
      placements: [placementOf[row.included_critique!]!],
      md: Number(row.yi),
      se: Math.sqrt(Number(row.vi)),
    })),
  });
  // Two placements sharing one check at each of four site-years: each site-year appears once per group.
  await insertAnalysisFixture(t.ctx, {
    slug: "two-placements",
    responses: [1, 2, 3, 4].flatMap((i) => [
      { siteYear: `TP-0${i}-2021`, year: 2021, treatment: "IF", placements: ["in-furrow"], md: 60 + 20 * i, se: 70 },
      { siteYear: `TP-0${i}-2021`, year: 2021, treatment: "BAND", placements: ["2x2-band"], md: 150 + 30 * i, se: 70 },
    ]),
  });
});
afterAll(() => t.close());

describe("per-group predictive distributions equal metafor's predict() on the common-τ² model", () => {
  it.each([
    ["REML_knha", "method=REML&ci=hksj"],
    ["REML_z", "method=REML&ci=wald"],
    ["DL_knha", "method=DL&ci=hksj"],
  ])("%s", async (model, options) => {
    const ref = predicted.models[model];
    const body = await get(`?dataset=michael-check&units=kg/ha&groupBy=placement&${options}`);
    expect(body.subgroups!.levels.map((l) => levelOf[l.level])).toEqual(ref.levels.map((l: { level: string }) => l.level));
    for (const level of body.subgroups!.levels) {
      const want = ref.levels.find((l: { level: string }) => l.level === levelOf[level.level]);
      expect(level.k).toBe(want.k);
      const p = level.predictive!;
      close(p.estimate, want.pred);
      close(p.se, want.se);
      close(p.tau2, ref.tau2);
      expect(p.df).toBe(want.df);
      close(p.lower, want.pi_lb);
      close(p.upper, want.pi_ub);
      close(level.probabilityAboveZero, want.probability_above_0);
      // The client's pure function gives R's chance above 0.1 from the same distribution.
      close(predictiveProbabilityAbove(p, 0.1), want["probability_above_0.1"]);
    }
  });

  it("per-group chances at a break-even, and the client's pricedDecision gives the same numbers from the answer", async () => {
    // A break-even of 0.1 (the response's units): cost ÷ price × the answer's units per bu/ac.
    const plain = await get("?dataset=michael-check&units=kg/ha&groupBy=placement");
    const factor = plain.decision.breakEvenUnitsPerBushel!;
    const priced = await get(`?dataset=michael-check&units=kg/ha&groupBy=placement&price=${factor * 10}&cost=1`);
    expect(priced.decision.breakEven).toBeCloseTo(0.1, 12);
    for (const level of priced.subgroups!.levels) {
      const want = predicted.models.REML_knha.levels.find((l: { level: string }) => l.level === levelOf[level.level]);
      close(level.probabilityAboveBreakEven, want["probability_above_0.1"]);
      const ys = michael.filter((r) => placementOf[r.included_critique!] === level.level).map((r) => Number(r.yi));
      const b = priced.decision.breakEven!;
      expect(level.shareAboveBreakEven).toBe(ys.filter((y) => y > b).length / ys.length);
      expect(level.observedResponses).toEqual([...ys].sort((a, b) => a - b).map((y) => expect.closeTo(y, 12)));
      const local = pricedDecision(
        { price: factor * 10, productCost: 1 },
        { unitsPerBushel: factor, predictive: level.predictive, observedResponses: level.observedResponses },
      );
      close(local.probabilityAboveBreakEven, level.probabilityAboveBreakEven!, 1e-12);
      expect(local.shareAboveBreakEven).toBe(level.shareAboveBreakEven);
    }
    // Pooled: t(k − 2), the same chance the API gives with prices.
    const pooled = pricedDecision(
      { price: factor * 10, productCost: 1 },
      { unitsPerBushel: factor, predictive: plain.decision.predictive, observedResponses: plain.decision.observedResponses },
    );
    expect(plain.decision.predictive!.df).toBe(10);
    close(pooled.probabilityAboveBreakEven, priced.decision.probabilityAboveBreakEven!, 1e-12);
    expect(pooled.shareAboveBreakEven).toBe(priced.decision.shareAboveBreakEven);
    close(plain.decision.predictive!.lower, plain.pooled!.predictionInterval!.lower, 1e-12);
  });
});

describe("grouped forest rows", () => {
  it("come group by group in level order, each site-year once per group, with the headline mean's weight beside the group's", async () => {
    const body = await get("?dataset=two-placements&groupBy=placement");
    expect(body.rows.map((r) => r.group)).toEqual([
      "in-furrow",
      "in-furrow",
      "in-furrow",
      "in-furrow",
      "2x2-band",
      "2x2-band",
      "2x2-band",
      "2x2-band",
    ]);
    expect(body.rows.slice(0, 4).map((r) => r.siteYearCode)).toEqual(["TP-01-2021", "TP-02-2021", "TP-03-2021", "TP-04-2021"]);
    const withinGroup = body.rows.filter((r) => r.group === "in-furrow").reduce((a, r) => a + r.weightPercent, 0);
    expect(withinGroup).toBeCloseTo(100, 9);
    const ungrouped = await get("?dataset=two-placements");
    for (const row of body.rows) {
      const own = ungrouped.rows.find((r) => r.siteYearCode === row.siteYearCode)!;
      expect(row.pooledWeightPercent).toBeCloseTo(own.weightPercent, 12);
    }
    // Without applications on file a treatment is named by its code.
    expect(body.rows[0]!.treatmentLabels).toEqual(["IF"]);
  });
});

import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { predictiveProbabilityAbove, pricedDecision, probabilityNewResponseAbove, shareAbove } from "@/stats/decision";

// metafor 3.8-1 predict() per level of rma(yi, vi, mods = ~ 0 + included_critique) on dat.michael2013
// (Michael et al. 2013, Psychon Bull Rev 20:720-725); tests/fixtures/reference/meta_michael2013_md_subgroup_predict.R.
const predicted = JSON.parse(
  readFileSync(path.resolve(__dirname, "../fixtures/reference/meta_michael2013_md_subgroup_predict.json"), "utf8"),
);

describe("predictiveProbabilityAbove", () => {
  it.each(["REML_knha", "REML_z", "DL_knha"])("gives R's P(new > x) per level of %s (t(ddf) or normal)", (model) => {
    const ref = predicted.models[model];
    for (const level of ref.levels) {
      const distribution = { estimate: level.pred, se: level.se, tau2: ref.tau2, df: level.df };
      // R: pt((x - pred)/sqrt(se^2 + tau2), ddf, lower.tail = FALSE), or pnorm(...) under test = "z"
      expect(predictiveProbabilityAbove(distribution, 0)).toBeCloseTo(level.probability_above_0, 12);
      expect(predictiveProbabilityAbove(distribution, 0.1)).toBeCloseTo(level["probability_above_0.1"], 12);
    }
  });

  it("is null without spread, and probabilityNewResponseAbove is it with k − 2 df", () => {
    expect(predictiveProbabilityAbove({ estimate: 1, se: 0, tau2: 0, df: 4 }, 0)).toBeNull();
    const viaK = probabilityNewResponseAbove({ x: 5, estimate: 8, se: 1, tau2: 8, k: 12 }).probability!;
    expect(predictiveProbabilityAbove({ estimate: 8, se: 1, tau2: 8, df: 10 }, 5)).toBe(viaK);
    // R 4.2.2: 1 - pt((5 - 8)/sqrt(1 + 8), 10) = 0.82955343384896996
    expect(viaK).toBeCloseTo(0.82955343384896996, 14);
  });
});

describe("shareAbove and pricedDecision", () => {
  it("counts responses strictly above x in a sorted list", () => {
    expect(shareAbove([-1, 2, 6, 8], 5)).toBe(0.5);
    expect(shareAbove([-1, 2, 5, 8], 5)).toBe(0.25);
    expect(shareAbove([-1, 2, 6, 8], -5)).toBe(1);
    expect(shareAbove([-1, 2, 6, 8], 9)).toBe(0);
    expect(() => shareAbove([], 0)).toThrow(RangeError);
  });

  it("B = (product + application) ÷ price in the response's units, with the chance and the observed share at B", () => {
    const predictive = { estimate: 8, se: 1, tau2: 8, df: 10 };
    const out = pricedDecision(
      { price: 4.8, productCost: 18, applicationCost: 6 },
      { unitsPerBushel: 1, predictive, observedResponses: [-1, 2, 6, 8] },
    );
    expect(out.costPerAcre).toBe(24);
    expect(out.breakEven).toBe(5);
    expect(out.probabilityAboveBreakEven).toBe(predictiveProbabilityAbove(predictive, 5));
    expect(out.shareAboveBreakEven).toBe(0.5);
    // kg/ha: the break-even scales by the units per bu/ac.
    expect(
      pricedDecision({ price: 4.8, productCost: 24 }, { unitsPerBushel: 67.25, predictive, observedResponses: null }).breakEven,
    ).toBeCloseTo(5 * 67.25, 12);
  });

  it("gives nothing it cannot: no price, no cost, no units, no observed list", () => {
    const predictive = { estimate: 8, se: 1, tau2: 8, df: 10 };
    expect(pricedDecision({ productCost: 18 }, { unitsPerBushel: 1, predictive, observedResponses: [1] })).toMatchObject({
      breakEven: null,
      probabilityAboveBreakEven: null,
      shareAboveBreakEven: null,
      costPerAcre: 18,
    });
    expect(pricedDecision({ price: 5 }, { unitsPerBushel: 1, predictive, observedResponses: [1] }).breakEven).toBeNull();
    expect(
      pricedDecision({ price: 5, productCost: 10 }, { unitsPerBushel: null, predictive, observedResponses: [1] }).breakEven,
    ).toBeNull();
    expect(pricedDecision({ price: 5, productCost: 10 }, { unitsPerBushel: 1, predictive, observedResponses: null })).toMatchObject({
      breakEven: 2,
      shareAboveBreakEven: null,
    });
  });
});

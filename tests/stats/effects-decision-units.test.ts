/**
 * Site-year effects, decision numbers and unit conversions.
 * Sources named per assertion; numbers in the effect and decision examples are invented for the test.
 */
import { describe, expect, it } from "vitest";
import {
  combineWithinSiteYear,
  logResponseRatioEffect,
  meanDifferenceEffect,
  sharedCheckCovariance,
  sharedCheckLogRatioCovariance,
} from "@/stats/effects";
import { breakEvenResponse, empiricalShares, probabilityNewResponseAbove, shareSignificant } from "@/stats/decision";
import { tCdf } from "@/stats/distributions";
import { metaAnalysis } from "@/stats/meta/meta-analysis";
import * as units from "@/stats/units";
import { CLOSED_FORM, expectClose, loadJsonFixture } from "@/tests/stats/fixtures";

describe("effects against the check", () => {
  it("mean difference with variance 2·MSE/r (Steel, Torrie & Dickey 1997 §8.4)", () => {
    const effect = meanDifferenceEffect({
      treatmentMean: 57.6833333333333,
      checkMean: 52.0666666666667,
      mse: 20.2228431372549,
      replicates: 12,
    });
    expectClose(effect.yi, 5.6166666666666, 1e-12, "yi");
    // npk aov(yield ~ block + N): SED = 1.83588503349451, so vi = SED².
    expectClose(effect.vi, 1.83588503349451 ** 2, CLOSED_FORM, "vi = SED²");
  });

  it("log response ratio with delta-method variance (MSE/r)(1/t² + 1/c²) (Hedges, Gurevitch & Curtis 1999 eq. 3)", () => {
    const effect = logResponseRatioEffect({ treatmentMean: 60, checkMean: 50, mse: 16, replicates: 4 });
    expectClose(effect.yi, Math.log(1.2), 1e-15, "yi");
    expectClose(effect.vi, 4 * (1 / 3600 + 1 / 2500), 1e-15, "vi");
    expect(() => logResponseRatioEffect({ treatmentMean: 0, checkMean: 50, mse: 16, replicates: 4 })).toThrow(/> 0/);
  });

  it("covariance of contrasts sharing the check is MSE/r (log scale: MSE/(r·c²))", () => {
    expect(sharedCheckCovariance(16, 4)).toBe(4);
    expectClose(sharedCheckLogRatioCovariance(16, 4, 50), 0.0016, 1e-15, "log covariance");
  });

  it("combineWithinSiteYear: mean of m contrasts, var = Σ Cov / m² (Borenstein et al. 2009 ch. 24)", () => {
    // Two treatments vs one check, r = 4, MSE = 16: var 8 each, covariance 4.
    expect(
      combineWithinSiteYear(
        [
          { yi: 4, vi: 8 },
          { yi: 6, vi: 8 },
        ],
        [
          [8, 4],
          [4, 8],
        ],
      ),
    ).toEqual({ yi: 5, vi: 6 });
    // Ignoring the covariance would give 4, too small: the check's noise is shared.
    expect(() => combineWithinSiteYear([{ yi: 4, vi: 8 }], [[9]])).toThrow(/covariance\[0\]\[0\]/);
    expect(() => combineWithinSiteYear([], [])).toThrow(/no contrasts/);
  });
});

describe("decision numbers", () => {
  it("break-even response B = cost/price", () => {
    expect(breakEvenResponse(24, 4.8)).toBe(5);
    expect(() => breakEvenResponse(24, 0)).toThrow(/price must be > 0/);
  });

  it("P(new response > B) = 1 − T(k−2)((B − μ)/√(τ² + SE²)), Higgins, Thompson & Spiegelhalter (2009); R: 1 - pt((B - mu)/sqrt(tau2 + se^2), k - 2)", () => {
    const normand = loadJsonFixture("meta_normand1999_md_results.json");
    const fit = metaAnalysis({ yi: normand.yi, vi: normand.vi, method: "REML", ci: "wald" });
    const { probability } = probabilityNewResponseAbove({ x: 0, estimate: fit.estimate, se: fit.se, tau2: fit.tau2, k: fit.k });
    const spread = Math.sqrt(fit.tau2 + fit.se ** 2);
    expectClose(probability, 1 - tCdf((0 - fit.estimate) / spread, 7), 1e-15, "probability");
    // At the HTS prediction bounds the probability is 0.975 and 0.025.
    const expected = normand.models.REML;
    expectClose(
      probabilityNewResponseAbove({ x: expected.pi_hts_tkm2_lb, estimate: fit.estimate, se: fit.se, tau2: fit.tau2, k: 9 }).probability,
      0.975,
      1e-7,
      "at lower PI",
    );
    expectClose(
      probabilityNewResponseAbove({ x: expected.pi_hts_tkm2_ub, estimate: fit.estimate, se: fit.se, tau2: fit.tau2, k: 9 }).probability,
      0.025,
      1e-6,
      "at upper PI",
    );
    const small = probabilityNewResponseAbove({ x: 0, estimate: 1, se: 1, tau2: 1, k: 2 });
    expect(small.probability).toBeNull();
    expect(small.note).toMatch(/at least 3/);
  });

  it("empirical shares above 0 and above B; share significant on their own", () => {
    expect(empiricalShares([-1, 2, 6, 8], 5)).toEqual({ aboveZero: 0.75, aboveBreakEven: 0.5, k: 4 });
    expect(shareSignificant([0.01, 0.2, 0.04, null], 0.05)).toEqual({ share: 2 / 3, significant: 2, tested: 3, untested: 1 });
  });
});

describe("meta-analysis edge cases", () => {
  it("k = 1: no τ², no heterogeneity, no HKSJ interval, notes say so", () => {
    const fit = metaAnalysis({ yi: [3], vi: [4], method: "REML", ci: "hksj" });
    expect(fit.tau2).toBe(0);
    expect(fit.ci).toBe("wald");
    expect(fit.q.pValue).toBeNull();
    expect(fit.i2Percent).toBeNull();
    expect(fit.predictionInterval.tKMinus2).toBeNull();
    expect(fit.notes.join(" ")).toMatch(/Only one site-year/);
    expect(fit.estimate).toBe(3);
    expectClose(fit.se, 2, 1e-15, "se = sqrt(vi)");
  });

  it("k = 2: estimates, but no t(k−2) prediction interval; k < 5 is flagged imprecise", () => {
    const fit = metaAnalysis({ yi: [1, 5], vi: [1, 1], method: "DL", ci: "hksj" });
    expect(fit.df).toBe(1);
    expect(fit.predictionInterval.tKMinus2).toBeNull();
    expect(fit.predictionInterval.metafor).not.toBeNull();
    expect(fit.imprecise).toBe(true);
    expect(fit.notes.join(" ")).toMatch(/Two site-years/);
    // DL: Q = 8, tau2 = (8 − 1)/(2 − 1) = 7.
    expectClose(fit.tau2, 7, 1e-12, "tau2");
  });

  it("REML that cannot converge in the allowed iterations says so instead of throwing", () => {
    const normand = loadJsonFixture("meta_normand1999_md_results.json");
    const fit = metaAnalysis({ yi: normand.yi, vi: normand.vi, method: "REML", control: { maxIterations: 1 } });
    expect(fit.converged).toBe(false);
    expect(fit.notes.join(" ")).toMatch(/did not converge/);
  });

  it("bad input is named", () => {
    expect(() => metaAnalysis({ yi: [1, 2], vi: [1] })).toThrow(/yi has 2 values but vi has 1/);
    expect(() => metaAnalysis({ yi: [1, 2], vi: [1, 0] })).toThrow(/vi at row 2/);
  });
});

describe("unit conversions", () => {
  it("moisture adjustment: 1000 lb at 18% → 942.5 lb at 13% (Mulvaney & Devkota 2020, UF/IFAS EDIS AG442)", () => {
    expect(units.adjustYieldToMoisture(1000, 18, 13).toFixed(1)).toBe("942.5");
    expect(() => units.adjustYieldToMoisture(1000, 100, 13)).toThrow(/harvest moisture/);
  });

  it("bu/ac ↔ kg/ha from lb/bu × 0.45359237 / 0.40468564224 (NIST Handbook 44 App. C): soybean 67.25, corn 62.77", () => {
    expect(units.kilogramsPerHectarePerBushelPerAcre(units.cropStandards.soybean.poundsPerBushel).toFixed(2)).toBe("67.25");
    expect(units.kilogramsPerHectarePerBushelPerAcre(units.cropStandards.corn.poundsPerBushel).toFixed(2)).toBe("62.77");
    expectClose(units.kilogramsPerHectareToBushelsPerAcre(units.bushelsPerAcreToKilogramsPerHectare(55, 60), 60), 55, 1e-15, "round trip");
  });

  it("lb/ac ↔ kg/ha (1 lb/ac = 1.12085 kg/ha, NIST Handbook 44)", () => {
    expect(units.poundsPerAcreToKilogramsPerHectare(100).toFixed(3)).toBe("112.085");
    expectClose(units.kilogramsPerHectareToPoundsPerAcre(units.poundsPerAcreToKilogramsPerHectare(40)), 40, 1e-15, "round trip");
  });

  it("P2O5 → P × 0.4365 and K2O → K × 0.8301 (Virginia Tech SPES-201NP)", () => {
    expectClose(units.phosphatePentoxideToPhosphorus(100), 43.65, 1e-15, "P");
    expectClose(units.potashToPotassium(100), 83.01, 1e-15, "K");
    expectClose(units.phosphorusToPhosphatePentoxide(43.65), 100, 1e-15, "back to P2O5");
    expectClose(units.potassiumToPotash(83.01), 100, 1e-15, "back to K2O");
  });

  it("crop standards (University of Wisconsin Extension)", () => {
    expect(units.cropStandards).toEqual({
      soybean: { poundsPerBushel: 60, standardMoisturePercent: 13 },
      corn: { poundsPerBushel: 56, standardMoisturePercent: 15.5 },
      wheat: { poundsPerBushel: 60, standardMoisturePercent: 13.5 },
    });
  });

  it("grade → nutrient rates, fluid densities (Univ. of Nebraska PASSEL; Alabama Extension ANR-174)", () => {
    expect(units.parseFertilizerGrade("12-0-0-26S")).toEqual({
      nitrogenPercent: 12,
      phosphatePercent: 0,
      potashPercent: 0,
      sulfurPercent: 26,
    });
    expect(() => units.parseFertilizerGrade("ten-34-0")).toThrow(/not of the form/);
    const product = units.fluidProductPoundsPerAcre(5, units.fluidFertilizerDensityPoundsPerGallon["10-34-0"]);
    expectClose(product, 57, 1e-15, "5 gal/ac of 10-34-0");
    const rates = units.nutrientRates(product, units.parseFertilizerGrade("10-34-0"));
    expectClose(rates.nitrogen, 5.7, 1e-15, "N");
    expectClose(rates.phosphate, 19.38, 1e-15, "P2O5");
    expect(units.fluidFertilizerDensityPoundsPerGallon.UAN28).toBe(10.67);
    expect(units.fluidFertilizerDensityPoundsPerGallon.UAN32).toBe(11.06);
  });

  it("ppm × 2 ≈ lb/ac in a 6-inch layer (University of Minnesota Extension)", () => {
    expect(units.partsPerMillionToPoundsPerAcreSixInch(15)).toBe(30);
  });
});

/**
 * Shared assertions comparing a metaAnalysis / subgroup result with a metafor 3.8-1 fixture object.
 */
import { expect } from "vitest";
import type { MetaAnalysisResult } from "@/stats/meta/meta-analysis";
import type { MetaRegressionResult } from "@/stats/meta/meta-regression";
import type { TauSquaredMethod } from "@/stats/meta/types";
import { CLOSED_FORM, ITERATIVE, expectClose } from "@/tests/stats/fixtures";

const iterativeMethods: readonly TauSquaredMethod[] = ["REML", "ML", "PM", "EB"];

export function toleranceFor(method: string): number {
  return iterativeMethods.includes(method as TauSquaredMethod) ? ITERATIVE : CLOSED_FORM;
}

/** Splits a fixture key such as "REML_knha" into method and CI. */
export function parseModelKey(key: string): { method: TauSquaredMethod; ci: "wald" | "hksj" } {
  const [method, suffix] = key.split("_");
  return { method: method as TauSquaredMethod, ci: suffix === "knha" ? "hksj" : "wald" };
}

/** metafor's uniroot tolerance in confint() (.Machine$double.eps^0.25), absolute on τ². */
const METAFOR_CONFINT_TOLERANCE = 2 ** -13;

export function expectModelMatches(result: MetaAnalysisResult, expected: any, label: string): void {
  const tolerance = toleranceFor(expected.method);
  expect(result.k).toBe(expected.k);
  expect(result.df).toBe(expected.df);
  expectClose(result.estimate, expected.estimate, tolerance, `${label} estimate`);
  expectClose(result.se, expected.se, tolerance, `${label} se`);
  expectClose(result.statistic, expected.stat, tolerance, `${label} stat`);
  expectClose(result.pValue, expected.pval, tolerance, `${label} pval`);
  expectClose(result.ciLower, expected.ci_lb, tolerance, `${label} ci_lb`);
  expectClose(result.ciUpper, expected.ci_ub, tolerance, `${label} ci_ub`);
  expectClose(result.tau2, expected.tau2, tolerance, `${label} tau2`);
  expectClose(result.tau, expected.tau, tolerance, `${label} tau`);
  expectClose(result.seTau2, expected.se_tau2, tolerance, `${label} se_tau2`);
  expectClose(result.i2Percent, expected.I2_pct, tolerance, `${label} I2`);
  expectClose(result.h2, expected.H2, tolerance, `${label} H2`);
  expectClose(result.typicalWithinVariance, expected.typical_within_var_s2, CLOSED_FORM, `${label} typical s2`);
  expectClose(result.q.statistic, expected.Q, CLOSED_FORM, `${label} Q`);
  expect(result.q.df).toBe(expected.Q_df);
  expectClose(result.q.pValue, expected.Q_pval, CLOSED_FORM, `${label} Q p`);
  expectClose(result.i2FromQPercent, expected.I2_higgins_from_Q_pct, CLOSED_FORM, `${label} I2 from Q`);
  expectClose(result.h2FromQ, expected.H2_from_Q, CLOSED_FORM, `${label} H2 from Q`);
  expectClose(result.predictionInterval.metafor?.lower, expected.pi_lb, tolerance, `${label} pi_lb`);
  expectClose(result.predictionInterval.metafor?.upper, expected.pi_ub, tolerance, `${label} pi_ub`);
  expectClose(result.predictionInterval.tKMinus2?.lower, expected.pi_hts_tkm2_lb, tolerance, `${label} HTS t(k-2) pi_lb`);
  expectClose(result.predictionInterval.tKMinus2?.upper, expected.pi_hts_tkm2_ub, tolerance, `${label} HTS t(k-2) pi_ub`);
  if (expected.knha_scale_factor_s2 !== undefined) {
    expectClose(result.knhaScale, expected.knha_scale_factor_s2, tolerance, `${label} knha s2`);
  }
  if (expected.weights_pct) {
    expect(result.weightsPercent).toHaveLength(expected.weights_pct.length);
    expected.weights_pct.forEach((weight: number, index: number) =>
      expectClose(result.weightsPercent[index], weight, tolerance, `${label} weight ${index + 1}`),
    );
  }
}

/**
 * Q-profile CI: metafor's confint() stops uniroot at |Δτ²| ≈ 1.2e-4, so compare τ² bounds with that
 * absolute tolerance (relative 1e-7 is kept where the fixture happens to be that tight).
 */
export function expectHeterogeneityIntervalMatches(result: MetaAnalysisResult, expected: any, label: string): void {
  const interval = result.heterogeneityInterval;
  expect(interval, `${label} heterogeneity interval`).not.toBeNull();
  if (!interval) return;
  const near = (actual: number, wanted: number, what: string) =>
    expect(Math.abs(actual - wanted), `${label} ${what}: got ${actual}, metafor ${wanted}`).toBeLessThanOrEqual(
      Math.max(METAFOR_CONFINT_TOLERANCE, 1e-7 * Math.abs(wanted)),
    );
  near(interval.tau2.lower, expected.tau2.ci_lb, "tau2 ci_lb");
  near(interval.tau2.upper, expected.tau2.ci_ub, "tau2 ci_ub");
  const s2 = result.typicalWithinVariance as number;
  // I² and H² bounds are functions of the τ² bounds; their metafor values inherit the same error.
  expectClose(interval.i2Percent.lower, (100 * interval.tau2.lower) / (interval.tau2.lower + s2), 1e-12, `${label} I2 lb from tau2`);
  near((interval.h2.lower - 1) * s2, (expected.H2.ci_lb - 1) * s2, "H2 ci_lb (as tau2)");
  near((interval.h2.upper - 1) * s2, (expected.H2.ci_ub - 1) * s2, "H2 ci_ub (as tau2)");
  near(interval.tau.lower ** 2, expected.tau.ci_lb ** 2, "tau ci_lb (squared)");
  expectClose(interval.tau2.estimate, expected.tau2.estimate, toleranceFor(result.method), `${label} tau2 estimate`);
}

function expectCoefficientMatches(
  actual: MetaRegressionResult["coefficients"][number] | undefined,
  expected: any,
  tolerance: number,
  label: string,
) {
  expect(actual, `${label} coefficient`).toBeDefined();
  expectClose(actual?.estimate, expected.estimate, tolerance, `${label} estimate`);
  expectClose(actual?.se, expected.se, tolerance, `${label} se`);
  expectClose(actual?.statistic, expected.stat, tolerance, `${label} stat`);
  expectClose(actual?.pValue, expected.pval, tolerance, `${label} pval`);
  expectClose(actual?.ciLower, expected.ci_lb, tolerance, `${label} ci_lb`);
  expectClose(actual?.ciUpper, expected.ci_ub, tolerance, `${label} ci_ub`);
}

import type { SubgroupResult } from "@/stats/meta/subgroups";

/** Checks `common_tau2_<METHOD>[_knha]` (rma(yi, vi, mods = ~ factor) and ~ 0 + factor). */
export function expectCommonTauSquaredMatches(result: SubgroupResult, expected: any, label: string): void {
  const tolerance = toleranceFor(expected.method);
  const { differences, perLevel, r2Percent } = result.commonTau2;
  expect(differences.p).toBe(expected.p);
  for (const [name, coefficient] of Object.entries<any>(expected.coefficients)) {
    expectCoefficientMatches(
      differences.coefficients.find((c) => c.name === name),
      coefficient,
      tolerance,
      `${label} ${name}`,
    );
  }
  expectClose(differences.qm?.statistic, expected.QM, tolerance, `${label} QM`);
  expect(differences.qm?.df).toEqual(expected.QM_df);
  expectClose(differences.qm?.pValue, expected.QM_pval, tolerance, `${label} QM p`);
  expectClose(differences.qe.statistic, expected.QE, CLOSED_FORM, `${label} QE`);
  expect(differences.qe.df).toBe(expected.QE_df);
  expectClose(differences.qe.pValue, expected.QE_pval, CLOSED_FORM, `${label} QE p`);
  expectClose(differences.tau2, expected.tau2_resid, tolerance, `${label} tau2 resid`);
  expectClose(differences.tau, expected.tau_resid, tolerance, `${label} tau resid`);
  expectClose(differences.seTau2, expected.se_tau2, tolerance, `${label} se tau2`);
  expectClose(differences.i2Percent, expected.I2_resid_pct, tolerance, `${label} I2 resid`);
  expectClose(differences.h2, expected.H2_resid, tolerance, `${label} H2 resid`);
  expectClose(r2Percent ?? 0, expected.R2_pct, tolerance, `${label} R2`);
  for (const [level, estimate] of Object.entries<any>(expected.per_level_estimates)) {
    expectCoefficientMatches(
      perLevel.coefficients.find((c) => c.name === level),
      estimate,
      tolerance,
      `${label} level ${level}`,
    );
  }
  expectClose(perLevel.qm?.statistic, expected.QM_all_zero, tolerance, `${label} QM all zero`);
  expectClose(perLevel.qm?.pValue, expected.QM_all_zero_pval, tolerance, `${label} QM all zero p`);
  expectClose(perLevel.tau2, expected.tau2_resid, tolerance, `${label} ~0+factor has the same tau2`);
}

/** Checks `separate_<METHOD>`: one fit per level and Q_between (and, for FE, the Q partition). */
export function expectSeparateFitsMatch(result: SubgroupResult, expected: any, label: string): void {
  for (const [level, model] of Object.entries<any>(expected.per_level)) {
    const fit = result.separate.perLevel[level];
    expect(fit, `${label} level ${level}`).toBeDefined();
    if (fit) expectModelMatches(fit, model, `${label} ${level}`);
  }
  const tolerance = toleranceFor(expected.per_level[Object.keys(expected.per_level)[0] as string].method);
  expectClose(result.separate.qBetween.statistic, expected.Q_between, tolerance, `${label} Q_between`);
  expect(result.separate.qBetween.df).toBe(expected.Q_between_df);
  expectClose(result.separate.qBetween.pValue, expected.Q_between_pval, tolerance, `${label} Q_between p`);
}

/**
 * Internally studentised residuals of a linear model with categorical factors.
 */
import { tTwoSidedP } from "@/stats/distributions";
import { fitLinearModel, type LinearModelInput } from "@/stats/linear-model";

export interface StudentizedResiduals {
  /** Raw residuals y − ŷ. */
  residuals: number[];
  /** Leverages h_ii = x_i'(X'X)⁻¹x_i over the estimable columns. */
  leverage: number[];
  /** e_i / (s·√(1 − h_ii)), s² the residual mean square; null where h_ii = 1 or there are no error df. */
  studentized: (number | null)[];
  /**
   * Externally studentised (R's `rstudent`): s is estimated without observation i, t_i = r_i·√((df − 1)/(df − r_i²)).
   * Unlike r_i, which cannot exceed √df (3 in a 4 × 4 RCBD), t_i is unbounded, so one wild plot stands out.
   */
  external: (number | null)[];
  /**
   * The Bonferroni outlier test's p of each observation: min(1, n · 2 · P(T > |t_i|)), T on df − 1 (Weisberg 2005,
   * Applied Linear Regression, section 9.1.3; car's outlierTest). Below 0.05, the observation is an outlier even
   * allowing for having looked at all n of them.
   */
  bonferroniP: (number | null)[];
}

/**
 * Internally studentised residuals (R's `rstandard`), and externally studentised ones (R's `rstudent`): each
 * residual divided by its own standard error
 * s·√(1 − h_ii), so plots with more leverage are judged on their own scale. Used to flag plot yields that the
 * site-year's RCBD fit (y ~ block + treatment) explains badly.
 *
 * Reference: Cook, R. D. & Weisberg, S. (1982) Residuals and Influence in Regression, sections 2.2.1 and 2.2.2; R
 * `rstandard(lm(y ~ block + treatment))` and `rstudent(...)`.
 * @example
 * studentizedResiduals({ response: yields, factors: { block, treatment }, terms: [["block"], ["treatment"]] }).studentized[0]
 * // npk, yield ~ block + N, plot 1: −0.453571781874084
 */
export function studentizedResiduals(input: LinearModelInput): StudentizedResiduals {
  if (input.terms.some((t) => t.length !== 1)) throw new RangeError("studentizedResiduals: main-effect terms only");
  const fit = fitLinearModel(input);
  const names = fit.coefficientNames;
  const factorNames = Object.keys(input.factors);
  const s2 = fit.residual.meanSquare;
  const residuals: number[] = [];
  const leverage: number[] = [];
  const studentized: (number | null)[] = [];
  const external: (number | null)[] = [];
  const df = fit.residual.df;
  for (let i = 0; i < fit.n; i++) {
    // The design row of observation i: the intercept and the dummy of each factor's level (treatment contrasts).
    const x = names.map((name) =>
      name === "(Intercept)" || factorNames.some((f) => name === `${f}${input.factors[f]!.values[i]}`) ? 1 : 0,
    );
    let h = 0;
    for (let a = 0; a < x.length; a++) {
      if (!x[a]) continue;
      for (let b = 0; b < x.length; b++) if (x[b]) h += fit.unscaledCovariance[a]![b]!;
    }
    const e = input.response[i]! - fit.fittedValues[i]!;
    residuals.push(e);
    leverage.push(h);
    const r = s2 !== null && s2 > 0 && h < 1 - 1e-10 ? e / Math.sqrt(s2 * (1 - h)) : null;
    studentized.push(r);
    external.push(r !== null && df > 1 && df - r * r > 1e-12 ? r * Math.sqrt((df - 1) / (df - r * r)) : null);
  }
  const bonferroniP = external.map((t) => (t === null ? null : Math.min(1, fit.n * tTwoSidedP(t, df - 1))));
  return { residuals, leverage, studentized, external, bonferroniP };
}

import { formatPValue } from "@/components/evidence/format";
import { shownDecimals } from "@/constants/precision";

/** The words an analysis result carries: notes and heterogeneity in plain language (the cautions are in cautions.ts). */

export const combinationNote =
  "When several treatments of one site-year match the filters, they share that site-year's check: their responses are " +
  "combined within the site-year first (their mean, with the covariance MSE/r that the shared check induces), so each " +
  "site-year enters the pooled estimate once. With groupBy, each group gets its own combined response per site-year, " +
  "so no site-year counts twice within a group; the between-group test treats groups as independent, which is " +
  "conservative when one site-year's check appears in several groups.";

/**
 * I² bands after the Cochrane Handbook (Deeks, Higgins & Altman, ch. 10.10.2): 0–40 % may not be important,
 * 30–60 % moderate, 50–90 % substantial, 75–100 % considerable (the Handbook's bands overlap; these cut-offs are ours).
 */
export function describeHeterogeneity(input: {
  i2Percent: number | null;
  tau: number;
  k: number;
  units: string;
  qPValue: number | null;
}): string {
  const { i2Percent, tau, k, units, qPValue } = input;
  if (k < 2) return "One site-year: the spread between site-years cannot be judged.";
  const spread =
    units === "ln(treated/check)" ? `about ±${(100 * (Math.exp(tau) - 1)).toFixed(0)} %` : `about ±${formatNumber(tau, units)} ${units}`;
  if (i2Percent === null) return "Heterogeneity could not be estimated.";
  const band = i2Percent < 30 ? "Little" : i2Percent < 60 ? "Moderate" : i2Percent < 75 ? "Substantial" : "Considerable";
  const meaning =
    i2Percent < 30
      ? "the site-years agree about as well as plot noise allows"
      : `true responses differ between site-years by ${spread} (τ) around the mean`;
  const test =
    qPValue !== null
      ? qPValue < 0.05
        ? "; the Q test finds the differences real"
        : "; the Q test does not separate them from chance"
      : "";
  const few = k < 5 ? ` With only ${k} site-years this is imprecise.` : "";
  return `${band} heterogeneity (I² = ${i2Percent.toFixed(0)} %): ${meaning}${test}.${few}`;
}

function formatNumber(value: number, units: string): string {
  return value.toFixed(shownDecimals(units));
}

export function sampleSizeNotes(k: number): string[] {
  if (k === 0) return ["No site-years match these filters: widen them (fewer classes, more years or placements) to get an estimate."];
  if (k === 1)
    return [
      "Only one site-year: the estimate is that site-year's own response; there is no between-site-year spread, prediction interval or probability for a new field.",
    ];
  if (k === 2) return ["Only two site-years: τ² is very imprecise and a prediction interval (t with k − 2 df) is not defined."];
  if (k < 5) return [`Only ${k} site-years: the estimate, τ² and the prediction interval are imprecise.`];
  return [];
}

/**
 * The between-group test in plain words, e.g. "Between-group test: F = 15.1 on 1 and 40 df, p < 0.001" (HKSJ: an F
 * test with k − p denominator df) or "Between-group test: χ² = 3.2 on 2 df, p = 0.20" (Wald).
 */
export function describeBetweenGroupTest(test: {
  statistic: number;
  df: number;
  df2: number | null;
  distribution: "chi-square" | "F";
  pValue: number;
}): string {
  const symbol = test.distribution === "F" ? "F" : "χ²";
  const df = test.df2 !== null ? `${test.df} and ${test.df2} df` : `${test.df} df`;
  return `Between-group test: ${symbol} = ${test.statistic.toFixed(1)} on ${df}, ${formatPValue(test.pValue)}`;
}

import { fSurvival, logResponseRatioEffect, meanSeparation, rcbdAnova, treatmentVersusCheckContrasts } from "@/stats";

/** One treatment's response against its site-year's check, as the responses table keeps it (kg/ha). */
interface TreatmentResponse {
  treatmentId: number;
  checkTreatmentId: number;
  checkMean: number;
  treatedMean: number;
  md: number;
  se: number;
  dfError: number;
  lnrr: number | null;
  lnrrVar: number | null;
  pValue: number | null;
  lsd05: number | null;
  cvPct: number | null;
  replicates: number;
  balanced: boolean;
  fromSummary: boolean;
}

export type SiteYearOutcome = { ok: true; rows: TreatmentResponse[] } | { ok: false; reason: string };

function findCheck(treatmentIds: Iterable<number>, isCheck: (id: number) => boolean): number | string {
  const checks = [...new Set(treatmentIds)].filter(isCheck);
  if (checks.length === 0) return "no untreated check among its treatments";
  if (checks.length > 1) return `${checks.length} checks among its treatments; exactly one is needed`;
  return checks[0]!;
}

/**
 * Responses of a site-year from its plots: the RCBD ANOVA (least squares when plots are missing), then every
 * treatment against the check with the contrast's own variance from the fitted model.
 */
export function responsesFromPlots(
  plots: readonly { treatmentId: number; block: number; y: number }[],
  isCheck: (id: number) => boolean,
): SiteYearOutcome {
  if (plots.length === 0) return { ok: false, reason: "no plot has a yield" };
  const check = findCheck(
    plots.map((p) => p.treatmentId),
    isCheck,
  );
  if (typeof check === "string") return { ok: false, reason: check };
  let anova;
  try {
    anova = rcbdAnova(plots.map((p) => ({ block: String(p.block), treatment: String(p.treatmentId), y: p.y })));
  } catch (error) {
    return { ok: false, reason: (error as Error).message.replace(/^rcbdAnova: /, "") };
  }
  if (anova.mse === null || !anova.adjustedMeanCovariance)
    return { ok: false, reason: "no error degrees of freedom (too few plots), so responses have no standard error" };
  const contrasts = treatmentVersusCheckContrasts(anova, String(check));
  const checkIndex = anova.treatments.indexOf(String(check));
  const cov = anova.adjustedMeanCovariance;
  const checkMean = anova.treatmentMeans[checkIndex]!.adjustedMean;
  const rows = contrasts.treatments.map((t, i): TreatmentResponse => {
    const index = anova.treatments.indexOf(t);
    const mean = anova.treatmentMeans[index]!;
    const effect = contrasts.effects[i]!;
    let lnrr: number | null = null;
    let lnrrVar: number | null = null;
    if (mean.adjustedMean > 0 && checkMean > 0) {
      lnrr = Math.log(mean.adjustedMean / checkMean);
      // Delta method on the adjusted means, with their covariance from the fit.
      const vt = cov[index]![index]!,
        vc = cov[checkIndex]![checkIndex]!,
        vtc = cov[index]![checkIndex]!;
      lnrrVar = vt / mean.adjustedMean ** 2 + vc / checkMean ** 2 - (2 * vtc) / (mean.adjustedMean * checkMean);
    }
    return {
      treatmentId: Number(t),
      checkTreatmentId: check,
      checkMean,
      treatedMean: mean.adjustedMean,
      md: effect.yi,
      se: Math.sqrt(effect.vi),
      dfError: anova.error.df,
      lnrr,
      lnrrVar,
      pValue: anova.treatment.pValue,
      lsd05: anova.meanSeparation?.lsd.alpha05 ?? null,
      cvPct: anova.cvPercent,
      replicates: anova.replicates ?? Math.min(mean.plots, anova.treatmentMeans[checkIndex]!.plots),
      balanced: anova.balanced,
      fromSummary: false,
    };
  });
  return { ok: true, rows };
}

/** Responses of a site-year published as means with r, the MSE and its df (no plots). */
export function responsesFromSummaries(
  means: readonly { treatmentId: number; mean: number; replicates: number; mse: number; dfError: number }[],
  isCheck: (id: number) => boolean,
): SiteYearOutcome {
  if (means.length < 2) return { ok: false, reason: "fewer than two treatment means" };
  const check = findCheck(
    means.map((m) => m.treatmentId),
    isCheck,
  );
  if (typeof check === "string") return { ok: false, reason: check };
  const c = means.find((m) => m.treatmentId === check)!;
  const { mse, dfError } = c;
  const totalR = means.reduce((a, m) => a + m.replicates, 0);
  const grand = means.reduce((a, m) => a + m.mean * m.replicates, 0) / totalR;
  const ssTreatment = means.reduce((a, m) => a + m.replicates * (m.mean - grand) ** 2, 0);
  const dfT = means.length - 1;
  const f = mse > 0 ? ssTreatment / dfT / mse : null;
  const pValue = f === null ? null : fSurvival(f, dfT, dfError);
  const balanced = means.every((m) => m.replicates === c.replicates);
  const separation = balanced ? meanSeparation({ mse, dfError, replicates: c.replicates, grandMean: grand }) : null;
  const rows = means
    .filter((m) => m.treatmentId !== check)
    .map((m): TreatmentResponse => {
      const lr =
        m.mean > 0 && c.mean > 0
          ? logResponseRatioEffect({ treatmentMean: m.mean, checkMean: c.mean, mse, replicates: Math.min(m.replicates, c.replicates) })
          : null;
      return {
        treatmentId: m.treatmentId,
        checkTreatmentId: check,
        checkMean: c.mean,
        treatedMean: m.mean,
        md: m.mean - c.mean,
        se: Math.sqrt(mse / m.replicates + mse / c.replicates),
        dfError,
        lnrr: lr?.yi ?? null,
        lnrrVar: lr?.vi ?? null,
        pValue,
        lsd05: separation?.lsd.alpha05 ?? null,
        cvPct: grand > 0 ? (100 * Math.sqrt(mse)) / grand : null,
        replicates: Math.min(m.replicates, c.replicates),
        balanced,
        fromSummary: true,
      };
    });
  return { ok: true, rows };
}

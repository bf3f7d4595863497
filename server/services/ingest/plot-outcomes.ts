import { responsesFromPlots, type SiteYearOutcome } from "./site-year-responses";

/** The plots with a yield of the site-years a file writes, flattened into typed arrays (compact for 1,000,000 rows). */
export interface PlotOutcomeRequest {
  siteYearIds: number[];
  /** Start of each site-year's plots in the arrays below; one more entry than siteYearIds. */
  offsets: Int32Array;
  treatmentIds: Float64Array;
  blocks: Int32Array;
  yields: Float64Array;
  checkTreatmentIds: number[];
}

/**
 * The responses of the site-years a plots file writes, computed from the file's own rows rather than read back
 * after the insert. (A worker thread was tried for large files: no faster at 1,000,000 plots, and about 950 MB more RSS.)
 */
export function plotOutcomes(request: PlotOutcomeRequest): Map<number, SiteYearOutcome> {
  const checks = new Set(request.checkTreatmentIds);
  const isCheck = (id: number) => checks.has(id);
  const out = new Map<number, SiteYearOutcome>();
  request.siteYearIds.forEach((id, i) => {
    const plots: { treatmentId: number; block: number; y: number }[] = [];
    for (let p = request.offsets[i]!; p < request.offsets[i + 1]!; p++) plots.push({ treatmentId: request.treatmentIds[p]!, block: request.blocks[p]!, y: request.yields[p]! });
    out.set(id, responsesFromPlots(plots, isCheck));
  });
  return out;
}

import Papa from "papaparse";
import type { MetaAnalysisResponse } from "@/schemas/analysis";

/**
 * The per-site-year rows as CSV, so the fit can be reproduced elsewhere, e.g. in R with metafor:
 * `d <- read.csv(url); rma(yi = estimate, sei = se, data = d, method = "REML", test = "knha")`.
 */
export function forestRowsCsv(result: MetaAnalysisResponse): string {
  return Papa.unparse(
    result.rows.map((r) => ({
      id: r.id,
      site_year: r.siteYearCode,
      site: r.siteCode,
      dataset: r.dataset,
      version: r.version,
      year: r.year,
      crop: r.crop,
      treatments: r.treatments.join(" "),
      group: r.group ?? "",
      effect: result.effect,
      units: result.units,
      estimate: r.estimate,
      se: r.se,
      vi: r.se * r.se,
      ci_lower: r.ciLower,
      ci_upper: r.ciUpper,
      df: r.df,
      p_value: r.pValue ?? "",
      significant: r.significant === null ? "" : r.significant,
      weight_pct: r.weightPercent,
      soil_test_analyte: r.soilTestAnalyte ?? "",
      soil_test_class: r.soilTestClass ?? "",
      soil_test_value: r.soilTestValue ?? "",
      check_mean: r.checkMean,
    })),
    {
      columns: ["id", "site_year", "site", "dataset", "version", "year", "crop", "treatments", "group", "effect", "units", "estimate", "se", "vi", "ci_lower", "ci_upper", "df", "p_value", "significant", "weight_pct", "soil_test_analyte", "soil_test_class", "soil_test_value", "check_mean"],
      newline: "\r\n",
    },
  ) + "\r\n";
}

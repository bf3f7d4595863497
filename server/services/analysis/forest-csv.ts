import type { MetaAnalysisResponse } from "@/schemas/analysis";
import { csvFile, type CsvValue } from "@/server/csv";

type Row = MetaAnalysisResponse["rows"][number];

/**
 * The per-site-year rows as CSV, so the fit can be reproduced elsewhere, e.g. in R with metafor:
 * `d <- read.csv(url); rma(yi = estimate, sei = se, data = d, method = "REML", test = "knha")`.
 */
export function forestRowsCsv(result: MetaAnalysisResponse): string {
  const columns: [string, (r: Row) => CsvValue][] = [
    ["id", (r) => r.id],
    ["site_year", (r) => r.siteYearCode],
    ["site", (r) => r.siteCode],
    ["dataset", (r) => r.dataset],
    ["version", (r) => r.version],
    ["year", (r) => r.year],
    ["crop", (r) => r.crop],
    ["treatments", (r) => r.treatments.join(" ")],
    ["group", (r) => r.group ?? ""],
    ["effect", () => result.effect],
    ["units", () => result.units],
    ["estimate", (r) => r.estimate],
    ["se", (r) => r.se],
    ["vi", (r) => r.se * r.se],
    ["ci_lower", (r) => r.ciLower],
    ["ci_upper", (r) => r.ciUpper],
    ["df", (r) => r.df],
    ["p_value", (r) => r.pValue ?? ""],
    ["significant", (r) => (r.significant === null ? "" : r.significant)],
    ["weight_pct", (r) => r.weightPercent],
    ["soil_test_analyte", (r) => r.soilTestAnalyte ?? ""],
    ["soil_test_class", (r) => r.soilTestClass ?? ""],
    ["soil_test_value", (r) => r.soilTestValue ?? ""],
    ["check_mean", (r) => r.checkMean],
  ];
  return csvFile(
    columns.map(([name]) => name),
    result.rows.map((r) => columns.map(([, value]) => value(r))),
  );
}

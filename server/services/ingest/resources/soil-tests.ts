import { and, eq, inArray } from "drizzle-orm";
import { soilTests } from "@/db/schema";
import { interpretSoilTest, interpretationTables } from "../interpretation-tables";
import { num, str, type IngestContext, type ResourceIngest } from "../resource-ingest";
import { insertRows, type Tx } from "../write-rows";
import type { Cell } from "../field-values";

const unitOf: Record<string, string> = { P: "ppm", K: "ppm", S: "ppm", Zn: "ppm", OM: "%", pH: "pH" };

export function soilTestsIngest({ state, options, report, versionId }: IngestContext): ResourceIngest {
  const keys = new Set<string>();
  const siteYearCodes = new Set<string>();
  const out: Cell[][] = [];
  return {
    resource: "soil_tests",
    row(v, row) {
      const code = str(v.site_year);
      const analyte = str(v.analyte);
      if (code === null || analyte === null || v.value === null) return;
      const sy = state.siteYears.get(code);
      if (!sy) return report.error(row, "site_year", code, `site-year "${code}" is not in this version; upload it in site_years first`);
      const key = `${code}\u0000${analyte}`;
      if (keys.has(key)) return report.error(row, "analyte", analyte, `site-year "${code}" has a second ${analyte} test (site_year + analyte is the primary key)`);
      keys.add(key);
      let value = num(v.value)!;
      let unit = str(v.unit) ?? unitOf[analyte] ?? null;
      if (unit === null) return report.error(row, "unit", null, `unit is required for analyte ${analyte}`);
      if (options.units.soilTest === "lb/ac" && unitOf[analyte] === "ppm") {
        // ppm × 2 ≈ lb/ac for a 6-inch layer (University of Minnesota Extension); the reverse here.
        value = value / 2;
        unit = "ppm";
      }
      if (unitOf[analyte] && unit !== unitOf[analyte]) {
        return report.error(row, "unit", unit, `${analyte} is measured in ${unitOf[analyte]}, not ${unit}`);
      }
      if (analyte === "pH" && (value < 3 || value > 11)) return report.error(row, "value", String(value), `a soil pH of ${value} is not plausible (3–11)`);
      const extractant = str(v.extractant);
      let cls = str(v.class);
      const interpretation = str(v.interpretation);
      if (interpretation) {
        const table = interpretationTables[interpretation];
        if (!table) {
          report.warn(row, "interpretation", interpretation, `interpretation table "${interpretation}" is not known here, so the class was not checked against the value`);
        } else {
          const derived = interpretSoilTest(interpretation, analyte, extractant, value);
          if (derived === null) {
            report.warn(row, "interpretation", interpretation, `table "${interpretation}" has no thresholds for ${analyte} by ${extractant ?? "no extractant"}; class not checked`);
          } else if (cls === null) {
            cls = derived;
          } else if (cls !== derived) {
            report.error(row, "class", cls, `class "${cls}" disagrees with ${analyte} = ${value} ppm (${extractant}); table "${interpretation}" gives "${derived}"`);
          }
        }
      }
      siteYearCodes.add(code);
      out.push([versionId, sy.id, analyte, value, unit, extractant, num(v.depth_in), cls, interpretation]);
    },
    finish() {},
    count: () => out.length,
    async write(database, tx: Tx) {
      if (options.mode === "replace") await tx.delete(soilTests).where(eq(soilTests.versionId, versionId));
      else {
        const ids = [...siteYearCodes].map((c) => state.siteYears.get(c)!.id);
        if (ids.length) await tx.delete(soilTests).where(and(eq(soilTests.versionId, versionId), inArray(soilTests.siteYearId, ids)));
      }
      await insertRows(database, tx, soilTests, ["versionId", "siteYearId", "analyte", "value", "unit", "extractant", "depthIn", "class", "interpretation"], out);
      return options.mode === "replace" ? "all" : { siteYearCodes: [...siteYearCodes] };
    },
  };
}

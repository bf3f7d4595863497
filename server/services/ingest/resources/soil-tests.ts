import { and, eq, inArray } from "drizzle-orm";
import { soilTests } from "@/db/schema";
import { soilTestClasses } from "@/schemas/filters";
import { cellMessages } from "@/schemas/messages";
import type { SoilTestScheme } from "@/schemas/soil-test-schemes";
import { roundConverted } from "@/stats/precision";
import { poundsPerAcreSixInchToPartsPerMillion } from "@/stats/units";
import { builtInSchemeNames, classifyByThresholds, classOfLabel, findScheme } from "@/server/services/soil-test-schemes";
import type { Reporter } from "../report";
import { num, str, type IngestContext, type ResourceIngest } from "../resource-ingest";
import { insertRows, type Tx } from "../write-rows";
import type { Cell } from "../field-values";

const unitOf: Record<string, string> = { P: "ppm", K: "ppm", S: "ppm", Zn: "ppm", OM: "%", pH: "pH" };

interface ClassInput {
  analyte: string;
  value: number;
  unit: string;
  extractant: string | null;
  reported: string | null;
  schemeName: string | null;
  schemes: readonly SoilTestScheme[];
  row: number;
  report: Reporter;
}

/**
 * A soil-test row's class: the label as the trial reported it, read with its interpretation scheme onto our ordinal
 * scale. A blank class is derived from the scheme's thresholds. A label the thresholds contradict is kept as the trial
 * reported it, with a warning; a label the scheme does not have, or one off our scale with no scheme, is an error.
 * Returns null when the row is refused (the error is reported).
 */
function readClass(input: ClassInput): { scale: string | null; label: string | null; scheme: string | null } | null {
  const { analyte, value, unit, extractant, reported, schemeName, row, report } = input;
  const onScale = (label: string) => (soilTestClasses as readonly string[]).includes(label);
  if (!schemeName) {
    if (reported !== null && !onScale(reported)) {
      report.error(
        row,
        "class",
        reported,
        `class "${reported}" is not on the ordinal scale (${soilTestClasses.join(", ")}); name the interpretation scheme that uses it in the interpretation column, registered in the data dictionary's soilTestSchemes or built in (${[...builtInSchemeNames].join(", ")})`,
      );
      return null;
    }
    return { scale: reported, label: reported, scheme: null };
  }
  const found = findScheme(schemeName, analyte, extractant, input.schemes);
  if (!found.ok) {
    if (reported !== null && !onScale(reported)) {
      report.error(row, "interpretation", schemeName, `${found.message}, so class "${reported}" cannot be placed on the ordinal scale`);
      return null;
    }
    report.warn(row, "interpretation", schemeName, `${found.message}; the class was not checked against the value`);
    return { scale: reported, label: reported, scheme: schemeName };
  }
  const scheme = found.scheme;
  const thresholdsApply = scheme.thresholds !== "as reported" && !found.extractantDiffers && scheme.unit === unit;
  if (scheme.thresholds !== "as reported" && !thresholdsApply) {
    const why = found.extractantDiffers
      ? `is for ${scheme.extractant}, not ${extractant ?? "no extractant"}`
      : `has thresholds in ${scheme.unit}, not ${unit}`;
    report.warn(
      row,
      "interpretation",
      schemeName,
      `scheme "${scheme.name}" ${why}; its labels are used but the class was not checked against the value`,
    );
  }
  const byValue = thresholdsApply ? classifyByThresholds(scheme, value) : null;
  if (reported === null) return { scale: byValue?.scale ?? null, label: byValue?.label ?? null, scheme: scheme.name };
  const cls = classOfLabel(scheme, reported);
  if (!cls) {
    report.error(
      row,
      "class",
      reported,
      `class "${reported}" is not a label of scheme "${scheme.name}" (${scheme.classes.map((c) => c.label).join(", ")})`,
    );
    return null;
  }
  if (byValue && byValue.label !== cls.label) {
    report.warn(
      row,
      "class",
      reported,
      `class "${reported}" contradicts scheme "${scheme.name}": ${analyte} = ${value} ${unit}${extractant ? ` (${extractant})` : ""} falls in "${byValue.label}" by its thresholds; kept as the trial reported it`,
    );
  }
  return { scale: cls.scale, label: cls.label, scheme: scheme.name };
}

export function soilTestsIngest({ state, options, report, versionId, soilTestSchemes }: IngestContext): ResourceIngest {
  const keys = new Set<string>();
  const siteYearCodes = new Set<string>();
  /** Analytes per site-year id the file gives: a merge replaces exactly those tests and keeps the others. */
  const analytesOf = new Map<number, string[]>();
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
      if (keys.has(key))
        return report.error(
          row,
          "analyte",
          analyte,
          `site-year "${code}" has a second ${analyte} test (site_year + analyte is the primary key)`,
        );
      keys.add(key);
      let value = num(v.value)!;
      let unit = str(v.unit) ?? unitOf[analyte] ?? null;
      if (unit === null) return report.error(row, "unit", null, `unit is required for analyte ${analyte}`);
      if (options.units.soilTest === "lb/ac" && unitOf[analyte] === "ppm") {
        // ppm × 2 ≈ lb/ac for a 6-inch layer (University of Minnesota Extension); the reverse here.
        value = roundConverted(poundsPerAcreSixInchToPartsPerMillion(value));
        unit = "ppm";
      }
      if (unitOf[analyte] && unit !== unitOf[analyte]) {
        return report.error(row, "unit", unit, `${analyte} test of ${code}: ${cellMessages.wrongUnit(analyte, unitOf[analyte]!, unit)}`);
      }
      if (analyte === "pH" && (value < 3 || value > 11))
        return report.error(row, "value", String(value), `a soil pH of ${value} is not plausible (3–11)`);
      const extractant = str(v.extractant);
      const reading = readClass({
        analyte,
        value,
        unit,
        extractant,
        reported: str(v.class),
        schemeName: str(v.interpretation),
        schemes: soilTestSchemes,
        row,
        report,
      });
      if (!reading) return;
      siteYearCodes.add(code);
      const list = analytesOf.get(sy.id) ?? [];
      list.push(analyte);
      analytesOf.set(sy.id, list);
      out.push([versionId, sy.id, analyte, value, unit, extractant, num(v.depth_in), reading.scale, reading.scheme, reading.label]);
    },
    finish() {},
    count: () => out.length,
    async write(database, tx: Tx) {
      if (options.mode === "replace") await tx.delete(soilTests).where(eq(soilTests.versionId, versionId));
      else {
        for (const [id, analytes] of analytesOf) {
          await tx
            .delete(soilTests)
            .where(and(eq(soilTests.versionId, versionId), eq(soilTests.siteYearId, id), inArray(soilTests.analyte, analytes)));
        }
      }
      await insertRows(
        database,
        tx,
        soilTests,
        ["versionId", "siteYearId", "analyte", "value", "unit", "extractant", "depthIn", "class", "interpretation", "reportedClass"],
        out,
      );
      return options.mode === "replace" ? "all" : { siteYearCodes: [...siteYearCodes] };
    },
  };
}

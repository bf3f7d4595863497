import { and, eq, gt } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { responses, treatments } from "@/db/schema";
import type { TrialFilters } from "@/schemas/filters";
import { responseRow, type ResponseRow } from "@/schemas/public";
import { countedSoilTest, filterNutrientsOf, testedNutrients } from "@/server/services/tested-nutrients";
import { responseConditions } from "@/server/services/trial-filter";
import { resolveMeasure } from "@/server/services/measures";
import {
  columnsFromFields,
  moistureBasisOf,
  orNull,
  provenanceLookup,
  versionIdsOf,
  yieldConverter,
  type RowResource,
} from "./row-resource";

const checkTreatment = alias(treatments, "check_treatment");

/**
 * One row per site-year × treatment against its check: the mean difference with its SE and df, the site-year's
 * own p and LSD, and the covariates the filters use. Differences, SEs and LSDs convert like yields (linearly).
 */
export const responseResource: RowResource<ResponseRow, TrialFilters & { measure?: string }> = {
  name: "responses",
  row: responseRow,
  async readBatch(db, scope, afterId, limit) {
    const from = provenanceLookup(scope);
    const { measure = "yield", ...filters } = scope.filters;
    // Yield converts to the asked units; every other measure is answered in its own unit.
    const definition = measure === "yield" ? null : await resolveMeasure(db, measure, versionIdsOf(scope));
    const rows = await db
      .select({ r: responses, checkTreatmentCode: checkTreatment.code })
      .from(responses)
      .innerJoin(checkTreatment, eq(checkTreatment.id, responses.checkTreatmentId))
      .where(and(responseConditions(filters, versionIdsOf(scope), measure), gt(responses.id, afterId)))
      .orderBy(responses.id)
      .limit(limit);
    return rows.map(({ r, checkTreatmentCode }) => {
      const asYield = yieldConverter(r.crop, scope.units);
      const y = definition ? (x: number) => x : asYield.convert;
      const tested = testedNutrients(r);
      const counted = countedSoilTest(tested, r, filterNutrientsOf(scope.filters));
      return {
        id: r.id,
        ...from(r.versionId),
        siteCode: r.siteCode,
        siteYearCode: r.siteYearCode,
        treatmentCode: r.treatmentCode,
        checkTreatmentCode,
        crop: r.crop,
        year: r.year,
        tillage: r.tillage,
        rowSpacingIn: r.rowSpacingIn,
        plantingDate: r.plantingDate,
        nutrients: r.nutrients,
        testedNutrients: tested,
        testedNutrientsStated: r.testedNutrientsStated !== null,
        placements: r.placements,
        nLbAc: r.nLbAc,
        p2o5LbAc: r.p2o5LbAc,
        k2oLbAc: r.k2oLbAc,
        sLbAc: r.sLbAc,
        soilTestAnalyte: counted.analyte,
        soilTestClass: counted.class,
        soilPClass: r.soilPClass,
        soilPValue: r.soilPValue,
        soilPReportedClass: r.soilPReportedClass,
        soilPScheme: r.soilPScheme,
        soilKClass: r.soilKClass,
        soilKValue: r.soilKValue,
        soilKReportedClass: r.soilKReportedClass,
        soilKScheme: r.soilKScheme,
        soilSClass: r.soilSClass,
        soilSValue: r.soilSValue,
        soilSReportedClass: r.soilSReportedClass,
        soilSScheme: r.soilSScheme,
        yieldUnit: asYield.unit,
        moistureBasisPct: moistureBasisOf(r.crop),
        measure,
        unit: definition ? definition.unit : asYield.unit,
        relativeToCheck: r.checkMeanKgHa > 0 ? r.treatedMeanKgHa / r.checkMeanKgHa : null,
        checkMean: y(r.checkMeanKgHa),
        treatedMean: y(r.treatedMeanKgHa),
        md: y(r.mdKgHa),
        se: y(r.seKgHa),
        df: r.dfError,
        lnrr: r.lnrr,
        lnrrVar: r.lnrrVar,
        pValue: r.pValue,
        lsd05: orNull(y)(r.lsd05KgHa),
        cvPct: r.cvPct,
        replicates: r.replicates,
        balanced: r.balanced,
        fromSummary: r.fromSummary,
      };
    });
  },
  csvColumns: columnsFromFields<ResponseRow>(Object.keys(responseRow.shape) as (keyof ResponseRow)[]),
};

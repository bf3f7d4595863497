import { and, eq, gt } from "drizzle-orm";
import { plots, sites, siteYears, treatments } from "@/db/schema";
import type { TrialFilters } from "@/schemas/filters";
import { observationRow, type ObservationRow } from "@/schemas/public";
import { observationConditions } from "@/server/services/trial-filter";
import {
  columnsFromFields,
  moistureBasisOf,
  orNull,
  provenanceLookup,
  versionIdsOf,
  yieldConverter,
  type RowResource,
} from "./row-resource";

/** Plot observations with their site-year and treatment codes; yields in the unit asked for. */
export const observationResource: RowResource<ObservationRow, Partial<TrialFilters>> = {
  name: "observations",
  row: observationRow,
  async readBatch(db, scope, afterId, limit) {
    const from = provenanceLookup(scope);
    const rows = await db
      .select({
        id: plots.id,
        versionId: plots.versionId,
        siteCode: sites.code,
        siteYearCode: siteYears.code,
        crop: siteYears.crop,
        year: siteYears.year,
        treatmentCode: treatments.code,
        isCheck: treatments.isCheck,
        plot: plots.plot,
        block: plots.block,
        yieldKgHa: plots.yieldKgHa,
        harvestMoisturePct: plots.harvestMoisturePct,
        standCount: plots.standCount,
        vigour: plots.vigour,
        testWeight: plots.testWeight,
      })
      .from(plots)
      .innerJoin(siteYears, eq(siteYears.id, plots.siteYearId))
      .innerJoin(sites, eq(sites.id, siteYears.siteId))
      .innerJoin(treatments, eq(treatments.id, plots.treatmentId))
      .where(and(observationConditions(scope.filters, versionIdsOf(scope)), gt(plots.id, afterId)))
      .orderBy(plots.id)
      .limit(limit);
    return rows.map(({ versionId, yieldKgHa, ...r }) => {
      const { unit, convert } = yieldConverter(r.crop, scope.units);
      return { ...r, ...from(versionId), yield: orNull(convert)(yieldKgHa), yieldUnit: unit, moistureBasisPct: moistureBasisOf(r.crop) };
    });
  },
  csvColumns: columnsFromFields<ObservationRow>(Object.keys(observationRow.shape) as (keyof ObservationRow)[]),
};

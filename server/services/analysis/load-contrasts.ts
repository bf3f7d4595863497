import type { Db } from "@/db/client";
import { responses } from "@/db/schema";
import type { TrialFilters } from "@/schemas/filters";
import { resolveVersions, responseConditions, type ResolvedVersion } from "@/server/services/trial-filter";

/** The columns of a treatment-vs-check response an analysis needs. */
export async function loadContrasts(db: Db, filters: TrialFilters) {
  const versions = await resolveVersions(db, filters);
  const rows = await db
    .select({
      id: responses.id,
      versionId: responses.versionId,
      siteYearId: responses.siteYearId,
      siteCode: responses.siteCode,
      siteYearCode: responses.siteYearCode,
      treatmentCode: responses.treatmentCode,
      crop: responses.crop,
      year: responses.year,
      tillage: responses.tillage,
      plantingDate: responses.plantingDate,
      nutrients: responses.nutrients,
      placements: responses.placements,
      soilPClass: responses.soilPClass,
      soilPValue: responses.soilPValue,
      soilKClass: responses.soilKClass,
      soilKValue: responses.soilKValue,
      soilSClass: responses.soilSClass,
      soilSValue: responses.soilSValue,
      checkMeanKgHa: responses.checkMeanKgHa,
      treatedMeanKgHa: responses.treatedMeanKgHa,
      mdKgHa: responses.mdKgHa,
      seKgHa: responses.seKgHa,
      dfError: responses.dfError,
      lnrr: responses.lnrr,
      lnrrVar: responses.lnrrVar,
      replicates: responses.replicates,
      balanced: responses.balanced,
    })
    .from(responses)
    .where(responseConditions(filters, versions.map((v) => v.versionId)))
    .orderBy(responses.year, responses.siteYearCode, responses.treatmentCode);
  return { versions, rows };
}

export type Contrast = Awaited<ReturnType<typeof loadContrasts>>["rows"][number];
export type { ResolvedVersion };

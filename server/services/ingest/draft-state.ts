import { eq, sql } from "drizzle-orm";
import { sites, summaryMeans, plots, treatments } from "@/db/schema";
import type { Tx } from "./write-rows";

interface SiteYearState {
  id: number;
  siteId: number;
  blocks: number;
  crop: string;
  rowSpacingIn: number | null;
  design: string;
  hasPlots: boolean;
  hasSummaries: boolean;
  hasSoilTests: boolean;
}

/** What a draft already holds, as far as validating a new file needs it (keys, blocks, checks, references). */
export interface DraftState {
  versionId: string;
  sites: Map<string, { id: number; used: boolean }>;
  siteYears: Map<string, SiteYearState>;
  treatments: Map<string, { id: number; isCheck: boolean; used: boolean }>;
}

export async function loadDraftState(tx: Tx, versionId: string): Promise<DraftState> {
  const [siteRows, syResult, trtRows, used] = await Promise.all([
    tx.select({ id: sites.id, code: sites.code }).from(sites).where(eq(sites.versionId, versionId)),
    tx.execute<{
      id: number | string;
      code: string;
      site_id: number | string;
      blocks: number;
      crop: string;
      row_spacing_in: number | string | null;
      design: string;
      has_plots: boolean;
      has_summaries: boolean;
      has_soil_tests: boolean;
    }>(
      sql`select sy.id, sy.code, sy.site_id, sy.blocks, sy.crop, sy.row_spacing_in, sy.design,
            exists (select 1 from plots p where p.site_year_id = sy.id) as has_plots,
            exists (select 1 from summary_means m where m.site_year_id = sy.id) as has_summaries,
            exists (select 1 from soil_tests st where st.site_year_id = sy.id) as has_soil_tests
          from site_years sy where sy.version_id = ${versionId}`,
    ),
    tx
      .select({ id: treatments.id, code: treatments.code, isCheck: treatments.isCheck })
      .from(treatments)
      .where(eq(treatments.versionId, versionId)),
    tx.execute<{ treatment_id: number | string }>(
      sql`select distinct treatment_id from ${plots} where version_id = ${versionId} union select distinct treatment_id from ${summaryMeans} where version_id = ${versionId}`,
    ),
  ]);
  const usedTreatments = new Set(
    (
      (used as unknown as { rows?: { treatment_id: number | string }[] }).rows ?? (used as unknown as { treatment_id: number | string }[])
    ).map((r) => Number(r.treatment_id)),
  );
  const syRows = (
    syResult as unknown as {
      rows: {
        id: number | string;
        code: string;
        site_id: number | string;
        blocks: number;
        crop: string;
        row_spacing_in: number | string | null;
        design: string;
        has_plots: boolean;
        has_summaries: boolean;
        has_soil_tests: boolean;
      }[];
    }
  ).rows.map((s) => ({
    id: Number(s.id),
    code: s.code,
    siteId: Number(s.site_id),
    blocks: s.blocks,
    crop: s.crop,
    rowSpacingIn: s.row_spacing_in === null ? null : Number(s.row_spacing_in),
    design: s.design,
    hasPlots: s.has_plots,
    hasSummaries: s.has_summaries,
    hasSoilTests: s.has_soil_tests,
  }));
  const usedSites = new Set(syRows.map((s) => s.siteId));
  return {
    versionId,
    sites: new Map(siteRows.map((s) => [s.code, { id: s.id, used: usedSites.has(s.id) }])),
    siteYears: new Map(
      syRows.map((s) => [
        s.code,
        {
          id: s.id,
          siteId: s.siteId,
          blocks: s.blocks,
          crop: s.crop,
          rowSpacingIn: s.rowSpacingIn,
          design: s.design,
          hasPlots: !!s.hasPlots,
          hasSummaries: !!s.hasSummaries,
          hasSoilTests: !!s.hasSoilTests,
        },
      ]),
    ),
    treatments: new Map(trtRows.map((t) => [t.code, { id: t.id, isCheck: t.isCheck, used: usedTreatments.has(t.id) }])),
  };
}

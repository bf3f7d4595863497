import { and, eq, inArray } from "drizzle-orm";
import { summaryMeans } from "@/db/schema";
import { yieldFactorToKgHa } from "../edge-units";
import type { Cell } from "../field-values";
import { num, str, type IngestContext, type ResourceIngest } from "../resource-ingest";
import { insertRows } from "../write-rows";
import { checkRule, newTally, type SiteYearTally } from "./site-year-rules";

export function summariesIngest({ state, options, report, versionId }: IngestContext): ResourceIngest {
  const tallies = new Map<string, SiteYearTally & { factor: number; id: number; mse: number; df: number }>();
  const out: Cell[][] = [];
  return {
    resource: "summaries",
    row(v, row) {
      const code = str(v.site_year);
      const trtCode = str(v.treatment);
      if (code === null || trtCode === null || v.mean_kg_ha === null || v.replicates === null || v.mse === null || v.df_error === null)
        return;
      let tally = tallies.get(code);
      const sy = state.siteYears.get(code);
      if (!sy) return report.error(row, "site_year", code, `site-year "${code}" is not in this version; upload it in site_years first`);
      const mse = num(v.mse)!;
      const df = num(v.df_error)!;
      if (!tally) {
        let factor = 1;
        try {
          factor = yieldFactorToKgHa(options.units.yield, sy.crop);
        } catch (error) {
          return report.error(row, "mean_kg_ha", null, (error as Error).message);
        }
        if (sy.hasPlots)
          report.error(row, "site_year", code, `site-year "${code}" already has plots; a site-year has either plots or summaries`);
        tally = { ...newTally(code, row), factor, id: sy.id, mse, df };
        tallies.set(code, tally);
      } else if (tally.mse !== mse || tally.df !== df) {
        report.error(
          row,
          "mse",
          String(mse),
          `site-year "${code}" has one ANOVA, so mse and df_error must be the same on all its rows (data row ${tally.firstRow} has ${tally.mse} with ${tally.df} df)`,
        );
      }
      const trt = state.treatments.get(trtCode);
      if (!trt)
        return report.error(row, "treatment", trtCode, `treatment "${trtCode}" is not in this version; upload it in treatments first`);
      if (tally.treatments.has(trtCode))
        return report.error(
          row,
          "treatment",
          trtCode,
          `treatment "${trtCode}" appears twice for site-year "${code}" (site_year + treatment is the primary key)`,
        );
      tally.treatments.add(trtCode);
      // An MSE is in squared yield units, so it converts with the square of the yield factor.
      out.push([versionId, sy.id, trt.id, num(v.mean_kg_ha)! * tally.factor, num(v.replicates), mse * tally.factor ** 2, df]);
    },
    /** Merge: the site-year keeps its other treatments' means, which must share the file's ANOVA (mse, df_error). */
    async mergeExisting(tx) {
      if (options.mode !== "merge") return;
      const ids = [...tallies.values()].filter((t) => state.siteYears.get(t.code)?.hasSummaries).map((t) => t.id);
      if (ids.length === 0) return;
      const byId = new Map([...tallies.values()].map((t) => [t.id, t]));
      const codeOf = new Map([...state.treatments].map(([code, t]) => [t.id, code]));
      const existing = await tx
        .select()
        .from(summaryMeans)
        .where(and(eq(summaryMeans.versionId, versionId), inArray(summaryMeans.siteYearId, ids)));
      for (const m of existing) {
        const tally = byId.get(m.siteYearId)!;
        const code = codeOf.get(m.treatmentId) ?? String(m.treatmentId);
        if (tally.treatments.has(code)) continue;
        tally.treatments.add(code);
        const fileMse = tally.mse * tally.factor ** 2;
        if (Math.abs(m.mse - fileMse) > 1e-6 * Math.max(1, Math.abs(fileMse)) || m.dfError !== tally.df) {
          report.error(
            tally.firstRow,
            "mse",
            String(tally.mse),
            `Site-year ${tally.code} has one ANOVA, but the draft's mean of treatment ${code} has mse ${m.mse} (kg/ha)² with ${m.dfError} df and this file gives ${fileMse} with ${tally.df}; upload all of the site-year's means with the same mse and df_error.`,
          );
        }
        out.push([versionId, m.siteYearId, m.treatmentId, m.meanKgHa, m.replicates, m.mse, m.dfError]);
      }
    },
    finish() {
      for (const tally of tallies.values()) {
        checkRule(tally, state, report);
        if (tally.treatments.size < 2)
          report.error(
            tally.firstRow,
            "treatment",
            null,
            `site-year "${tally.code}" has only one treatment; a response needs the check and at least one other`,
          );
      }
    },
    count: () => out.length,
    async write(database, tx) {
      if (options.mode === "replace") await tx.delete(summaryMeans).where(eq(summaryMeans.versionId, versionId));
      else {
        const ids = [...tallies.values()].map((t) => t.id);
        if (ids.length)
          await tx.delete(summaryMeans).where(and(eq(summaryMeans.versionId, versionId), inArray(summaryMeans.siteYearId, ids)));
      }
      await insertRows(
        database,
        tx,
        summaryMeans,
        ["versionId", "siteYearId", "treatmentId", "meanKgHa", "replicates", "mse", "dfError"],
        out,
      );
      return options.mode === "replace" ? "all" : { siteYearCodes: [...tallies.keys()] };
    },
  };
}

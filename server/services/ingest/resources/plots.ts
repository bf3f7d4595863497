import { and, eq, inArray } from "drizzle-orm";
import { plantsPerAcreFromPer10Ft } from "@/constants/measures";
import { plots } from "@/db/schema";
import { roundConverted } from "@/stats/precision";
import type { Cell } from "../field-values";
import { toStandardMoisture, yieldFactorToKgHa } from "../edge-units";
import { num, type IngestContext, type ResourceIngest } from "../resource-ingest";
import type { PlotOutcomeRequest } from "../plot-outcomes";
import { insertRows, RowBuffer } from "../write-rows";
import { balanceRule, checkRule, newTally, outlierRule, type SiteYearTally } from "./site-year-rules";

/** Plausible grain moisture at harvest, % wet basis (common practice, no source). */
const MOISTURE_MIN = 5;
const MOISTURE_MAX = 40;

/** The plot columns a file fills, in the order the rows are kept. */
const plotKeys = [
  "versionId",
  "siteYearId",
  "treatmentId",
  "plot",
  "block",
  "yieldKgHa",
  "harvestMoisturePct",
  "standCount",
  "vigour",
  "testWeight",
  "otherMeasures",
] as const;

export function plotsIngest({ state, options, report, versionId, bulkCopy, measures, standUnit }: IngestContext): ResourceIngest {
  const standPer10Ft = standUnit === "plants/10 ft row";
  const tallies = new Map<
    string,
    SiteYearTally & {
      factor: number;
      crop: string;
      blocks: number;
      rcbd: boolean;
      id: number;
      plots: Set<string>;
      /** The file's row of the first plot in each treatment × block cell, to name it when the draft's plots clash. */
      cellRows: Map<string, number>;
    }
  >();
  const codeOfTreatment = new Map([...state.treatments].map(([code, t]) => [t.id, code]));
  const merging = options.mode === "merge";
  const out = new RowBuffer(bulkCopy);
  const harvestBasis = options.units.yieldMoisture === "harvest";
  return {
    resource: "plots",
    row(v, row) {
      const code = v.site_year as string | null;
      const plot = v.plot as string | null;
      const trtCode = v.treatment as string | null;
      const block = v.block as number | null;
      if (code === null || plot === null || trtCode === null || block === null) return;
      let tally = tallies.get(code);
      if (!tally) {
        const sy = state.siteYears.get(code);
        if (!sy) return report.error(row, "site_year", code, `site-year "${code}" is not in this version; upload it in site_years first`);
        let factor = 1;
        try {
          factor = yieldFactorToKgHa(options.units.yield, sy.crop);
        } catch (error) {
          return report.error(row, "yield_kg_ha", null, (error as Error).message);
        }
        if (sy.hasSummaries)
          report.error(row, "site_year", code, `site-year "${code}" already has summary means; a site-year has either plots or summaries`);
        tally = {
          ...newTally(code, row),
          factor,
          crop: sy.crop,
          blocks: sy.blocks,
          rcbd: sy.design === "RCBD",
          id: sy.id,
          plots: new Set(),
          cellRows: new Map(),
        };
        tallies.set(code, tally);
      }
      const trt = state.treatments.get(trtCode);
      if (!trt)
        return report.error(row, "treatment", trtCode, `treatment "${trtCode}" is not in this version; upload it in treatments first`);
      if (block > tally.blocks)
        return report.error(row, "block", String(block), `block ${block} is outside 1–${tally.blocks}, the blocks of site-year "${code}"`);
      if (tally.plots.has(plot))
        return report.error(row, "plot", plot, `plot "${plot}" appears twice in site-year "${code}" (site_year + plot is the primary key)`);
      tally.plots.add(plot);
      const moisture = num(v.harvest_moisture_pct);
      if (moisture !== null && (moisture < MOISTURE_MIN || moisture > MOISTURE_MAX)) {
        report.error(
          row,
          "harvest_moisture_pct",
          String(moisture),
          `harvest moisture ${moisture} % is not plausible (expected ${MOISTURE_MIN}–${MOISTURE_MAX} %)`,
        );
      }
      let y = num(v.yield_kg_ha);
      // Yields keep the full double of their conversion to kg/ha (rounding them would spoil the round trip back to
      // the unit given; stats/precision.ts); the stand, never converted back, is rounded by the rule.
      if (y !== null) {
        y *= tally.factor;
        if (harvestBasis) {
          if (moisture === null) {
            report.error(
              row,
              "harvest_moisture_pct",
              null,
              "yields are given at harvest moisture, so harvest_moisture_pct is required to move them to standard moisture",
            );
            y = null;
          } else if (moisture >= MOISTURE_MIN && moisture <= MOISTURE_MAX) y = toStandardMoisture(y, moisture, tally.crop);
        }
      }
      tally.treatments.add(trtCode);
      const cell = `${trtCode}|${block}`;
      const seen = tally.cells.get(cell) ?? 0;
      if (seen >= 1 && tally.rcbd) {
        report.error(
          row,
          "block",
          String(block),
          `treatment "${trtCode}" appears more than once in block ${block} of site-year "${code}"; an RCBD has each treatment once per block`,
        );
      }
      if (!tally.cellRows.has(cell)) tally.cellRows.set(cell, row);
      if (y !== null) {
        tally.cells.set(cell, seen + 1);
        tally.yields.push(y);
        tally.yieldRows.push(row);
        tally.yieldTreatmentIds.push(trt.id);
        tally.yieldBlocks.push(block);
      } else if (!tally.cells.has(cell)) tally.cells.set(cell, 0);
      let stand = num(v.stand_count);
      if (stand !== null && standPer10Ft) {
        const rowSpacing = state.siteYears.get(code)?.rowSpacingIn ?? null;
        if (rowSpacing === null || !(rowSpacing > 0)) {
          report.error(
            row,
            "stand_count",
            String(stand),
            `stand counts are per 10 ft of row, and site-year "${code}" has no row spacing to turn them into plants/ac`,
          );
          stand = null;
        } else stand = roundConverted(plantsPerAcreFromPer10Ft(stand, rowSpacing));
      }
      let added: Record<string, number> | null = null;
      for (const m of measures) {
        const value = num(v[m.name]);
        if (value !== null) (added ??= {})[m.name] = value;
      }
      out.push([
        versionId,
        tally.id,
        trt.id,
        plot,
        block,
        y,
        moisture,
        stand,
        num(v.vigour),
        num(v.test_weight),
        added === null ? null : JSON.stringify(added),
      ]);
    },
    /**
     * Merge: the site-years the file touches keep their other plots, so the rules run on the plots the draft will hold.
     * The file's plots replace the draft's plots of the same site_year + plot; the rest are read here and written again.
     */
    async mergeExisting(tx) {
      if (!merging) return;
      const ids = [...tallies.values()].filter((t) => state.siteYears.get(t.code)?.hasPlots).map((t) => t.id);
      if (ids.length === 0) return;
      const byId = new Map([...tallies.values()].map((t) => [t.id, t]));
      const existing = await tx
        .select()
        .from(plots)
        .where(and(eq(plots.versionId, versionId), inArray(plots.siteYearId, ids)));
      for (const p of existing) {
        const tally = byId.get(p.siteYearId)!;
        if (tally.plots.has(p.plot)) continue;
        tally.plots.add(p.plot);
        const trtCode = codeOfTreatment.get(p.treatmentId) ?? String(p.treatmentId);
        tally.treatments.add(trtCode);
        const cell = `${trtCode}|${p.block}`;
        const seen = tally.cells.get(cell) ?? 0;
        if (seen >= 1 && tally.rcbd && tally.cellRows.has(cell)) {
          report.error(
            tally.cellRows.get(cell)!,
            "block",
            String(p.block),
            `Site-year ${tally.code}: treatment ${trtCode} is already in block ${p.block} (plot ${p.plot} in the draft); an RCBD has each treatment once per block. Give this row the block it was really in, or correct plot ${p.plot}.`,
          );
        }
        if (p.yieldKgHa !== null) {
          tally.cells.set(cell, seen + 1);
          tally.yields.push(p.yieldKgHa);
          // Plots already in the draft were checked when they came in: no row of this file to name.
          tally.yieldRows.push(-1);
          tally.yieldTreatmentIds.push(p.treatmentId);
          tally.yieldBlocks.push(p.block);
        } else if (!tally.cells.has(cell)) tally.cells.set(cell, 0);
        // Stored values go back as stored: stand counts already in plants/ac, added measures as their JSON.
        out.push(
          plotKeys.map((k) => (k === "otherMeasures" ? (p.otherMeasures === null ? null : JSON.stringify(p.otherMeasures)) : p[k]) as Cell),
        );
      }
    },
    finish() {
      for (const tally of tallies.values()) {
        checkRule(tally, state, report);
        balanceRule(tally, tally.blocks, (id) => codeOfTreatment.get(id) ?? String(id), report);
        outlierRule(tally, report);
        // A million-plot file leaves two million small strings in these; the write does not need them, and a smaller
        // heap keeps the garbage collector from slowing the COPY that follows.
        tally.plots.clear();
        tally.cells.clear();
      }
    },
    count: () => out.length,
    /** Hands the plot lists over (once, after finish): the tallies keep no copy. */
    plotOutcomeRequest(): PlotOutcomeRequest {
      const siteYears = [...tallies.values()]
        .filter((t) => t.yields.length > 0)
        .map((t) => ({ siteYearId: t.id, treatmentIds: t.yieldTreatmentIds, blocks: t.yieldBlocks, yields: t.yields }));
      for (const t of tallies.values()) {
        t.yields = [];
        t.yieldRows = [];
        t.yieldTreatmentIds = [];
        t.yieldBlocks = [];
      }
      return { siteYears, checkTreatmentIds: [...state.treatments.values()].filter((t) => t.isCheck).map((t) => t.id) };
    },
    async write(database, tx) {
      if (options.mode === "replace") await tx.delete(plots).where(eq(plots.versionId, versionId));
      else {
        const ids = [...tallies.values()].filter((t) => state.siteYears.get(t.code)?.hasPlots).map((t) => t.id);
        if (ids.length) await tx.delete(plots).where(and(eq(plots.versionId, versionId), inArray(plots.siteYearId, ids)));
      }
      await insertRows(database, tx, plots, plotKeys, out);
      return options.mode === "replace" ? "all" : { siteYearCodes: [...tallies.keys()] };
    },
  };
}

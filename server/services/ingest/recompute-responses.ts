import { and, asc, eq, inArray, isNotNull, or } from "drizzle-orm";
import type { Database } from "@/db/client";
import { plots, responses, sites, siteYears, soilTests, summaryMeans, treatments, versions } from "@/db/schema";
import { builtInMeasureDefinitions } from "@/constants/measures";
import type { Cell } from "./field-values";
import type { Affected } from "./resource-ingest";
import { responsesFromPlots, responsesFromSummaries, type SiteYearOutcome } from "./site-year-responses";
import { insertRows, type Tx } from "./write-rows";
import { writableKeys, type FullRow } from "@/db/columns";

export interface RecomputeResult {
  siteYears: number;
  /** Yield responses written (the responses of other measures are written beside them, and not counted here). */
  rows: number;
  uncomputed: { siteYear: string; reason: string }[];
}

/** One response row with a value for every column of `responses` (adding a column fails to compile until it is filled). */
export type ResponseRow = FullRow<typeof responses, Cell>;

/** The columns of `responses` in db/schema's order, the order the rows are written in. */
const responseKeys = writableKeys(responses);

/** A PostgreSQL array literal, for COPY and for INSERT alike. */
const pgArray = (values: string[]) => `{${values.map((v) => `"${v.replaceAll('"', '\\"')}"`).join(",")}}`;

const CHUNK = 400;

/**
 * Computes the responses of a draft's site-years again (all of them, or those a file touched), inside the upload's
 * transaction. A site-year whose responses cannot be computed keeps none and is listed with the reason.
 */
export async function recomputeResponses(
  database: Database,
  tx: Tx,
  versionId: string,
  affected: Affected,
  fromFile?: FilePlotOutcomes,
): Promise<RecomputeResult> {
  const computed = await computeResponses(tx, versionId, affected, fromFile);
  if (affected === "all") await tx.delete(responses).where(eq(responses.versionId, versionId));
  else if (computed.siteYearIds.length)
    await tx.delete(responses).where(and(eq(responses.versionId, versionId), inArray(responses.siteYearId, computed.siteYearIds)));
  await insertRows(
    database,
    tx,
    responses,
    responseKeys,
    computed.rows.map((row) => responseKeys.map((key) => row[key])),
  );
  return {
    siteYears: computed.siteYearIds.length,
    rows: computed.rows.filter((r) => r.measure === "yield").length,
    uncomputed: computed.uncomputed,
  };
}

/**
 * The outcomes of the site-years a plots file has just written, computed from the file's rows. They hold every
 * plot those site-years now have (the write replaced their plots), so the plots need not be read back.
 */
export type FilePlotOutcomes = Map<number, SiteYearOutcome>;

/**
 * The response rows of a draft's site-years (read only), and the site-years that have none, with the reason.
 * With `fromFile`, plots come from that file alone: a site-year it has no yields for has no plots with yields now.
 */
export async function computeResponses(
  tx: Tx,
  versionId: string,
  affected: Affected,
  fromFile?: FilePlotOutcomes,
  codeListLimit = 1000,
): Promise<{ siteYearIds: number[]; rows: ResponseRow[]; uncomputed: RecomputeResult["uncomputed"] }> {
  // A file of thousands of site-years would send thousands of codes as parameters; reading the version's site-years
  // and keeping the named ones is cheaper then.
  const byList = affected !== "all" && affected.siteYearCodes.length <= codeListLimit;
  const fetched = await tx
    .select({
      id: siteYears.id,
      code: siteYears.code,
      siteCode: sites.code,
      crop: siteYears.crop,
      year: siteYears.year,
      tillage: siteYears.tillage,
      rowSpacingIn: siteYears.rowSpacingIn,
      plantingDate: siteYears.plantingDate,
    })
    .from(siteYears)
    .innerJoin(sites, eq(sites.id, siteYears.siteId))
    .where(
      and(
        eq(siteYears.versionId, versionId),
        byList ? inArray(siteYears.code, affected.siteYearCodes.length ? affected.siteYearCodes : ["\u0000"]) : undefined,
      ),
    )
    .orderBy(asc(siteYears.code));
  const named = affected === "all" || byList ? null : new Set(affected.siteYearCodes);
  const syRows = named ? fetched.filter((s) => named.has(s.code)) : fetched;
  const siteYearIds = syRows.map((s) => s.id);
  const rows: ResponseRow[] = [];

  const [trtRows, [version]] = await Promise.all([
    tx.select().from(treatments).where(eq(treatments.versionId, versionId)),
    tx.select({ tableSchema: versions.tableSchema }).from(versions).where(eq(versions.id, versionId)),
  ]);
  const addedMeasures = (version?.tableSchema.measures ?? []).map((m) => m.name);
  const trtById = new Map(trtRows.map((t) => [t.id, t]));
  const isCheck = (id: number) => trtById.get(id)?.isCheck === true;
  const uncomputed: RecomputeResult["uncomputed"] = [];
  const fileOutcomes = fromFile ?? null;

  for (let start = 0; start < syRows.length; start += CHUNK) {
    const chunk = syRows.slice(start, start + CHUNK);
    const chunkIds = chunk.map((s) => s.id);
    const [plotRows, meanRows, soilRows, measureRows] = await Promise.all([
      fileOutcomes
        ? Promise.resolve([])
        : tx
            .select({ siteYearId: plots.siteYearId, treatmentId: plots.treatmentId, block: plots.block, y: plots.yieldKgHa })
            .from(plots)
            .where(and(inArray(plots.siteYearId, chunkIds), isNotNull(plots.yieldKgHa))),
      tx.select().from(summaryMeans).where(inArray(summaryMeans.siteYearId, chunkIds)),
      tx.select().from(soilTests).where(inArray(soilTests.siteYearId, chunkIds)),
      readOtherMeasures(tx, chunkIds, addedMeasures.length > 0),
    ]);
    const otherBySy = otherMeasurePlots(measureRows, addedMeasures);
    const plotsBySy = new Map<number, { treatmentId: number; block: number; y: number }[]>();
    for (const p of plotRows) {
      let list = plotsBySy.get(p.siteYearId);
      if (!list) plotsBySy.set(p.siteYearId, (list = []));
      list.push({ treatmentId: p.treatmentId, block: p.block, y: p.y! });
    }
    const meansBySy = new Map<number, typeof meanRows>();
    for (const m of meanRows) {
      const list = meansBySy.get(m.siteYearId) ?? [];
      list.push(m);
      meansBySy.set(m.siteYearId, list);
    }
    const soilBySy = new Map<number, Map<string, { cls: string | null; value: number; reported: string | null; scheme: string | null }>>();
    for (const s of soilRows) {
      const m = soilBySy.get(s.siteYearId) ?? new Map();
      m.set(s.analyte, { cls: s.class, value: s.value, reported: s.reportedClass, scheme: s.interpretation });
      soilBySy.set(s.siteYearId, m);
    }
    const out = rows;
    for (const sy of chunk) {
      const plotList = plotsBySy.get(sy.id);
      const meanList = meansBySy.get(sy.id);
      let outcome: SiteYearOutcome;
      const fromPlotsFile = fileOutcomes?.get(sy.id);
      if (fromPlotsFile) outcome = fromPlotsFile;
      else if (plotList?.length) outcome = responsesFromPlots(plotList, isCheck);
      else if (meanList?.length)
        outcome = responsesFromSummaries(
          meanList.map((m) => ({ treatmentId: m.treatmentId, mean: m.meanKgHa, replicates: m.replicates, mse: m.mse, dfError: m.dfError })),
          isCheck,
        );
      else outcome = { ok: false, reason: "no plots or summary means yet" };
      if (!outcome.ok) {
        uncomputed.push({ siteYear: sy.code, reason: outcome.reason });
        continue;
      }
      const soil = soilBySy.get(sy.id);
      const p = soil?.get("P"),
        k = soil?.get("K"),
        s = soil?.get("S");
      // Yield first, then every other measure the site-year's plots record (a measure that cannot be computed for
      // a site-year has no responses there; only yield's reasons are reported).
      const measured: { measure: string; rows: typeof outcome.rows }[] = [{ measure: "yield", rows: outcome.rows }];
      for (const [measure, list] of otherBySy.get(sy.id) ?? []) {
        const other = responsesFromPlots(list, isCheck);
        if (other.ok) measured.push({ measure, rows: other.rows });
      }
      for (const { measure, rows: measureResponses } of measured)
        for (const r of measureResponses) {
          const t = trtById.get(r.treatmentId)!;
          out.push({
            versionId,
            measure,
            siteYearId: sy.id,
            treatmentId: r.treatmentId,
            checkTreatmentId: r.checkTreatmentId,
            siteCode: sy.siteCode,
            siteYearCode: sy.code,
            treatmentCode: t.code,
            crop: sy.crop,
            year: sy.year,
            tillage: sy.tillage,
            rowSpacingIn: sy.rowSpacingIn,
            plantingDate: sy.plantingDate,
            nutrients: pgArray(t.nutrients),
            placements: pgArray(t.placements),
            nLbAc: t.nLbAc,
            p2o5LbAc: t.p2o5LbAc,
            k2oLbAc: t.k2oLbAc,
            sLbAc: t.sLbAc,
            soilPClass: p?.cls ?? null,
            soilPValue: p?.value ?? null,
            soilKClass: k?.cls ?? null,
            soilKValue: k?.value ?? null,
            soilSClass: s?.cls ?? null,
            soilSValue: s?.value ?? null,
            checkMeanKgHa: r.checkMean,
            treatedMeanKgHa: r.treatedMean,
            mdKgHa: r.md,
            seKgHa: r.se,
            dfError: r.dfError,
            lnrr: r.lnrr,
            lnrrVar: r.lnrrVar,
            pValue: r.pValue,
            lsd05KgHa: r.lsd05,
            cvPct: r.cvPct,
            replicates: r.replicates,
            balanced: r.balanced,
            fromSummary: r.fromSummary,
            testedNutrientsStated: t.testedNutrientsStated ? pgArray(t.testedNutrientsStated) : null,
            soilPReportedClass: p?.reported ?? null,
            soilPScheme: p?.scheme ?? null,
            soilKReportedClass: k?.reported ?? null,
            soilKScheme: k?.scheme ?? null,
            soilSReportedClass: s?.reported ?? null,
            soilSScheme: s?.scheme ?? null,
          });
        }
    }
  }
  return { siteYearIds, rows, uncomputed };
}

/** The plots columns of the built-in measures other than yield, by measure name. */
const otherBuiltIns = {
  stand: plots.standCount,
  vigour: plots.vigour,
  "test-weight": plots.testWeight,
  moisture: plots.harvestMoisturePct,
} as const satisfies Partial<Record<keyof typeof builtInMeasureDefinitions, unknown>>;

/** The plots of a chunk of site-years that record any measure besides yield. */
function readOtherMeasures(tx: Tx, siteYearIds: number[], withAdded: boolean) {
  const recorded = [...Object.values(otherBuiltIns).map((c) => isNotNull(c)), ...(withAdded ? [isNotNull(plots.otherMeasures)] : [])];
  return tx
    .select({
      siteYearId: plots.siteYearId,
      treatmentId: plots.treatmentId,
      block: plots.block,
      ...otherBuiltIns,
      otherMeasures: plots.otherMeasures,
    })
    .from(plots)
    .where(and(inArray(plots.siteYearId, siteYearIds), or(...recorded)));
}

type MeasurePlot = { treatmentId: number; block: number; y: number };

/** Site-year → measure → its plots with a value, for every measure but yield. */
function otherMeasurePlots(rows: Awaited<ReturnType<typeof readOtherMeasures>>, added: string[]): Map<number, Map<string, MeasurePlot[]>> {
  const out = new Map<number, Map<string, MeasurePlot[]>>();
  const push = (siteYearId: number, measure: string, plot: MeasurePlot) => {
    let bySy = out.get(siteYearId);
    if (!bySy) out.set(siteYearId, (bySy = new Map()));
    let list = bySy.get(measure);
    if (!list) bySy.set(measure, (list = []));
    list.push(plot);
  };
  for (const row of rows) {
    for (const measure of Object.keys(otherBuiltIns) as (keyof typeof otherBuiltIns)[]) {
      const y = row[measure];
      if (y !== null && Number.isFinite(y)) push(row.siteYearId, measure, { treatmentId: row.treatmentId, block: row.block, y });
    }
    for (const measure of added) {
      const y = row.otherMeasures?.[measure];
      if (typeof y === "number" && Number.isFinite(y)) push(row.siteYearId, measure, { treatmentId: row.treatmentId, block: row.block, y });
    }
  }
  return out;
}

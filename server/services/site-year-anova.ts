import { and, eq, inArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { plots, sites, siteYears, summaryMeans, treatments } from "@/db/schema";
import type { AnovaMeasure, SiteYearAnova, SiteYearAnovaQuery } from "@/schemas/site-year-anova";
import { notFound } from "@/server/errors";
import { yieldConverter } from "@/server/services/public/row-resource";
import { pairwiseLeastSignificantDifferences, rcbdAnova, tQuantile, type AnovaTableRow } from "@/stats";

/**
 * Where each analysable measure lives on a plot, its title and its unit. The one place that ties a measure name to a
 * column: point it at the shared measure vocabulary when there is one. Yield is stored in kg/ha and converted to the
 * unit asked for; the others keep the unit of their column in the data dictionary.
 */
function anovaMeasureColumn(measure: AnovaMeasure) {
  switch (measure) {
    case "yield":
      return { column: plots.yieldKgHa, title: "Yield", unit: null, convertsYield: true };
    case "stand_count":
      return { column: plots.standCount, title: "Stand count", unit: "plants/ac", convertsYield: false };
    case "vigour":
      return { column: plots.vigour, title: "Early vigour", unit: "score 1–9", convertsYield: false };
    case "test_weight":
      return { column: plots.testWeight, title: "Test weight", unit: "lb/bu", convertsYield: false };
    case "harvest_moisture":
      return { column: plots.harvestMoisturePct, title: "Harvest moisture", unit: "%", convertsYield: false };
  }
}

/** The version a site-year is read from, as the route resolved it (published, or a draft its reader may see). */
export interface AnovaVersion {
  versionId: string;
  datasetSlug: string;
  semver: string;
  state: string;
}

type Treatment = { code: string; name: string; isCheck: boolean };

const row = (r: AnovaTableRow) => ({
  df: r.df,
  sumOfSquares: r.sumOfSquares,
  meanSquare: r.meanSquare,
  fStatistic: r.fStatistic,
  pValue: r.pValue,
});

/**
 * The ANOVA of one site-year of a version, on one plot measure: the RCBD fit of its plots (least squares when plots
 * are missing, with an LSD per pair), or what its published means tell when it has no plots. 404 for an unknown code.
 */
export async function siteYearAnova(db: Db, version: AnovaVersion, code: string, query: SiteYearAnovaQuery): Promise<SiteYearAnova> {
  const [sy] = await db
    .select({ siteYear: siteYears, siteCode: sites.code })
    .from(siteYears)
    .innerJoin(sites, eq(sites.id, siteYears.siteId))
    .where(and(eq(siteYears.versionId, version.versionId), eq(siteYears.code, code)));
  if (!sy) throw notFound(`Version ${version.semver} of "${version.datasetSlug}" has no site-year "${code}".`);
  const { siteYear } = sy;
  const measure = anovaMeasureColumn(query.measure);
  const converter = measure.convertsYield
    ? yieldConverter(siteYear.crop, query.units)
    : { unit: measure.unit!, convert: (v: number) => v, scale: 1 };
  const [plotRows, summaryRows] = await Promise.all([
    db
      .select({ plot: plots.plot, block: plots.block, treatmentId: plots.treatmentId, value: measure.column })
      .from(plots)
      .where(eq(plots.siteYearId, siteYear.id))
      .orderBy(plots.id),
    db.select().from(summaryMeans).where(eq(summaryMeans.siteYearId, siteYear.id)).orderBy(summaryMeans.id),
  ]);
  const treatmentIds = [...new Set([...plotRows.map((p) => p.treatmentId), ...summaryRows.map((s) => s.treatmentId)])];
  const treatmentRows = treatmentIds.length
    ? await db
        .select({ id: treatments.id, code: treatments.code, name: treatments.name, isCheck: treatments.isCheck })
        .from(treatments)
        .where(inArray(treatments.id, treatmentIds))
    : [];
  const treatmentById = new Map<number, Treatment>(treatmentRows.map((t) => [t.id, t]));
  const byCode = new Map<string, Treatment>(treatmentRows.map((t) => [t.code, t]));

  const base = {
    dataset: version.datasetSlug,
    version: version.semver,
    versionState: version.state,
    siteYear: {
      code: siteYear.code,
      siteCode: sy.siteCode,
      crop: siteYear.crop,
      year: siteYear.year,
      design: siteYear.design,
      blocks: siteYear.blocks,
    },
    measure: { name: query.measure, title: measure.title, unit: converter.unit },
  };
  if (plotRows.length > 0)
    return { ...base, ...fromPlots(plotRows, siteYear.blocks, treatmentById, byCode, converter.convert, measure.title) };
  if (summaryRows.length > 0) {
    if (query.measure !== "yield")
      return {
        ...base,
        ...uncomputed(
          "summary",
          `The site-year is published as yield means only (no plots), so there is no ${measure.title.toLowerCase()} to analyse.`,
        ),
      };
    return { ...base, ...fromSummaries(summaryRows, treatmentById, converter) };
  }
  return { ...base, ...uncomputed("none", "The site-year has neither plots nor published means.") };
}

type Body = Omit<SiteYearAnova, "dataset" | "version" | "versionState" | "siteYear" | "measure">;

/** An answer that says why there is no table, and nothing else. */
const uncomputed = (source: Body["source"], reason: string): Body => ({
  source,
  computed: false,
  reason,
  balanced: null,
  plots: 0,
  missingPlots: [],
  table: null,
  mse: null,
  dfError: null,
  grandMean: null,
  cvPercent: null,
  lsd: { alpha: 0.05, single: null, pairs: [] },
  means: [],
  notes: [],
});

function fromPlots(
  plotRows: { plot: string; block: number; treatmentId: number; value: number | null }[],
  declaredBlocks: number,
  treatmentById: Map<number, Treatment>,
  byCode: Map<string, Treatment>,
  convert: (v: number) => number,
  title: string,
): Body {
  const codeOf = (id: number) => treatmentById.get(id)?.code ?? String(id);
  const observed = plotRows.filter((p): p is typeof p & { value: number } => p.value !== null);
  // Every treatment × block cell of the layout without a value: the row is there with no value (a lost plot), or absent.
  const codes = [...new Set(plotRows.map((p) => codeOf(p.treatmentId)))];
  const blockCount = Math.max(declaredBlocks, ...plotRows.map((p) => p.block));
  const seen = new Set(observed.map((p) => `${codeOf(p.treatmentId)}\u0000${p.block}`));
  const missingPlots: Body["missingPlots"] = [];
  for (let block = 1; block <= blockCount; block++) {
    for (const code of codes) {
      if (seen.has(`${code}\u0000${block}`)) continue;
      const empty = plotRows.find((p) => p.block === block && codeOf(p.treatmentId) === code);
      missingPlots.push({ block, treatment: code, plot: empty?.plot ?? null });
    }
  }
  missingPlots.sort((a, b) => a.block - b.block || a.treatment.localeCompare(b.treatment, "en", { numeric: true }));
  const refused = (reason: string): Body => ({ ...uncomputed("plots", reason), plots: observed.length, missingPlots });
  if (observed.length === 0) return refused(`No plot of the site-year has a value of ${title.toLowerCase()}.`);
  let anova;
  try {
    anova = rcbdAnova(observed.map((p) => ({ block: String(p.block), treatment: codeOf(p.treatmentId), y: convert(p.value) })));
  } catch (error) {
    return refused(`The ANOVA cannot be computed: ${(error as Error).message.replace(/^rcbdAnova: /, "")}.`);
  }
  const treatmentOf = (code: string): Treatment => byCode.get(code) ?? { code, name: code, isCheck: false };
  const pairs = pairwiseLeastSignificantDifferences(anova) ?? [];
  const balanced = anova.balanced && missingPlots.length === 0;
  const notes = [...anova.notes];
  if (anova.balanced && missingPlots.length > 0)
    notes.push(
      `${missingPlots.length} treatment-block cell(s) have no value, but every treatment analysed is complete in every block analysed.`,
    );
  return {
    source: "plots",
    computed: true,
    reason: null,
    balanced,
    plots: observed.length,
    missingPlots,
    table: {
      block: row(anova.block),
      treatment: row(anova.treatment),
      residual: anova.error,
      total: anova.total,
    },
    mse: anova.mse,
    dfError: anova.error.df,
    grandMean: anova.grandMean,
    cvPercent: anova.cvPercent,
    lsd: { alpha: 0.05, single: anova.meanSeparation?.lsd.alpha05 ?? null, pairs },
    means: anova.treatmentMeans.map((m) => {
      const t = treatmentOf(m.treatment);
      return {
        code: t.code,
        name: t.name,
        isCheck: t.isCheck,
        observations: m.plots,
        mean: m.mean,
        lsMean: Number.isFinite(m.adjustedMean) ? m.adjustedMean : null,
        standardError: m.standardError,
      };
    }),
    notes,
  };
}

/** Published means with r, the MSE and its df: the means, their SEs and the LSDs they imply; no table. */
function fromSummaries(
  rows: (typeof summaryMeans.$inferSelect)[],
  treatmentById: Map<number, Treatment>,
  { convert, scale }: { convert: (v: number) => number; scale: number },
): Body {
  // The MSE is in the square of the unit: it scales by the unrounded factor (the means are rounded as reported values).
  const factor = scale;
  const treatmentOf = (id: number): Treatment => treatmentById.get(id) ?? { code: String(id), name: String(id), isCheck: false };
  const check = rows.find((r) => treatmentOf(r.treatmentId).isCheck) ?? rows[0]!;
  const mse = check.mse * factor * factor;
  const dfError = check.dfError;
  const totalR = rows.reduce((a, r) => a + r.replicates, 0);
  const grandMean = rows.reduce((a, r) => a + convert(r.meanKgHa) * r.replicates, 0) / totalR;
  const balanced = rows.every((r) => r.replicates === rows[0]!.replicates);
  const t = tQuantile(0.975, dfError);
  const sorted = [...rows].sort((a, b) =>
    treatmentOf(a.treatmentId).code.localeCompare(treatmentOf(b.treatmentId).code, "en", { numeric: true }),
  );
  const pairs = sorted.flatMap((a, i) =>
    sorted.slice(i + 1).map((b) => {
      const standardError = Math.sqrt(mse / a.replicates + mse / b.replicates);
      const difference = convert(b.meanKgHa) - convert(a.meanKgHa);
      return {
        a: treatmentOf(a.treatmentId).code,
        b: treatmentOf(b.treatmentId).code,
        difference,
        standardError,
        lsd: t * standardError,
        differs: Math.abs(difference) > t * standardError,
      };
    }),
  );
  const notes = ["The LSDs and SEs follow from the published MSE, its df and each mean's replicates."];
  if (rows.some((r) => r.mse !== check.mse || r.dfError !== check.dfError))
    notes.push("The treatments' rows give different MSEs or error df; the check's are used.");
  return {
    source: "summary",
    computed: false,
    reason: "The site-year is published as treatment means only (no plots): its ANOVA table cannot be computed here.",
    balanced: null,
    plots: 0,
    missingPlots: [],
    table: null,
    mse,
    dfError,
    grandMean,
    cvPercent: grandMean > 0 ? (100 * Math.sqrt(mse)) / grandMean : null,
    lsd: { alpha: 0.05, single: balanced ? t * Math.sqrt((2 * mse) / rows[0]!.replicates) : null, pairs },
    means: sorted.map((r) => {
      const tr = treatmentOf(r.treatmentId);
      return {
        code: tr.code,
        name: tr.name,
        isCheck: tr.isCheck,
        observations: r.replicates,
        mean: convert(r.meanKgHa),
        lsMean: null,
        standardError: Math.sqrt(mse / r.replicates),
      };
    }),
    notes,
  };
}

/** The published site-years called `code` among the versions read across datasets (one per dataset at most). */
export async function siteYearVersionsWithCode(db: Db, versionIds: string[], code: string): Promise<string[]> {
  if (versionIds.length === 0) return [];
  const rows = await db
    .select({ versionId: siteYears.versionId })
    .from(siteYears)
    .where(and(inArray(siteYears.versionId, versionIds), eq(siteYears.code, code)));
  return rows.map((r) => r.versionId);
}

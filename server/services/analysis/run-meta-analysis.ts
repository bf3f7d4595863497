import type { Db } from "@/db/client";
import {
  defaultForestLimit,
  observedResponsesLimit,
  type ForestExtent,
  type Grouping,
  type MetaAnalysisResponse,
  type MetaQuery,
  type PredictiveDistributionShape,
} from "@/schemas/analysis";
import { filtersToQuery, trialFilterShape, type TrialFilters } from "@/schemas/filters";
import {
  breakEvenResponse,
  commonTauSquaredSubgroups,
  empiricalShares,
  kilogramsPerHectarePerBushelPerAcre,
  metaAnalysis,
  normalQuantile,
  predictiveProbabilityAbove,
  probabilityNewResponseAbove,
  roundConverted,
  shareSignificant,
  cropStandards,
  tQuantile,
  type StandardCrop,
} from "@/stats";
import { nutrientRuleInForce } from "@/server/services/tested-nutrients";
import type { MeasureDefinition } from "@/constants/measures";
import { groupLevel, orderLevels, relevantSoilTest } from "./grouping";
import {
  byForestOrder,
  loadContrasts,
  withLabels,
  type Contrast,
  type EstimationContrast,
  type ResolvedVersion,
  type VersionResolver,
} from "./load-contrasts";
import { buildUnits, ownTest, type AnalysisUnit } from "./site-year-effects";
import { evaluateCautions } from "@/server/services/cautions";
import { includedTreatments } from "./included-treatments";
import { describeBetweenGroupTest, combinationNote, describeHeterogeneity, sampleSizeNotes } from "./wording";
import { intervalOut, moderatorBlock, readSoilScales, separateBlock, subgroupInputOf, type SoilScales } from "./moderator-regression";

type Result = MetaAnalysisResponse;

function splitQuery(query: MetaQuery): { filters: TrialFilters; options: Omit<MetaQuery, keyof TrialFilters> } {
  const filters: Record<string, unknown> = {};
  const options: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(query)) (key in trialFilterShape ? filters : options)[key] = value;
  return { filters: filters as TrialFilters, options: options as Omit<MetaQuery, keyof TrialFilters> };
}

/**
 * The live random-effects meta-analysis of yield response behind the Evidence screen and /api/v1/analyses/meta:
 * filtered responses → one effect per site-year → pooled estimate, heterogeneity, subgroups, decision numbers, with
 * the provenance needed to re-derive every number.
 */
export async function runMetaAnalysis(db: Db, query: MetaQuery, resolve?: VersionResolver): Promise<Result> {
  const { filters, options } = splitQuery(query);
  const { versions, rows, where, measure } = await loadContrasts(db, filters, {
    groupBy: options.groupBy ?? null,
    moderator: options.moderator ?? null,
    measure: options.measure,
    resolve,
  });
  const [result, included] = await Promise.all([
    analyseContrasts(
      rows,
      versions,
      filters,
      options,
      measure,
      (named) => withLabels(db, where, named),
      () =>
        readSoilScales(
          db,
          versions.map((v) => v.versionId),
        ),
    ),
    includedTreatments(db, where, versions),
  ]);
  return { ...result, cautions: evaluateCautions(included) };
}

/** Reads the labels (codes, year, soil tests) of the responses an answer names. */
type LabelReader = (rows: EstimationContrast[]) => Promise<Map<number, Contrast>>;

async function analyseContrasts(
  rows: EstimationContrast[],
  versions: ResolvedVersion[],
  filters: TrialFilters,
  options: Omit<MetaQuery, keyof TrialFilters>,
  measure: MeasureDefinition,
  labelsOf: LabelReader,
  soilScales: () => Promise<SoilScales>,
): Promise<Result> {
  const { effect, method, ci } = options;
  const isYield = measure.name === "yield";
  // Only yield converts (bu/ac ↔ kg/ha); every other measure is pooled in its own unit.
  const units = isYield ? options.units : null;
  const measureUnit = units ?? measure.unit;
  const groupBy = options.groupBy ?? null;
  const unitLabel = effect === "lnrr" ? "ln(treated/check)" : measureUnit;
  const versionOf = new Map(versions.map((v) => [v.versionId, v]));
  const slugOf = (row: EstimationContrast) => versionOf.get(row.versionId)?.datasetSlug ?? "";

  const overall = buildUnits(rows, { effect, units });
  const grouped = groupBy ? buildUnits(rows, { effect, units, levelOf: (r) => groupLevel(r, groupBy, filters, slugOf(r)) }) : null;
  const k = overall.units.length;
  const notes = [...sampleSizeNotes(k)];
  const crops = [...new Set(overall.units.map((u) => u.contrasts[0]!.crop))];
  if (isYield && effect === "md" && units === "bu/ac" && crops.length > 1) {
    notes.push(`Several crops (${crops.join(", ")}): each response is converted to bu/ac with its own crop's bushel weight, then pooled.`);
  }
  const combinedSiteYears = overall.units.filter((u) => u.contrasts.length > 1).length;
  if (combinedSiteYears > 0)
    notes.push(
      `${combinedSiteYears} site-year(s) had several matching treatments; each was combined into one response (shared-check covariance).`,
    );

  const fit =
    k > 0
      ? metaAnalysis({
          yi: overall.units.map((u) => u.yi),
          vi: overall.units.map((u) => u.vi),
          method,
          ci,
          heterogeneityInterval: options.include?.includes("heterogeneityIntervals") ?? false,
        })
      : null;
  if (fit) for (const n of fit.notes) if (!notes.includes(n) && !/^(Only|Two site-years)/.test(n)) notes.push(n);

  const decision = decisionBlock(overall.units, fit, options, crops, isYield);
  const subgroups = grouped && groupBy ? subgroupBlock(grouped.units, groupBy, options, decision) : null;
  const forestUnits = grouped ?? overall;
  const forestTau2 = (grouped ? subgroups?.tau2 : fit?.tau2) ?? 0;
  const weights = forestUnits === overall ? (fit?.weightsPercent ?? []) : withinGroupWeights(grouped!.units, forestTau2);
  const limit = options.forestLimit ?? (options.format === "csv" ? "all" : defaultForestLimit);
  const shown = forestSelection(forestUnits.units, forestTau2, limit);
  // Only now are labels read, for the rows the answer names.
  const labelled = await labelsOf([...shown.flatMap((i) => forestUnits.units[i]!.contrasts), ...overall.excluded.map((e) => e.contrast)]);
  const labelOf = (c: EstimationContrast) => labelled.get(c.id)!;
  // The headline mean's weight of each site-year, shown beside the within-group weight of a grouped row.
  const pooledWeightOf = new Map(overall.units.map((u, i) => [u.siteYearId, fit?.weightsPercent[i] ?? null]));
  // Grouped rows come level by level (in the levels' agronomic order), so each group reads as one block.
  const levelRank = new Map((subgroups?.levels ?? []).map((l, i) => [l.level, i]));
  const rankOf = (unit: AnalysisUnit) => levelRank.get(unit.group ?? "") ?? levelRank.size;
  const forestRows = shown
    .map((i) => ({
      unit: forestUnits.units[i]!,
      weight: weights[i] ?? 0,
      contrasts: forestUnits.units[i]!.contrasts.map(labelOf).sort(byForestOrder),
    }))
    .sort((a, b) => rankOf(a.unit) - rankOf(b.unit) || byForestOrder(a.contrasts[0]!, b.contrasts[0]!))
    .map(({ unit, weight, contrasts }) =>
      forestRow(unit, contrasts, weight, pooledWeightOf.get(unit.siteYearId) ?? null, filters, versionOf),
    );
  const forest = forestExtent(forestUnits.units.length, forestRows.length, limit, grouped !== null);
  if (forest.note) notes.push(forest.note);

  const pooled = fit
    ? {
        estimate: fit.estimate,
        se: fit.se,
        ciLower: fit.ciLower,
        ciUpper: fit.ciUpper,
        pValue: fit.pValue,
        distribution: fit.distribution,
        df: fit.df,
        ciMethod: fit.ci,
        predictionInterval: fit.predictionInterval.tKMinus2
          ? {
              lower: fit.predictionInterval.tKMinus2.lower,
              upper: fit.predictionInterval.tKMinus2.upper,
              df: fit.predictionInterval.tKMinus2.df ?? k - 2,
            }
          : null,
      }
    : null;
  const heterogeneity =
    fit && k >= 2
      ? {
          q: fit.q.statistic,
          df: fit.q.df,
          pValue: fit.q.pValue,
          i2Percent: fit.i2Percent,
          h2: fit.h2,
          tau2: fit.tau2,
          tau: fit.tau,
          plainWords: describeHeterogeneity({ i2Percent: fit.i2Percent, tau: fit.tau, k, units: unitLabel, qPValue: fit.q.pValue }),
          ...(options.include?.includes("heterogeneityIntervals")
            ? { interval: fit.heterogeneityInterval ? intervalOut(fit.heterogeneityInterval) : null }
            : {}),
        }
      : null;
  const moderatorRegression = options.moderator
    ? await moderatorBlock({
        units: overall.units,
        moderator: options.moderator,
        filters,
        options,
        unitLabel,
        breakEven: decision.breakEven,
        slugOf,
        versionOf,
        soilScales,
        pooledTau2: fit?.tau2 ?? null,
        labelsOf,
      })
    : undefined;

  return {
    k,
    measure: {
      name: measure.name,
      title: measure.title,
      unit: measureUnit,
      better: measure.better,
      rating: measure.rating,
      scale: measure.scale ?? null,
    },
    effect,
    units: unitLabel,
    rows: forestRows,
    forest,
    pooled,
    heterogeneity,
    subgroups,
    decision,
    provenance: {
      versions: versions.map((v) => ({
        dataset: v.datasetSlug,
        title: v.datasetTitle,
        version: v.semver,
        licence: v.licence,
        siteYearsUsed: overall.units.filter((u) => u.contrasts[0]!.versionId === v.versionId).length,
      })),
      filters: filtersToQuery(filters),
      nutrientRule: nutrientRuleInForce(filters),
      effect,
      method,
      ci,
      units: unitLabel,
      groupBy,
      k,
      datasets: new Set(overall.units.map((u) => u.contrasts[0]!.versionId)).size,
      contrastsRead: rows.length,
      combinedSiteYears,
      excluded: excludedSiteYears(
        overall.excluded.map((e) => ({ contrast: labelOf(e.contrast), reason: e.reason })),
        versionOf,
      ),
      combination: combinationNote,
    },
    notes,
    // The standing cautions; runMetaAnalysis evaluates the rules against the included treatments.
    cautions: evaluateCautions([]),
    ...(moderatorRegression ? { moderatorRegression } : {}),
  };
}

function forestRow(
  unit: AnalysisUnit,
  contrasts: Contrast[],
  weightPercent: number,
  pooledWeightPercent: number | null,
  filters: TrialFilters,
  versionOf: Map<string, ResolvedVersion>,
) {
  const first = contrasts[0]!;
  const version = versionOf.get(first.versionId);
  const soil = relevantSoilTest(first, filters);
  const test = ownTest(unit);
  return {
    id: unit.key,
    siteYearCode: first.siteYearCode,
    siteCode: first.siteCode,
    dataset: version?.datasetSlug ?? "",
    version: version?.semver ?? "",
    year: first.year,
    crop: first.crop,
    treatments: contrasts.map((c) => c.treatmentCode),
    treatmentLabels: contrasts.map((c) => c.treatmentLabel),
    responseIds: contrasts.map((c) => c.id),
    group: unit.group,
    estimate: unit.yi,
    se: test.se,
    ciLower: test.ciLower,
    ciUpper: test.ciUpper,
    df: unit.df,
    pValue: test.pValue,
    significant: test.significant,
    weightPercent,
    pooledWeightPercent,
    soilTestAnalyte: soil.analyte,
    soilTestClass: soil.class,
    soilTestValue: soil.value,
    soilTestReportedClass: soil.reportedClass,
    soilTestScheme: soil.scheme,
    // The check's mean as a converted data value (stats/precision.ts); the moderator fit reads the unrounded one.
    checkMean: roundConverted(unit.checkMean),
  };
}

/**
 * Which forest rows a bounded answer keeps: the most precise units (largest 1/(vᵢ + τ²), so the largest weights); the
 * caller puts them in forest order once their labels are read. Only the rows are bounded; every estimate is computed
 * from all units before this.
 */
function forestSelection(units: AnalysisUnit[], tau2: number, limit: number | "all"): number[] {
  const order = units.map((_, i) => i);
  if (limit === "all" || units.length <= limit) return order;
  // Ascending vᵢ is descending 1/(vᵢ + τ²) for one τ²; ties keep the row read first (response id order).
  order.sort((a, b) => units[a]!.vi - units[b]!.vi || a - b);
  return order.slice(0, limit).sort((a, b) => a - b);
}

function forestExtent(total: number, returned: number, limit: number | "all", grouped: boolean): ForestExtent {
  const truncated = returned < total;
  const what = grouped ? "site-year × level rows" : "site-years";
  return {
    total,
    returned,
    limit: limit === "all" ? null : limit,
    truncated,
    note: truncated
      ? `The forest lists the ${returned} most precise of ${total} ${what} (largest weight); every estimate uses all ${total}. forestLimit=all or format=csv gives every row.`
      : null,
  };
}

function withinGroupWeights(units: AnalysisUnit[], tau2: number): number[] {
  const totals = new Map<string, number>();
  for (const u of units) totals.set(u.group ?? "", (totals.get(u.group ?? "") ?? 0) + 1 / (u.vi + tau2));
  return units.map((u) => (100 * (1 / (u.vi + tau2))) / (totals.get(u.group ?? "") ?? 1));
}

/** Ascending observed responses for the share above any break-even, unless there are too many to send. */
function observedList(ys: number[]): number[] | null {
  return ys.length <= observedResponsesLimit ? [...ys].sort((x, y) => x - y) : null;
}

/** A predictive distribution with its 95 % points; null when it has no spread. */
function predictiveOf(estimate: number, se: number, tau2: number, df: number | null): PredictiveDistributionShape | null {
  const spread = Math.sqrt(tau2 + se * se);
  if (!(spread > 0)) return null;
  const critical = df === null ? normalQuantile(0.975) : tQuantile(0.975, df);
  return { estimate, se, tau2, df, lower: estimate - critical * spread, upper: estimate + critical * spread };
}

/** Per level: the chances on a new site-year of that level and the observed shares, at the answer's break-even. */
function levelDecision(units: AnalysisUnit[], level: string, predictive: PredictiveDistributionShape | null, breakEven: number | null) {
  const ys = units.filter((u) => u.group === level).map((u) => u.yi);
  const shares = ys.length ? empiricalShares(ys, breakEven ?? Number.POSITIVE_INFINITY) : null;
  return {
    predictive,
    probabilityAboveZero: predictive ? predictiveProbabilityAbove(predictive, 0) : null,
    probabilityAboveBreakEven: predictive && breakEven !== null ? predictiveProbabilityAbove(predictive, breakEven) : null,
    shareAboveZero: shares?.aboveZero ?? null,
    shareAboveBreakEven: breakEven !== null ? (shares?.aboveBreakEven ?? null) : null,
    observedResponses: observedList(ys),
  };
}

/**
 * Subgroups as one model in which each level has its own mean and all levels share one residual τ²; the between-group
 * test is what R's metafor gives for `rma(yi, vi, mods = ~ group)`, the per-level estimates `mods = ~ 0 + group`. Each
 * level's predictive distribution is what `predict()` gives on that model: its estimate and SE with the common τ²,
 * t(k − p) under HKSJ and normal under Wald.
 */
function subgroupBlock(
  units: AnalysisUnit[],
  by: Grouping,
  options: Pick<MetaQuery, "method" | "ci" | "include" | "subgroupTau2">,
  decision: Result["decision"],
): Result["subgroups"] {
  const block = subgroupFits(units, by, options, decision);
  if (options.subgroupTau2 !== "separate" || !block) return block;
  return {
    ...block,
    separate: separateBlock(
      units,
      block.levels.map((l) => l.level),
      options,
      describeBetweenGroupTest,
    ),
  };
}

function subgroupFits(
  units: AnalysisUnit[],
  by: Grouping,
  options: Pick<MetaQuery, "method" | "ci">,
  decision: Result["decision"],
): Result["subgroups"] {
  const levels = orderLevels(
    by,
    units.map((u) => u.group ?? ""),
  );
  const model = `One model for all groups: each ${by} level has its own mean, and the levels share one between-site-year variance τ² (${options.method}, ${options.ci === "hksj" ? "HKSJ F/t tests" : "Wald χ²/z tests"}).`;
  const notes: string[] = [];
  const count = (level: string) => units.filter((u) => u.group === level).length;
  for (const level of levels) if (count(level) < 5) notes.push(`${level}: only ${count(level)} site-year(s); its estimate is imprecise.`);
  if (units.length === 0) return { by, model, levels: [], betweenGroupTest: null, qm: null, tau2: null, notes };
  if (levels.length < 2) {
    const only = metaAnalysis({
      yi: units.map((u) => u.yi),
      vi: units.map((u) => u.vi),
      method: options.method,
      ci: options.ci,
      heterogeneityInterval: false,
    });
    notes.push("Only one level matches: there is nothing to compare between groups.");
    // One level is the pooled question: its predictive distribution is the pooled t(k − 2) one.
    const predictive =
      options.method === "FE" || units.length < 3 ? null : predictiveOf(only.estimate, only.se, only.tau2, units.length - 2);
    return {
      by,
      model,
      levels: [
        {
          level: levels[0]!,
          k: units.length,
          estimate: only.estimate,
          se: only.se,
          ciLower: only.ciLower,
          ciUpper: only.ciUpper,
          pValue: only.pValue,
          ...levelDecision(units, levels[0]!, predictive, decision.breakEven),
        },
      ],
      betweenGroupTest: null,
      qm: null,
      tau2: only.tau2,
      notes,
    };
  }
  const fit = commonTauSquaredSubgroups({
    ...subgroupInputOf(units, levels, options),
    // The answer reports no R², and the overall fit is made once elsewhere.
    r2: false,
  });
  notes.push(...fit.differences.notes.filter((n) => !notes.includes(n)));
  const differ = fit.differences.qm;
  const test = differ
    ? {
        statistic: differ.statistic,
        df: Array.isArray(differ.df) ? differ.df[0] : differ.df,
        df2: Array.isArray(differ.df) ? differ.df[1] : null,
        distribution: differ.distribution,
        pValue: differ.pValue,
      }
    : null;
  const df = fit.perLevel.ci === "hksj" ? fit.perLevel.residualDf : null;
  return {
    by,
    model,
    levels: fit.perLevel.coefficients.map((c) => ({
      level: c.name,
      k: count(c.name),
      estimate: c.estimate,
      se: c.se,
      ciLower: c.ciLower,
      ciUpper: c.ciUpper,
      pValue: c.pValue,
      ...levelDecision(
        units,
        c.name,
        options.method === "FE" ? null : predictiveOf(c.estimate, c.se, fit.perLevel.tau2, df),
        decision.breakEven,
      ),
    })),
    betweenGroupTest: test ? { ...test, text: describeBetweenGroupTest(test) } : null,
    qm: test,
    tau2: fit.differences.tau2,
    notes,
  };
}

/** Response units per bu/ac of a break-even, or why there is none. */
function breakEvenScale(
  options: Omit<MetaQuery, keyof TrialFilters>,
  crops: string[],
  isYield: boolean,
): { unitsPerBushel: number | null; note: string | null } {
  if (!isYield)
    return {
      unitsPerBushel: null,
      note: "A break-even and the chance it pays apply to yield only: ask for measure=yield to compare with the cost.",
    };
  if (options.effect === "lnrr")
    return { unitsPerBushel: null, note: "A break-even yield needs a yield response: ask for effect=md to compare with the cost." };
  if (options.units === "kg/ha") {
    if (crops.length > 1)
      return { unitsPerBushel: null, note: "Several crops: a price per bushel has no single kg/ha break-even; choose one crop or bu/ac." };
    return {
      unitsPerBushel: crops.length
        ? kilogramsPerHectarePerBushelPerAcre(cropStandards[crops[0] as StandardCrop]?.poundsPerBushel ?? Number.NaN)
        : null,
      note: null,
    };
  }
  return { unitsPerBushel: 1, note: crops.length > 1 ? "Several crops: one price per bushel is applied to all of them." : null };
}

function decisionBlock(
  units: AnalysisUnit[],
  fit: ReturnType<typeof metaAnalysis> | null,
  options: Omit<MetaQuery, keyof TrialFilters>,
  crops: string[],
  isYield: boolean,
): Result["decision"] {
  const notes: string[] = [];
  const price = options.price ?? null;
  const cost =
    options.cost ??
    (options.productCost !== undefined || options.applicationCost !== undefined
      ? (options.productCost ?? 0) + (options.applicationCost ?? 0)
      : null);
  const scale = breakEvenScale(options, crops, isYield);
  let breakEven: number | null = null;
  if (!isYield) notes.push(scale.note!);
  else if (price !== null && cost !== null) {
    if (scale.note) notes.push(scale.note);
    if (scale.unitsPerBushel !== null) breakEven = breakEvenResponse(cost, price) * scale.unitsPerBushel;
  } else {
    notes.push("Give a grain price ($/bu) and the cost ($/ac) for the break-even response and the chance it pays.");
  }
  const k = units.length;
  const ys = units.map((u) => u.yi);
  const predictive = (x: number) =>
    fit ? probabilityNewResponseAbove({ x, estimate: fit.estimate, se: fit.se, tau2: fit.tau2, k }) : null;
  const aboveZero = predictive(0);
  const aboveB = breakEven !== null ? predictive(breakEven) : null;
  for (const n of [aboveZero?.note, aboveB?.note]) if (n && !notes.includes(n)) notes.push(n);
  const shares = k > 0 ? empiricalShares(ys, breakEven ?? Number.POSITIVE_INFINITY) : null;
  const significance = shareSignificant(units.map((u) => ownTest(u).pValue));
  return {
    costPerAcre: cost,
    pricePerBushel: price,
    breakEven,
    probabilityAboveZero: aboveZero?.probability ?? null,
    probabilityAboveBreakEven: aboveB?.probability ?? null,
    shareAboveZero: shares?.aboveZero ?? null,
    shareAboveBreakEven: breakEven !== null ? (shares?.aboveBreakEven ?? null) : null,
    shareSignificant: significance.share,
    significantCount: significance.significant,
    predictive: fit && k >= 3 && aboveZero?.probability !== null ? predictiveOf(fit.estimate, fit.se, fit.tau2, k - 2) : null,
    breakEvenUnitsPerBushel: scale.unitsPerBushel,
    observedResponses: observedList(ys),
    notes,
  };
}

function excludedSiteYears(excluded: { contrast: Contrast; reason: string }[], versionOf: Map<string, ResolvedVersion>) {
  const bySiteYear = new Map<string, { siteYearCode: string; dataset: string; version: string; treatments: string[]; reason: string }>();
  for (const { contrast, reason } of [...excluded].sort((a, b) => byForestOrder(a.contrast, b.contrast))) {
    const key = `${contrast.siteYearId}:${reason}`;
    const entry = bySiteYear.get(key);
    if (entry) entry.treatments.push(contrast.treatmentCode);
    else {
      const v = versionOf.get(contrast.versionId);
      bySiteYear.set(key, {
        siteYearCode: contrast.siteYearCode,
        dataset: v?.datasetSlug ?? "",
        version: v?.semver ?? "",
        treatments: [contrast.treatmentCode],
        reason,
      });
    }
  }
  return [...bySiteYear.values()];
}

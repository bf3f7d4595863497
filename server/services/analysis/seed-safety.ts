import { sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { responses } from "@/db/schema";
import type { SeedSafetyQuery, SeedSafetyResult } from "@/schemas/seed-safety";
import type { TrialFilters } from "@/schemas/filters";
import { metaAnalysis } from "@/stats";
import { evaluateCautions } from "@/server/services/cautions";
import { includedTreatments } from "./included-treatments";
import { byForestOrder, loadContrasts, withLabels, type EstimationContrast } from "./load-contrasts";
import { buildUnits, ownTest } from "./site-year-effects";

type Group = NonNullable<SeedSafetyResult["seedPlaced"]>;

const lossRule =
  "A site-year's own test found a loss when its treatment F test has p < 0.05 and the treatment is below the check by more than " +
  "the site-year's LSD (α = 0.05), Fisher's protected LSD; where the site-year is unbalanced and has no single LSD, when the " +
  "contrast's own 95 % interval lies below zero.";

/** The site-year's own F-test p and LSD of each response (the estimation read leaves them out). */
async function ownTests(db: Db, ids: number[]): Promise<Map<number, { pValue: number | null; lsd05: number | null }>> {
  if (ids.length === 0) return new Map();
  const result = await db.execute(
    sql`SELECT ${responses.id} AS id, ${responses.pValue} AS p, ${responses.lsd05KgHa} AS lsd FROM ${responses} WHERE ${responses.id} IN (${sql.join(
      ids.map((id) => sql`${id}`),
      sql`, `,
    )})`,
  );
  const rows = (result as unknown as { rows: { id: number | string; p: number | string | null; lsd: number | string | null }[] }).rows;
  return new Map(
    rows.map((r) => [Number(r.id), { pValue: r.p === null ? null : Number(r.p), lsd05: r.lsd === null ? null : Number(r.lsd) }]),
  );
}

function lossFound(row: EstimationContrast, own: { pValue: number | null; lsd05: number | null } | undefined): boolean {
  if (!own || own.pValue === null || own.pValue >= 0.05) return false;
  if (own.lsd05 !== null) return row.mdKgHa < -own.lsd05;
  return ownTest({ yi: row.mdKgHa, vi: row.seKgHa ** 2, df: row.dfError }).ciUpper < 0;
}

/** The pooled difference and relative change of one set of contrasts (REML, HKSJ), one effect per site-year. */
function pooledGroup(rows: EstimationContrast[], losses: number): Group | null {
  if (rows.length === 0) return null;
  const md = buildUnits(rows, { effect: "md", units: null }).units;
  if (md.length === 0) return null;
  const fit = metaAnalysis({ yi: md.map((u) => u.yi), vi: md.map((u) => u.vi), method: "REML", ci: "hksj", heterogeneityInterval: false });
  const ln = buildUnits(rows, { effect: "lnrr", units: null }).units;
  const rel =
    ln.length > 0
      ? metaAnalysis({ yi: ln.map((u) => u.yi), vi: ln.map((u) => u.vi), method: "REML", ci: "hksj", heterogeneityInterval: false })
      : null;
  const pct = (x: number) => 100 * (Math.exp(x) - 1);
  return {
    k: md.length,
    tests: rows.length,
    estimate: fit.estimate,
    ciLower: fit.ciLower,
    ciUpper: fit.ciUpper,
    relativePercent: rel ? pct(rel.estimate) : null,
    relativeCiLower: rel ? pct(rel.ciLower) : null,
    relativeCiUpper: rel ? pct(rel.ciUpper) : null,
    lossesFound: losses,
  };
}

const round = (x: number, digits = 0) => {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
};
const signed = (x: number, digits = 0) => `${x > 0 ? "+" : x < 0 ? "−" : ""}${Math.abs(round(x, digits)).toLocaleString("en-US")}`;

/** The answer in words: did seed-placed treatments reduce the measure, by how much, and how often a site-year's test saw it. */
function statementOf(seed: Group | null, other: Group | null, unit: string, title: string, digits: number): string {
  const what = title.toLowerCase();
  if (!seed)
    return `No seed-placed (in-furrow) treatment matches these filters, so there is no evidence here on ${what} injury from seed placement.`;
  const amount = `${signed(seed.estimate, digits)} ${unit} (95 % CI ${signed(seed.ciLower, digits)} to ${signed(seed.ciUpper, digits)})`;
  const relative =
    seed.relativePercent === null
      ? ""
      : `, ${signed(seed.relativePercent, 1)} % of the check (CI ${signed(seed.relativeCiLower!, 1)} to ${signed(seed.relativeCiUpper!, 1)} %)`;
  const verdict =
    seed.ciUpper < 0
      ? `Seed-placed (in-furrow) treatments reduced the ${what}: ${amount}${relative}, over ${seed.k} site-years.`
      : seed.ciLower > 0
        ? `Seed-placed (in-furrow) treatments did not reduce the ${what}; it was higher: ${amount}${relative}, over ${seed.k} site-years.`
        : `Seed-placed (in-furrow) treatments did not clearly change the ${what}: ${amount}${relative}, over ${seed.k} site-years; the interval includes no change.`;
  const tests = `A site-year's own test found a loss in ${seed.lossesFound} of ${seed.tests} seed-placed comparisons.`;
  const away = other
    ? ` Placed away from the seed (2x2 band, broadcast …): ${signed(other.estimate, digits)} ${unit} (CI ${signed(other.ciLower, digits)} to ${signed(other.ciUpper, digits)}) over ${other.k} site-years, with a loss found in ${other.lossesFound} of ${other.tests}.`
    : "";
  return `${verdict} ${tests}${away}`;
}

/**
 * Seed safety of what the filters select: stand (or early growth) of seed-placed treatments against their checks,
 * beside those placed away from the seed, how often each site-year's own test found a loss, the response against
 * the N + K2O placed with the seed, and the caution rules (server/services/cautions.ts) tested on those treatments.
 */
export async function seedSafety(db: Db, query: SeedSafetyQuery): Promise<SeedSafetyResult> {
  const { measure: measureName, ...filters } = query;
  const { versions, rows, where, measure } = await loadContrasts(db, filters as TrialFilters, {
    groupBy: "placement",
    measure: measureName,
  });
  const [labels, included, own] = await Promise.all([
    withLabels(db, where, rows),
    includedTreatments(db, where, versions),
    ownTests(
      db,
      rows.map((r) => r.id),
    ),
  ]);
  const slugOf = new Map(versions.map((v) => [v.versionId, v.datasetSlug]));
  const seedNK = new Map<string, number>();
  for (const t of included)
    seedNK.set(
      `${t.dataset}\u0000${t.treatment}`,
      t.applications.filter((a) => a.placement === "in-furrow").reduce((s, a) => s + a.nLbAc + a.k2oLbAc, 0),
    );
  const isSeedPlaced = (r: EstimationContrast) => (r.placements ?? []).includes("in-furrow");
  const seedRows = rows.filter(isSeedPlaced);
  const otherRows = rows.filter((r) => !isSeedPlaced(r));
  const loss = (r: EstimationContrast) => lossFound(r, own.get(r.id));
  const seed = pooledGroup(seedRows, seedRows.filter(loss).length);
  const other = pooledGroup(otherRows, otherRows.filter(loss).length);

  const points = rows
    .map((r) => labels.get(r.id)!)
    .sort(byForestOrder)
    .map((c) => {
      const dataset = slugOf.get(c.versionId) ?? "";
      return {
        dataset,
        siteYearCode: c.siteYearCode,
        treatmentCode: c.treatmentCode,
        treatmentLabel: c.treatmentLabel,
        seedPlaced: isSeedPlaced(c),
        seedPlacedNK2oLbAc: round(seedNK.get(`${dataset}\u0000${c.treatmentCode}`) ?? 0, 2),
        relativePercent: c.checkMeanKgHa > 0 ? 100 * (c.treatedMeanKgHa / c.checkMeanKgHa - 1) : null,
        md: c.mdKgHa,
        lossFound: loss(c),
      };
    });
  const rates = new Map<number, number[]>();
  for (const p of points.filter((p) => p.seedPlaced)) {
    const list = rates.get(p.seedPlacedNK2oLbAc) ?? [];
    if (p.relativePercent !== null) list.push(p.relativePercent);
    rates.set(p.seedPlacedNK2oLbAc, list);
  }
  const byRate = [...rates.entries()]
    .sort(([a], [b]) => a - b)
    .map(([rate, values]) => ({
      seedPlacedNK2oLbAc: rate,
      tests: points.filter((p) => p.seedPlaced && p.seedPlacedNK2oLbAc === rate).length,
      meanRelativePercent: values.length ? values.reduce((s, v) => s + v, 0) / values.length : null,
    }));
  const notes: string[] = [];
  if (seed && seed.k < 5) notes.push(`Only ${seed.k} site-years with seed-placed treatments: the estimate is imprecise.`);
  if (versions.length === 0) notes.push("No published dataset matches these filters.");
  const digits = measure.rating ? 2 : 0;
  const seedIncluded = included.filter((t) => t.applications.some((a) => a.placement === "in-furrow"));
  return {
    measure: {
      name: measure.name,
      title: measure.title,
      unit: measure.unit,
      better: measure.better,
      rating: measure.rating,
      scale: measure.scale ?? null,
    },
    seedPlaced: seed,
    notSeedPlaced: other,
    statement: statementOf(seed, other, measure.unit, measure.title, digits),
    lossRule,
    points,
    byRate,
    cautions: evaluateCautions(seedIncluded),
    notes,
  };
}

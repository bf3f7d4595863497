import type { Caution, CautionCode } from "@/schemas/analysis";

/**
 * Cautions as data: each rule has a code, its wording and its source, and (unless it is a standing caution) a test of
 * one treatment as it was grown. The meta-analysis evaluates them against the treatments its filters include, and
 * the upload report against a draft's treatments, so the same rules speak in both places.
 */

interface CautionApplication {
  placement: string;
  nLbAc: number;
  k2oLbAc: number;
}

/** One treatment as grown in some site-years: its crop and row spacing (null: not recorded) and its applications. */
export interface CautionTreatment {
  dataset: string;
  treatment: string;
  crop: string;
  rowSpacingIn: number | null;
  applications: CautionApplication[];
}

export interface CautionRule {
  code: CautionCode;
  text: string;
  source: string;
  /** What trips the rule for one treatment, in words, or null. Standing cautions have no test: they always apply. */
  trips?: (t: CautionTreatment) => string | null;
}

const noSource = "common practice, no source";
const lb = (x: number) => `${Math.round(x * 10) / 10} lb/ac`;
const sum = (apps: CautionApplication[], pick: (a: CautionApplication) => number) => apps.reduce((s, a) => s + pick(a), 0);
const inFurrow = (t: CautionTreatment) => t.applications.filter((a) => a.placement === "in-furrow");

/** N + K2O in a 2x2 band at 30-in rows (common practice, no source); other spacings keep the amount per foot of row. */
const bandNK2oLimitAt30In = 90;
const bandLimitAt = (rowSpacingIn: number | null) => (bandNK2oLimitAt30In * 30) / (rowSpacingIn ?? 30);

/** Crops more sensitive to fertilizer salt near the seed than corn (common practice, no source). */
const saltSensitiveCrops = new Set(["soybean"]);

export const cautionRules: CautionRule[] = [
  {
    code: "soybean-k-in-furrow",
    text: "Keep potassium out of the seed furrow for soybean: potash placed with the seed injures germinating soybean.",
    source: noSource,
    trips: (t) => {
      const k = sum(inFurrow(t), (a) => a.k2oLbAc);
      return t.crop === "soybean" && k > 0 ? `${lb(k)} K2O in the furrow on soybean` : null;
    },
  },
  {
    code: "seed-placed-n-k2o",
    text: "N or N + K2O placed with the seed (in-furrow) can injure germination and thin the stand through salt and ammonia; keep the amount with the seed small.",
    source: noSource,
    trips: (t) => {
      const nk = sum(inFurrow(t), (a) => a.nLbAc + a.k2oLbAc);
      return nk > 0 ? `${lb(nk)} N + K2O with the seed` : null;
    },
  },
  {
    code: "band-n-k2o-rate",
    text:
      `In a 2x2 band, N + K2O is held to about ${bandNK2oLimitAt30In} lb/ac at 30-in rows (at other spacings, the same amount per foot of row), ` +
      "and to less on sandy or dry soils, where a band injures seedlings sooner.",
    source: noSource,
    trips: (t) => {
      const nk = sum(
        t.applications.filter((a) => a.placement === "2x2-band"),
        (a) => a.nLbAc + a.k2oLbAc,
      );
      const limit = bandLimitAt(t.rowSpacingIn);
      const rows = t.rowSpacingIn === null ? "row spacing not recorded, taken as 30 in" : `${t.rowSpacingIn}-in rows`;
      return nk > limit ? `${lb(nk)} N + K2O in the 2x2 band, above about ${lb(limit)} at ${rows}` : null;
    },
  },
  {
    code: "salt-sensitive-crop",
    text: "Soybean is more sensitive to fertilizer salt than corn: fertilizer with or near the seed injures it at rates corn tolerates.",
    source: noSource,
    trips: (t) => {
      return saltSensitiveCrops.has(t.crop) && inFurrow(t).length > 0 ? `fertilizer in the furrow on ${t.crop}` : null;
    },
  },
  {
    code: "trials-not-your-field",
    text: "These results summarise the trials in these datasets; a grower's field can differ.",
    source: noSource,
  },
  { code: "seed-placement-injury", text: "Seed-placed (in-furrow) fertilizer can injure a stand.", source: noSource },
  { code: "local-advice", text: "Local recommendations and licensed advisers have the last word.", source: noSource },
];

/**
 * Said beside every critical soil-test level: a level read off a line fitted to these trials, not a recommendation.
 * Not among the rules above, because it speaks of an estimate rather than of a treatment.
 */
export const criticalLevelCaution = {
  code: "critical-level-estimate" as const,
  text:
    "This critical soil-test level is an estimate from these trials, read where the fitted line crosses; it is only as good as the " +
    "spread of soil tests behind it and holds for this extractant and unit only. Local calibrations and a licensed adviser have the last word.",
  source: noSource,
};

/** Each rule that a treatment trips, with the words saying how. */
export function trippedRules(t: CautionTreatment): { rule: CautionRule; detail: string }[] {
  return cautionRules.flatMap((rule) => {
    const detail = rule.trips?.(t) ?? null;
    return detail ? [{ rule, detail }] : [];
  });
}

/**
 * The cautions of an answer: every rule, those tripped by an included treatment first (naming the treatments), then
 * the standing cautions, then the rules nothing here trips.
 */
export function evaluateCautions(included: CautionTreatment[]): Caution[] {
  const named = new Map<string, Caution["treatments"]>();
  for (const t of included) {
    for (const { rule, detail } of trippedRules(t)) {
      const list = named.get(rule.code) ?? [];
      if (!list.some((x) => x.dataset === t.dataset && x.treatment === t.treatment && x.detail === detail))
        list.push({ dataset: t.dataset, treatment: t.treatment, detail });
      named.set(rule.code, list);
    }
  }
  const rank = (r: CautionRule) => (named.has(r.code) ? 0 : r.trips ? 2 : 1);
  return [...cautionRules]
    .sort((a, b) => rank(a) - rank(b))
    .map((r) => ({
      code: r.code,
      text: r.text,
      source: r.source,
      standing: !r.trips,
      matches: named.has(r.code),
      treatments: named.get(r.code) ?? [],
    }));
}

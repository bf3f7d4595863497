import { designBalance } from "@/stats";
import type { DraftState } from "../draft-state";
import type { Reporter } from "../report";

/** What one file says about one site-year: its treatments, plots per treatment × block, and yields with rows. */
export interface SiteYearTally {
  code: string;
  firstRow: number;
  treatments: Set<string>;
  cells: Map<string, number>;
  yields: number[];
  yieldRows: number[];
  /** Treatment id and block of each yield, in the same order (plots files only). */
  yieldTreatmentIds: number[];
  yieldBlocks: number[];
}

export function newTally(code: string, row: number): SiteYearTally {
  return {
    code,
    firstRow: row,
    treatments: new Set(),
    cells: new Map(),
    yields: [],
    yieldRows: [],
    yieldTreatmentIds: [],
    yieldBlocks: [],
  };
}

/** Exactly one untreated check among the treatments a site-year uses. */
export function checkRule(tally: SiteYearTally, state: DraftState, report: Reporter) {
  const checks = [...tally.treatments].filter((t) => state.treatments.get(t)?.isCheck);
  if (checks.length === 0) {
    report.error(
      tally.firstRow,
      "treatment",
      null,
      `site-year "${tally.code}" has no untreated check among its treatments (${[...tally.treatments].sort().join(", ")}); every site-year needs exactly one`,
    );
  } else if (checks.length > 1) {
    report.error(
      tally.firstRow,
      "treatment",
      checks.join(", "),
      `site-year "${tally.code}" has ${checks.length} checks (${checks.sort().join(", ")}); every site-year needs exactly one`,
    );
  }
}

/**
 * Missing treatment × block cells: allowed, but the design is then unbalanced and the report says so. Balance is
 * judged on the plots with a yield, by the same rule the ANOVA uses (stats/design-balance.ts), so the warning and the
 * stored balanced flag always agree. Blocks the site-year declares but no plot with a yield uses are a note of their
 * own: they leave the fit balanced.
 */
export function balanceRule(tally: SiteYearTally, declaredBlocks: number, codeOf: (treatmentId: number) => string, report: Reporter) {
  if (tally.yields.length === 0) return;
  const design = designBalance(tally.yieldTreatmentIds.map((id, i) => ({ treatment: codeOf(id), block: String(tally.yieldBlocks[i]) })));
  if (!design.balanced) {
    const missing = design.emptyCells.map((c) => `${c.treatment} in block ${c.block}`);
    const total = design.treatments.length * design.blocks.length;
    const list = missing.length > 8 ? `${missing.slice(0, 8).join("; ")}; …` : missing.join("; ");
    const what = missing.length
      ? `${missing.length} of ${total} plots missing or without yield (${list})`
      : "some treatment × block cells hold more plots than others";
    report.warn(
      null,
      "block",
      null,
      `Site-year ${tally.code} is unbalanced: ${what}. Its responses use the least-squares fit and are stored as unbalanced (balanced = false); add the missing plots to balance it.`,
      { kind: "unbalanced", place: tally.code },
    );
  }
  const used = new Set(tally.yieldBlocks);
  const unused: number[] = [];
  for (let b = 1; b <= declaredBlocks; b++) if (!used.has(b)) unused.push(b);
  if (unused.length && used.size > 0) {
    report.warn(
      null,
      "block",
      null,
      `Site-year ${tally.code} declares ${declaredBlocks} blocks, but no plot with a yield is in block ${unused.join(", ")}; it is analysed with the ${used.size} blocks that have yields${design.balanced ? " and stays balanced" : ""}. Correct blocks in site_years if the design had fewer.`,
      { kind: "unused-blocks", place: tally.code },
    );
  }
}

/** A yield far from its site-year's median is worth a second look, but it is a warning: trials do have odd plots. */
export function outlierRule(tally: SiteYearTally, report: Reporter, file = "yield_kg_ha") {
  if (tally.yields.length < 4) return;
  const sorted = [...tally.yields].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  const median = sorted.length % 2 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
  if (!(median > 0)) return;
  tally.yields.forEach((y, i) => {
    if (tally.yieldRows[i]! < 0) return;
    if (y < 0.4 * median || y > 2 * median) {
      report.warn(
        tally.yieldRows[i]!,
        file,
        String(Math.round(y)),
        `yield ${Math.round(y)} kg/ha is far outside site-year "${tally.code}"'s range (median ${Math.round(median)} kg/ha); check it`,
        { kind: "outlier", place: `row ${tally.yieldRows[i]} (${tally.code})` },
      );
    }
  });
}

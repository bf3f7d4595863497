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

/** Missing treatment × block cells: allowed, but the design is then unbalanced and the report says so. */
export function balanceRule(tally: SiteYearTally, blocks: number, report: Reporter) {
  const missing: string[] = [];
  for (const t of [...tally.treatments].sort()) {
    for (let b = 1; b <= blocks; b++) if (!tally.cells.get(`${t}|${b}`)) missing.push(`${t} in block ${b}`);
  }
  if (missing.length) {
    const total = tally.treatments.size * blocks;
    const list = missing.length > 8 ? `${missing.slice(0, 8).join("; ")}; …` : missing.join("; ");
    report.warn(
      null,
      "block",
      null,
      `site-year "${tally.code}" is unbalanced: ${missing.length} of ${total} plots missing or without yield (${list}); its responses use the least-squares fit and are flagged balanced=false`,
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
    if (y < 0.4 * median || y > 2 * median) {
      report.warn(
        tally.yieldRows[i]!,
        file,
        String(Math.round(y)),
        `yield ${Math.round(y)} kg/ha is far outside site-year "${tally.code}"'s range (median ${Math.round(median)} kg/ha); check it`,
      );
    }
  });
}

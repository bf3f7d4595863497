import { factorLevels } from "@/stats/linear-model";

/** Whether a site-year's plots fill every treatment × block cell equally often, and which cells are empty. */
export interface DesignBalance {
  balanced: boolean;
  /** Blocks and treatments among the plots, sorted as the ANOVA sorts its factor levels. */
  blocks: string[];
  treatments: string[];
  /** Treatment × block cells without a plot, in treatment then block order. */
  emptyCells: { treatment: string; block: string }[];
  /** Plots per cell when balanced, else null. */
  perCell: number | null;
}

/**
 * Design balance of an RCBD: balanced when every treatment observed appears equally often in every block observed.
 * This is the one definition of balance: the ANOVA (rcbdAnova) fits by it and the upload report warns by it, so a
 * site-year the report calls unbalanced is stored with balanced = false and no other.
 * Reference: Steel, Torrie & Dickey (1997) Principles and Procedures of Statistics, 3rd ed., ch. 9 (missing plots).
 * @example designBalance([{ block: "1", treatment: "A" }, { block: "1", treatment: "B" }, { block: "2", treatment: "A" }]).emptyCells
 * // [{ treatment: "B", block: "2" }]
 */
export function designBalance(plots: readonly { block: string; treatment: string }[]): DesignBalance {
  const blocks = factorLevels({ values: plots.map((p) => p.block) });
  const treatments = factorLevels({ values: plots.map((p) => p.treatment) });
  const cellCounts = new Map<string, number>();
  for (const plot of plots) {
    const key = `${plot.treatment}\u0000${plot.block}`;
    cellCounts.set(key, (cellCounts.get(key) ?? 0) + 1);
  }
  const emptyCells: DesignBalance["emptyCells"] = [];
  let first: number | null = null;
  let equal = true;
  for (const treatment of treatments) {
    for (const block of blocks) {
      const count = cellCounts.get(`${treatment}\u0000${block}`) ?? 0;
      if (count === 0) emptyCells.push({ treatment, block });
      if (first === null) first = count;
      else if (count !== first) equal = false;
    }
  }
  const balanced = first !== null && first > 0 && equal;
  return { balanced, blocks, treatments, emptyCells, perCell: balanced ? first : null };
}

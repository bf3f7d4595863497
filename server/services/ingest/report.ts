import type { ProblemGroup, ValidationProblem } from "@/schemas/curation";
import { GROUP_PLACES, groupMessage } from "@/schemas/messages";

const MAX_KEPT = 10_000;

/** Collects the problems of one upload. Counts all of them, keeps the first 10,000 (a summary line notes the rest). */
export class Reporter {
  readonly problems: ValidationProblem[] = [];
  errors = 0;
  warnings = 0;
  private dropped = 0;

  constructor(readonly file: string) {}

  add(
    severity: "error" | "warning",
    row: number | null,
    column: string | null,
    value: string | null,
    message: string,
    group?: ProblemKind,
  ) {
    if (severity === "error") this.errors += 1;
    else this.warnings += 1;
    if (this.problems.length >= MAX_KEPT) {
      this.dropped += 1;
      return;
    }
    this.problems.push({
      severity,
      file: this.file,
      row,
      column,
      value: value === null ? null : value.slice(0, 200),
      message,
      ...(group ? { kind: group.kind, place: group.place } : {}),
    });
  }

  error(row: number | null, column: string | null, value: string | null, message: string, group?: ProblemKind) {
    this.add("error", row, column, value, message, group);
  }

  /** A warning; one that can repeat names its kind and place, so the report can group it. */
  warn(row: number | null, column: string | null, value: string | null, message: string, group?: ProblemKind) {
    this.add("warning", row, column, value, message, group);
  }

  /** Problems in report order, with a closing note when some were not kept. */
  all(): ValidationProblem[] {
    if (this.dropped === 0) return this.problems;
    return [
      ...this.problems,
      {
        severity: "error",
        file: this.file,
        row: null,
        column: null,
        value: null,
        message: `${this.dropped} further problems were counted but not listed; fix the ones above and upload again.`,
      },
    ];
  }
}

/** The kind of a problem that can repeat ("no-responses:…", "unbalanced", "caution:…") and where this one is. */
export interface ProblemKind {
  kind: string;
  place: string;
}

/**
 * Problems grouped for reading: one entry per severity and kind with its count and first places, in the order the
 * kinds first appear; a problem without a kind stands alone. The report keeps every problem with its row and column.
 */
export function groupProblems(problems: readonly ValidationProblem[]): ProblemGroup[] {
  const groups: (ProblemGroup & { first: string })[] = [];
  const byKind = new Map<string, ProblemGroup & { first: string }>();
  for (const p of problems) {
    if (!p.kind) {
      groups.push({ severity: p.severity, kind: null, count: 1, places: p.place ? [p.place] : [], message: p.message, first: p.message });
      continue;
    }
    const key = `${p.severity}\u0000${p.kind}`;
    let g = byKind.get(key);
    if (!g) {
      g = { severity: p.severity, kind: p.kind, count: 0, places: [], message: "", first: p.message };
      byKind.set(key, g);
      groups.push(g);
    }
    g.count += 1;
    if (p.place && g.places.length < GROUP_PLACES && !g.places.includes(p.place)) g.places.push(p.place);
  }
  return groups.map(({ first, ...g }) => ({ ...g, message: g.kind ? groupMessage(g.kind, g.count, g.places, first) : first }));
}

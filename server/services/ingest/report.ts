import type { ValidationProblem } from "@/schemas/curation";

const MAX_KEPT = 10_000;

/** Collects the problems of one upload. Counts all of them, keeps the first 10,000 (a summary line notes the rest). */
export class Reporter {
  readonly problems: ValidationProblem[] = [];
  errors = 0;
  warnings = 0;
  private dropped = 0;

  constructor(readonly file: string) {}

  add(severity: "error" | "warning", row: number | null, column: string | null, value: string | null, message: string) {
    if (severity === "error") this.errors += 1;
    else this.warnings += 1;
    if (this.problems.length >= MAX_KEPT) {
      this.dropped += 1;
      return;
    }
    this.problems.push({ severity, file: this.file, row, column, value: value === null ? null : value.slice(0, 200), message });
  }

  error(row: number | null, column: string | null, value: string | null, message: string) {
    this.add("error", row, column, value, message);
  }

  warn(row: number | null, column: string | null, value: string | null, message: string) {
    this.add("warning", row, column, value, message);
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

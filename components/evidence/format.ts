import { shownDecimals } from "@/constants/precision";

/** Number formatting for the Evidence screen: responses in their units, intervals, probabilities and p values. */

/** A response with its sign, e.g. "+3.4", "−12" (a true minus sign reads better than a hyphen). */
export function formatResponse(value: number, units: string): string {
  const digits = shownDecimals(units);
  const rounded = Math.abs(value).toFixed(digits);
  const zero = Number(rounded) === 0;
  // Counts in the thousands (plants/ac) read better grouped: "−6,800".
  const fixed =
    units === "plants/ac" && Math.abs(value) >= 10_000
      ? Number(rounded).toLocaleString("en-US", { maximumFractionDigits: digits })
      : rounded;
  return `${zero ? "" : value < 0 ? "−" : "+"}${fixed}`;
}

export function formatInterval(lower: number, upper: number, units: string): string {
  return `${formatResponse(lower, units)} to ${formatResponse(upper, units)}`;
}

export function unitLabel(units: string): string {
  return units === "ln(treated/check)" ? "ln ratio" : units;
}

/** A log response ratio as a percent change, e.g. 0.0488 → "+5.0 %". */
export function lnrrAsPercent(lnrr: number): string {
  const pct = 100 * (Math.exp(lnrr) - 1);
  return `${pct < 0 ? "−" : "+"}${Math.abs(pct).toFixed(1)} %`;
}

/** A probability or share as a whole percent; "<1 %" and ">99 %" at the ends so nothing reads as certain. */
export function formatPercent(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "–";
  const pct = 100 * p;
  if (pct > 0 && pct < 1) return "<1 %";
  if (pct < 100 && pct > 99) return ">99 %";
  return `${Math.round(pct)} %`;
}

export function formatPValue(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "–";
  if (p < 0.001) return "p < 0.001";
  return `p = ${p < 0.05 ? p.toFixed(3) : p.toFixed(2)}`;
}

export function formatMoney(value: number): string {
  return `$${value.toFixed(2)}`;
}

/** Parses a typed price: accepts "4.80", "$4.80", "4,80"; empty is undefined; anything else is NaN. */
export function parseMoneyInput(text: string): number | undefined {
  const cleaned = text.trim().replace(/^\$/, "").replace(",", ".");
  if (cleaned === "") return undefined;
  return /^\d+(\.\d*)?$|^\.\d+$/.test(cleaned) ? Number(cleaned) : Number.NaN;
}

export function levelLabel(level: string, labels: Record<string, string> = {}): string {
  return labels[level] ?? level.replace(/_/g, " ").replace(/^./, (c) => c.toUpperCase());
}

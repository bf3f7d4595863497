import { lineCrossing, type LineCoefficients } from "@/stats/meta/line-crossing";
import { formatPValue, formatResponse, unitLabel } from "./format";

/**
 * The words of a meta-regression on a continuous moderator and of the line's crossings (the critical soil-test level),
 * shared by the API's answer and the Evidence screen, which finds the break-even crossing at the grower's own prices.
 */

/** A moderator value to three significant figures, without trailing zeros ("23.4", "150", "0.0123"). */
function formatModerator(value: number): string {
  if (!Number.isFinite(value)) return "–";
  const rounded = Number(value.toPrecision(3));
  return Math.abs(rounded) >= 1000 ? String(Math.round(rounded)) : String(rounded);
}

interface CrossingWords {
  target: number;
  value: number | null;
  withinObservedRange: boolean | null;
  interval: { lower: number; upper: number } | null;
  text: string;
}

/**
 * Where the line reaches `target`, in words. `what` names the target ("zero", "the break-even of +1.6 bu/ac"). Only a
 * line that falls as the moderator rises has a critical level.
 */
export function describeCrossing(
  line: LineCoefficients,
  target: number,
  context: { what: string; unit: string; range: { min: number; max: number } },
): CrossingWords {
  const { unit, range, what } = context;
  if (!(line.slope < 0)) {
    return {
      target,
      value: null,
      withinObservedRange: null,
      interval: null,
      text: `The fitted response does not fall as the soil test rises, so these trials give no level where it reaches ${what}.`,
    };
  }
  const crossing = lineCrossing(line, target);
  const value = crossing.value!;
  const inside = value >= range.min && value <= range.max;
  const interval = crossing.interval;
  const tested = `${formatModerator(range.min)}–${formatModerator(range.max)} ${unit}`;
  const intervalWords = interval
    ? `, 95 % interval ${formatModerator(interval.lower)} to ${formatModerator(interval.upper)} ${unit}` +
      (interval.lower < range.min || interval.upper > range.max ? ` (reaching beyond the tested ${tested})` : "")
    : "; its interval is not estimable: the line's confidence band never leaves the target on one side, because the slope is not clearly different from zero";
  const extrapolated = inside ? "" : ` This lies outside the tested range (${tested}): an extrapolation.`;
  return {
    target,
    value,
    withinObservedRange: inside,
    interval,
    text: `The fitted response reaches ${what} at ${formatModerator(value)} ${unit}${intervalWords}.${extrapolated}`,
  };
}

/** The slope and R² in plain words. */
export function describeSlope(input: {
  slope: { estimate: number; ciLower: number; ciUpper: number; pValue: number };
  r2Percent: number | null;
  k: number;
  units: string;
  /** The moderator as a noun: "soil-test P", "the check yield". */
  noun: string;
  unit: string;
}): string {
  const { slope, r2Percent, k, units, noun, unit } = input;
  const u = unitLabel(units);
  const per = (v: number) => `${v < 0 ? "−" : v > 0 ? "+" : ""}${formatModerator(Math.abs(v))}`;
  const direction = slope.estimate < 0 ? "falls" : "rises";
  const r2 =
    r2Percent === null
      ? ""
      : ` R² = ${r2Percent.toFixed(0)} %: ${noun} accounts for about ${r2Percent.toFixed(0)} % of the spread between site-years.`;
  const few = k < 10 ? ` With only ${k} site-years the line is imprecise.` : "";
  return (
    `The response ${direction} by ${formatModerator(Math.abs(slope.estimate))} ${u} per ${unit} of ${noun.replace(/^the /, "")} (95 % CI ${per(slope.ciLower)} to ` +
    `${per(slope.ciUpper)}, ${formatPValue(slope.pValue)}; k = ${k}).${r2}${few}`
  );
}

/** "the break-even of +1.6 bu/ac" */
export const breakEvenWhat = (breakEven: number, units: string) =>
  `the break-even of ${formatResponse(breakEven, units)} ${unitLabel(units)}`;

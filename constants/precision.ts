/**
 * Decimals a screen shows a value with, by its unit: the one table the client's number formatters read. The API keeps
 * 15 significant digits of every converted value (stats/precision.ts); screens round further, to the precision trials
 * are usually reported at. Common practice, no source: yields to 0.1 bu/ac or whole kg/ha, rates to 0.1 lb/ac,
 * soil tests to 0.1 ppm, moisture to 0.1 %, stands to whole plants/ac, scores to 0.01, log ratios to 0.001.
 */
const shownDecimalsByUnit: Record<string, number> = {
  "bu/ac": 1,
  "kg/ha": 0,
  "lb/ac": 1,
  ppm: 1,
  "%": 1,
  "plants/ac": 0,
  "lb/bu": 1,
  score: 2,
  "ln(treated/check)": 3,
};

/** Decimals shown for a unit; a unit the table lacks (a curator's own measure) gets one. */
export function shownDecimals(unit: string): number {
  return shownDecimalsByUnit[unit] ?? 1;
}

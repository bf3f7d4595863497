/**
 * The precision of converted values: one rule for every value Plotbank reports in a unit it converted to.
 *
 * A converted value is rounded to 15 significant digits (DBL_DIG, the digits a double always keeps). That removes the
 * binary floating-point noise of a conversion and makes any value given with at most 15 significant digits come back
 * exactly: 63 bu/ac of soybean is stored as 4236.877… kg/ha and read back in bu/ac as 63, not 62.99999999999999.
 *
 * Where the rule applies:
 * - on every read that converts (API JSON and CSV rows, the site-year ANOVA's plot values): `roundConverted` here, and
 *   in SQL the float8 → numeric cast, which PostgreSQL makes with `printf("%.15g")`, i.e. the same 15 digits with ties
 *   to even (`roundConvertedSql` in server/services/public/row-resource.ts; tests/server/api-rows-sql-json.test.ts
 *   checks both agree);
 * - at ingest, on values stored in a unit they will be read in without converting back (plants/ac from plants per
 *   10 ft of row, ppm from lb/ac).
 * - NOT on yields stored in kg/ha from bu/ac, lb/ac or harvest moisture: they keep the full double of the exact
 *   conversion. Rounding them to 15 digits moves them by up to 5·10⁻¹⁵ relative, which the second rounding on the way
 *   back to bu/ac does not always undo (about a quarter of 1–6 digit bu/ac values would come back one unit off in the
 *   15th digit); the unrounded double round-trips every such value (tests/stats/precision.test.ts).
 * - NOT inside statistics: means, ANOVAs and meta-analyses compute on full doubles.
 *
 * @example roundConverted(62.99999999999999) // 63
 * @example roundConverted(-0.30000000000000004) // -0.3
 */
export const convertedSignificantDigits = 15;

/** The significant digits of a number as toPrecision prints it (no sign, point, exponent or leading zeros). */
const significantDigits = (value: number, precision: number) =>
  Math.abs(value).toPrecision(precision).replace(/e.*$/, "").replace(".", "").replace(/^0+/, "");

/** Does the double's exact decimal value lie halfway between two 15-digit numbers (its 16th digit a 5, nothing after)? */
function isExactTie(value: number): boolean {
  // A tie prints exactly at 16 digits; the cheap test first, then toPrecision(100), the exact value to 100 digits.
  if (significantDigits(value, convertedSignificantDigits + 1)[convertedSignificantDigits] !== "5") return false;
  const digits = significantDigits(value, 100);
  return digits[convertedSignificantDigits] === "5" && /^0*$/.test(digits.slice(convertedSignificantDigits + 1));
}

/**
 * A converted value rounded to 15 significant digits, ties to even as PostgreSQL's float8 → numeric cast rounds
 * (JavaScript's toPrecision rounds ties away from zero). 0, ±0, NaN, ±Infinity, null and undefined pass unchanged,
 * and so does a double so near the largest one that rounding it up would overflow.
 * @example roundConverted(4236.877456178913 / 67.25150606916094) // 63
 */
export function roundConverted<T extends number | null | undefined>(value: T): T {
  if (value === null || value === undefined || value === 0 || !Number.isFinite(value)) return value;
  const rounded = Number(value.toPrecision(convertedSignificantDigits));
  // Within 5·10⁻¹⁵ of the largest double, rounding up would overflow: such a value stays as it is.
  if (!Number.isFinite(rounded)) return value;
  if (!isExactTie(value)) return rounded as T;
  // A tie: toPrecision went away from zero; keep that only when it lands on an even 15th digit.
  const lastKept = Number(significantDigits(rounded, convertedSignificantDigits)[convertedSignificantDigits - 1]);
  if (lastKept % 2 === 0) return rounded as T;
  const below = Number(value.toPrecision(convertedSignificantDigits + 1).replace(/5(e.*)?$/, "4$1"));
  return Number(below.toPrecision(convertedSignificantDigits)) as T;
}

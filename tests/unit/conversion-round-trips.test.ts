/**
 * The one rule for converted values (stats/precision.ts): 15 significant digits, ties to even. Every conversion the
 * code makes, fed values given with 1–6 significant digits, stores them as ingest does and reads them back as the
 * API does: they must come back equal to what was given.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { plantsPerAcreFromPer10Ft } from "@/constants/measures";
import { crops } from "@/constants/vocabulary";
import { gradeAsOxides, toStandardMoisture, yieldFactorToKgHa } from "@/server/services/ingest/edge-units";
import { yieldConverter } from "@/server/services/public/row-resource";
import { convertedSignificantDigits, roundConverted } from "@/stats/precision";
import {
  adjustYieldToMoisture,
  cropStandards,
  kilogramsPerHectareToPoundsPerAcre,
  partsPerMillionToPoundsPerAcreSixInch,
  phosphatePentoxideToPhosphorus,
  potashToPotassium,
  poundsPerAcreSixInchToPartsPerMillion,
} from "@/stats/units";

const runs = { numRuns: 3000, seed: 20261203 };

/** A value as a curator types it: 1–6 significant digits, 0–4 of them after the point, parsed as a CSV cell is. */
const given = fc
  .tuple(fc.integer({ min: 1, max: 999_999 }), fc.integer({ min: 0, max: 4 }), fc.boolean())
  .map(([digits, decimals, negative]) => Number(`${negative ? "-" : ""}${digits}e-${decimals}`));
const positiveGiven = given.map(Math.abs);
/** Grain moisture at harvest, % wet basis, to one decimal as meters give it. */
const harvestMoisture = fc.integer({ min: 50, max: 400 }).map((tenths) => tenths / 10);
const rowSpacing = fc.constantFrom(7.5, 15, 20, 22, 30, 36, 38);

describe("roundConverted", () => {
  it("removes binary noise and leaves every value of at most 15 significant digits as it is", () => {
    expect(roundConverted(62.99999999999999)).toBe(63);
    expect(roundConverted(0.1 + 0.2)).toBe(0.3);
    expect(roundConverted(-(0.1 + 0.2))).toBe(-0.3);
    expect(roundConverted(17424.000000000004)).toBe(17424);
    fc.assert(
      fc.property(fc.bigInt({ min: 1n, max: 10n ** 15n - 1n }), fc.integer({ min: -300, max: 290 }), (mantissa, exponent) => {
        const value = Number(`${mantissa}e${exponent}`);
        expect(roundConverted(value)).toBe(value);
        expect(roundConverted(-value)).toBe(-value);
      }),
      runs,
    );
  });

  it("keeps 15 significant digits of any double", () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => {
        const rounded = roundConverted(x);
        // Rounding up the largest doubles would overflow: they stay as they are.
        if (!Number.isFinite(Number(x.toPrecision(convertedSignificantDigits)))) expect(rounded).toBe(x);
        else {
          expect(rounded === Number(rounded.toPrecision(convertedSignificantDigits))).toBe(true);
          if (x !== 0) expect(Math.abs(rounded - x) / Math.abs(x)).toBeLessThanOrEqual(5e-15 + Number.EPSILON); // half a unit in the 15th digit, and the double nearest it
        }
      }),
      runs,
    );
  });

  it("passes 0, non-finite values and null through, and rounds exact ties to even as PostgreSQL's float8 → numeric cast", () => {
    expect(roundConverted(0)).toBe(0);
    expect(Object.is(roundConverted(-0), -0)).toBe(true);
    expect(roundConverted(Number.NaN)).toBeNaN();
    expect(roundConverted(Number.POSITIVE_INFINITY)).toBe(Number.POSITIVE_INFINITY);
    expect(roundConverted(Number.NEGATIVE_INFINITY)).toBe(Number.NEGATIVE_INFINITY);
    expect(roundConverted(null)).toBeNull();
    expect(roundConverted(undefined)).toBeUndefined();
    // SELECT x::float8::numeric on PGlite 0.5.17 (PostgreSQL 17): 1234567890123445 → 1234567890123440,
    // 1234567890123455 → 1234567890123460, -1234567890123445 → -1234567890123440; JavaScript's toPrecision(15)
    // would give …450 and −…450. tests/server/api-rows-sql-json.test.ts compares both encodings on random rows.
    expect(roundConverted(1234567890123445)).toBe(1234567890123440);
    expect(roundConverted(1234567890123455)).toBe(1234567890123460);
    expect(roundConverted(-1234567890123445)).toBe(-1234567890123440);
    expect(roundConverted(1234567890123.125)).toBe(1234567890123.12);
    expect(roundConverted(1234567890123.375)).toBe(1234567890123.38);
  });
});

describe("round trips: given → stored (as ingest converts) → read (as the API converts, rounded by the rule)", () => {
  it.each(crops)("yield in bu/ac ↔ kg/ha for %s", (crop) => {
    const toKgHa = yieldFactorToKgHa("bu/ac", crop);
    const read = yieldConverter(crop, "bu/ac");
    expect(read.unit).toBe("bu/ac");
    expect(read.convert(63 * toKgHa)).toBe(63);
    fc.assert(
      fc.property(given, (x) => {
        expect(read.convert(x * toKgHa)).toBe(x);
      }),
      runs,
    );
  });

  it.each(crops)("yield in kg/ha reads back in kg/ha for %s", (crop) => {
    const read = yieldConverter(crop, "kg/ha");
    fc.assert(
      fc.property(given, (x) => {
        expect(read.convert(x * yieldFactorToKgHa("kg/ha", crop))).toBe(x);
      }),
      runs,
    );
  });

  it("yield in lb/ac ↔ kg/ha", () => {
    const toKgHa = yieldFactorToKgHa("lb/ac", "soybean");
    fc.assert(
      fc.property(given, (x) => {
        expect(roundConverted(kilogramsPerHectareToPoundsPerAcre(x * toKgHa))).toBe(x);
      }),
      runs,
    );
  });

  it.each(crops)("yield at harvest moisture ↔ the standard moisture of %s", (crop) => {
    const standard = cropStandards[crop].standardMoisturePercent;
    fc.assert(
      fc.property(positiveGiven, harvestMoisture, (x, moisture) => {
        const stored = toStandardMoisture(x, moisture, crop);
        expect(roundConverted(adjustYieldToMoisture(stored, standard, moisture))).toBe(x);
      }),
      runs,
    );
  });

  it("grade percentages as elements (P, K) ↔ as oxides (P2O5, K2O)", () => {
    fc.assert(
      fc.property(positiveGiven, positiveGiven, (p, k) => {
        const oxides = gradeAsOxides({ nitrogenPercent: 0, phosphatePercent: p, potashPercent: k }, "element");
        expect(roundConverted(phosphatePentoxideToPhosphorus(oxides.phosphatePercent))).toBe(p);
        expect(roundConverted(potashToPotassium(oxides.potashPercent))).toBe(k);
      }),
      runs,
    );
  });

  it("stand per 10 ft of row ↔ plants/ac", () => {
    fc.assert(
      fc.property(positiveGiven, rowSpacing, (count, spacing) => {
        const plantsPerAcre = plantsPerAcreFromPer10Ft(count, spacing);
        expect(roundConverted((plantsPerAcre * 10 * (spacing / 12)) / 43_560)).toBe(count);
      }),
      runs,
    );
    // What ingest stores (plants/ac, rounded by the rule, never converted back): no binary noise.
    expect(roundConverted(plantsPerAcreFromPer10Ft(10, 30))).toBe(17_424);
  });

  it("soil tests in lb/ac (6-inch layer) ↔ ppm", () => {
    fc.assert(
      fc.property(positiveGiven, (lbAc) => {
        const ppm = roundConverted(poundsPerAcreSixInchToPartsPerMillion(lbAc));
        expect(roundConverted(partsPerMillionToPoundsPerAcreSixInch(ppm))).toBe(lbAc);
      }),
      runs,
    );
  });
});

describe("why converted yields are stored unrounded", () => {
  it("rounding the stored kg/ha too would bring some bu/ac values back one unit off in the 15th digit", () => {
    const toKgHa = yieldFactorToKgHa("bu/ac", "soybean");
    const read = yieldConverter("soybean", "bu/ac");
    const values = fc.sample(positiveGiven, { numRuns: 1000, seed: 20261203 });
    const off = values.filter((x) => read.convert(roundConverted(x * toKgHa)) !== x);
    expect(off.length).toBeGreaterThan(50);
    expect(values.filter((x) => read.convert(x * toKgHa) !== x)).toEqual([]);
  });
});

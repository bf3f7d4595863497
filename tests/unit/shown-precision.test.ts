/**
 * Screens show values at the decimals of their unit, from the one table in constants/precision.ts (common practice,
 * no source), whatever the 15 significant digits the API gives.
 */
import { describe, expect, it } from "vitest";
import { formatResponse } from "@/components/evidence/format";
import { yieldWords } from "@/components/review/format";
import { shownDecimals } from "@/constants/precision";

describe("shown precision by unit", () => {
  it("the table: bu/ac 0.1, kg/ha whole, plants/ac whole, scores 0.01, log ratios 0.001; other units 0.1", () => {
    expect(["bu/ac", "kg/ha", "lb/ac", "ppm", "%", "plants/ac", "lb/bu", "score", "ln(treated/check)"].map(shownDecimals)).toEqual([
      1, 0, 1, 1, 1, 0, 1, 2, 3,
    ]);
    expect(shownDecimals("leaves/plant")).toBe(1);
  });

  it("the formatters read it: a converted 62.99999999999999 bu/ac reads 63.0", () => {
    expect(formatResponse(62.99999999999999, "bu/ac")).toBe("+63.0");
    expect(formatResponse(4236.817370415044, "kg/ha")).toBe("+4237");
    expect(formatResponse(-1234.4, "plants/ac")).toBe("−1234");
    expect(formatResponse(0.256, "score")).toBe("+0.26");
    // 63 bu/ac of soybean stored as 4236.8174 kg/ha: shown whole in kg/ha, to 0.1 in bu/ac.
    expect(yieldWords(4236.817370415044, "soybean")).toBe("4,237 kg/ha (63.0 bu/ac)");
    expect(yieldWords(-201.7, "soybean", true)).toBe("−202 kg/ha (−3.0 bu/ac)");
  });
});

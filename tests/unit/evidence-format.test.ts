import { describe, expect, it } from "vitest";
import { niceDomain, niceTicks, linearScale } from "@/components/charts/scale";
import { formatInterval, formatPercent, formatPValue, formatResponse, lnrrAsPercent, parseMoneyInput } from "@/components/evidence/format";

describe("number formatting", () => {
  it("signs responses with a true minus and rounds per unit", () => {
    expect(formatResponse(3.449, "bu/ac")).toBe("+3.4");
    expect(formatResponse(-12.5, "kg/ha")).toBe("−13");
    expect(formatResponse(-0.04, "bu/ac")).toBe("0.0");
    expect(formatResponse(0.04321, "ln(treated/check)")).toBe("+0.043");
    expect(formatInterval(-1.25, 4.1, "bu/ac")).toBe("−1.3 to +4.1");
  });

  it("shows probabilities as whole percents without false certainty", () => {
    expect(formatPercent(0.836)).toBe("84 %");
    expect(formatPercent(0.004)).toBe("<1 %");
    expect(formatPercent(0.996)).toBe(">99 %");
    expect(formatPercent(1)).toBe("100 %");
    expect(formatPercent(null)).toBe("–");
  });

  it("formats p values", () => {
    expect(formatPValue(0.0004)).toBe("p < 0.001");
    expect(formatPValue(0.0123)).toBe("p = 0.012");
    expect(formatPValue(0.43)).toBe("p = 0.43");
  });

  it("turns a log response ratio into a percent change", () => {
    expect(lnrrAsPercent(Math.log(1.05))).toBe("+5.0 %");
    expect(lnrrAsPercent(Math.log(0.9))).toBe("−10.0 %");
  });

  it("parses typed money: $ and comma decimals; empty is unset; junk is NaN", () => {
    expect(parseMoneyInput("4.80")).toBe(4.8);
    expect(parseMoneyInput("$12")).toBe(12);
    expect(parseMoneyInput("4,5")).toBe(4.5);
    expect(parseMoneyInput(" ")).toBeUndefined();
    expect(parseMoneyInput("abc")).toBeNaN();
    expect(parseMoneyInput("-3")).toBeNaN();
  });
});

describe("chart scales", () => {
  it("picks nice ticks", () => {
    expect(niceTicks(0, 10)).toEqual([0, 2.5, 5, 7.5, 10]);
    expect(niceTicks(-3, 17, 5)).toEqual([0, 5, 10, 15]);
  });

  it("widens the domain to whole steps and keeps zero in view", () => {
    const { domain, ticks } = niceDomain([3.2, 17.8]);
    expect(domain[0]).toBe(0);
    expect(domain[1]).toBeGreaterThanOrEqual(17.8);
    expect(ticks[0]).toBe(0);
    expect(ticks[ticks.length - 1]).toBe(domain[1]);
    expect(niceDomain([-7, -2]).domain[1]).toBe(0);
  });

  it("maps linearly", () => {
    const x = linearScale([0, 10], [100, 200]);
    expect(x(5)).toBe(150);
  });
});

import { describe, expect, it } from "vitest";
import { groupPalette, groupShapes, groupStyles } from "@/components/evidence/group-style";
import { colors } from "@/constants/theme";

/** WCAG 2.1 relative luminance and contrast ratio, as tests/browser/contrast.test.ts computes them. */
function contrast(a: string, b: string): number {
  const lum = (hex: string) => {
    const [r, g, bl] = [1, 3, 5].map((i) => {
      const s = parseInt(hex.slice(i, i + 2), 16) / 255;
      return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
    });
    return 0.2126 * r! + 0.7152 * g! + 0.0722 * bl!;
  };
  const [hi, lo] = [lum(a), lum(b)].sort((x, y) => y - x);
  return (hi! + 0.05) / (lo! + 0.05);
}

describe("group colours and shapes", () => {
  it("every group colour keeps 3:1 against the white card every marker sits on (WCAG 2.1 SC 1.4.11, non-text contrast)", () => {
    const soil = groupStyles("soilTestClass", ["very_low", "low", "optimum", "high", "very_high", "not recorded"]);
    for (const colour of [...groupPalette, ...[...soil.values()].map((s) => s.colour)]) {
      expect(contrast(colour, colors.card), colour).toBeGreaterThanOrEqual(3);
    }
  });

  it("gives each level its own colour and shape, and distinct pairs well past the palette's length", () => {
    const eight = groupStyles("placement", [
      "in-furrow",
      "2x2-band",
      "broadcast",
      "broadcast-incorporated",
      "surface-band",
      "side-dress",
      "foliar",
      "deep-band",
    ]);
    expect(new Set([...eight.values()].map((s) => s.colour)).size).toBe(8);
    expect(new Set([...eight.values()].map((s) => s.shape)).size).toBe(8);
    const many = groupStyles(
      "dataset",
      Array.from({ length: 40 }, (_, i) => `d${i}`),
    );
    expect(new Set([...many.values()].map((s) => `${s.colour}/${s.shape}`)).size).toBe(40);
    expect(groupShapes.length).toBe(groupPalette.length);
  });

  it("soil-test classes keep the scatter plot's ordered colours and shapes", () => {
    const soil = groupStyles("soilTestClass", ["low", "high"]);
    expect(soil.get("low")).toEqual({ colour: "#d95f0e", shape: "square" });
    expect(soil.get("high")).toEqual({ colour: "#2b7a78", shape: "diamond" });
  });
});

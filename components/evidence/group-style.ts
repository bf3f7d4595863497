import { classShapes, type MarkerShape } from "@/components/charts/marker-shapes";
import { colors, soilClassColors } from "@/constants/theme";
import type { Grouping } from "@/schemas/analysis";

/**
 * Group colours for "compare by" views: the Okabe & Ito (2008, "Color Universal Design") colours that keep 3:1 against
 * a white card (WCAG 2.1 SC 1.4.11, non-text contrast), then Tol's (2021, "Colour schemes", SRON/EPS/TN/09-002)
 * muted wine, indigo and olive, which do too. Each group also gets its own marker shape, so no reader depends on hue.
 * Markers sit on white cards only; tests/unit/group-style.test.ts checks every colour against them, and
 * tests/browser/evidence-groups.test.ts the rendered markers against their card.
 */
export const groupPalette = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#000000", "#882255", "#332288", "#999933"] as const;
export const groupShapes: readonly MarkerShape[] = ["circle", "square", "triangle", "diamond", "down", "cross", "hexagon", "star"];

export interface GroupStyle {
  colour: string;
  shape: MarkerShape;
}

/**
 * The colour and shape of each level, in the order given. Soil-test classes keep their ordered scale and shapes (the
 * scatter plot uses the same); other groupings take the palette in turn, with the shape shifted each time the colours
 * wrap, so up to 64 levels differ in colour or shape.
 */
export function groupStyles(by: Grouping, levels: readonly string[]): Map<string, GroupStyle> {
  const styles = new Map<string, GroupStyle>();
  levels.forEach((level, i) => {
    if (by === "soilTestClass" && soilClassColors[level]) {
      styles.set(level, { colour: soilClassColors[level]!, shape: classShapes[level] ?? "circle" });
      return;
    }
    if (by === "soilTestClass") {
      styles.set(level, { colour: colors.muted, shape: "cross" });
      return;
    }
    const round = Math.floor(i / groupPalette.length);
    styles.set(level, { colour: groupPalette[i % groupPalette.length]!, shape: groupShapes[(i + round) % groupShapes.length]! });
  });
  return styles;
}

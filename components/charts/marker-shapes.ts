/** The marker shapes charts draw (components/charts/marker.tsx), kept apart from the drawing so plain code can name them. */
export type MarkerShape = "circle" | "square" | "triangle" | "diamond" | "down" | "cross" | "hexagon" | "star";

/** Marker shapes per soil-test class, so the classes differ by shape as well as colour (colour-blind readers). */
export const classShapes: Record<string, MarkerShape> = {
  very_low: "circle",
  low: "square",
  optimum: "triangle",
  high: "diamond",
  very_high: "down",
};

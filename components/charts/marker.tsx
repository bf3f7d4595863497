import { Circle, Path, Rect } from "react-native-svg";

/** Marker shapes per soil-test class, so the classes differ by shape as well as colour (colour-blind readers). */
export const classShapes: Record<string, "circle" | "square" | "triangle" | "diamond" | "down"> = {
  very_low: "circle",
  low: "square",
  optimum: "triangle",
  high: "diamond",
  very_high: "down",
};

export function Marker({ x, y, size, shape, fill, stroke = "#ffffff" }: { x: number; y: number; size: number; shape: string; fill: string; stroke?: string }) {
  const s = size;
  switch (shape) {
    case "square":
      return <Rect x={x - s} y={y - s} width={2 * s} height={2 * s} fill={fill} stroke={stroke} strokeWidth={1} />;
    case "triangle":
      return <Path d={`M${x} ${y - s * 1.2} L${x + s * 1.1} ${y + s * 0.9} L${x - s * 1.1} ${y + s * 0.9} Z`} fill={fill} stroke={stroke} strokeWidth={1} />;
    case "diamond":
      return <Path d={`M${x} ${y - s * 1.3} L${x + s * 1.3} ${y} L${x} ${y + s * 1.3} L${x - s * 1.3} ${y} Z`} fill={fill} stroke={stroke} strokeWidth={1} />;
    case "down":
      return <Path d={`M${x} ${y + s * 1.2} L${x + s * 1.1} ${y - s * 0.9} L${x - s * 1.1} ${y - s * 0.9} Z`} fill={fill} stroke={stroke} strokeWidth={1} />;
    default:
      return <Circle cx={x} cy={y} r={s} fill={fill} stroke={stroke} strokeWidth={1} />;
  }
}

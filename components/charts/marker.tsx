import { Circle, Path, Rect } from "react-native-svg";

export { classShapes, type MarkerShape } from "./marker-shapes";

function polygon(x: number, y: number, radius: (i: number) => number, corners: number, turn = -Math.PI / 2): string {
  return (
    Array.from({ length: corners }, (_, i) => {
      const angle = turn + (2 * Math.PI * i) / corners;
      return `${i === 0 ? "M" : "L"}${(x + radius(i) * Math.cos(angle)).toFixed(2)} ${(y + radius(i) * Math.sin(angle)).toFixed(2)}`;
    }).join(" ") + " Z"
  );
}

/** One data marker; `data-shape` names the shape in the web DOM, for tests and for readers of the page source. */
export function Marker({
  x,
  y,
  size,
  shape,
  fill,
  stroke = "#ffffff",
}: {
  x: number;
  y: number;
  size: number;
  shape: string;
  fill: string;
  stroke?: string;
}) {
  const s = size;
  const common = { fill, stroke, strokeWidth: 1, "data-shape": shape } as const;
  switch (shape) {
    case "square":
      return <Rect x={x - s} y={y - s} width={2 * s} height={2 * s} {...common} />;
    case "triangle":
      return <Path d={`M${x} ${y - s * 1.2} L${x + s * 1.1} ${y + s * 0.9} L${x - s * 1.1} ${y + s * 0.9} Z`} {...common} />;
    case "diamond":
      return <Path d={`M${x} ${y - s * 1.3} L${x + s * 1.3} ${y} L${x} ${y + s * 1.3} L${x - s * 1.3} ${y} Z`} {...common} />;
    case "down":
      return <Path d={`M${x} ${y + s * 1.2} L${x + s * 1.1} ${y - s * 0.9} L${x - s * 1.1} ${y - s * 0.9} Z`} {...common} />;
    case "cross": {
      const a = s * 0.4;
      const b = s * 1.2;
      return (
        <Path
          d={`M${x - a} ${y - b} H${x + a} V${y - a} H${x + b} V${y + a} H${x + a} V${y + b} H${x - a} V${y + a} H${x - b} V${y - a} H${x - a} Z`}
          {...common}
        />
      );
    }
    case "hexagon":
      return <Path d={polygon(x, y, () => s * 1.15, 6, 0)} {...common} />;
    case "star":
      return <Path d={polygon(x, y, (i) => (i % 2 ? s * 0.6 : s * 1.35), 10)} {...common} />;
    default:
      return <Circle cx={x} cy={y} r={s} {...common} />;
  }
}

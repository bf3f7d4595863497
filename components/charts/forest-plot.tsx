import { useState } from "react";
import { View, type LayoutChangeEvent } from "react-native";
import Svg, { G, Line, Path, Rect, Text as SvgText } from "react-native-svg";
import { colors, fonts } from "@/constants/theme";
import type { ForestRow } from "@/schemas/analysis";
import { Marker, type MarkerShape } from "./marker";
import { linearScale, niceDomain } from "./scale";

export interface ForestPooled {
  estimate: number;
  ciLower: number;
  ciUpper: number;
  prediction: { lower: number; upper: number } | null;
}

/** One group of a grouped forest: its header, its rows (by `level`) and its subtotal diamond. */
export interface ForestGroup {
  level: string;
  label: string;
  k: number;
  estimate: number;
  ciLower: number;
  ciUpper: number;
  colour: string;
  shape: MarkerShape;
}

const rowHeight = 22;
const labelWidth = 104;
const axisHeight = 34;

type Line_ =
  | { kind: "header"; group: ForestGroup }
  | { kind: "row"; row: ForestRow; group: ForestGroup | null }
  | { kind: "subtotal"; group: ForestGroup }
  | { kind: "pooled" }
  | { kind: "prediction" };

const diamond = (x: (v: number) => number, lo: number, mid: number, hi: number, y: number, half: number) =>
  `M${x(lo)} ${y} L${x(mid)} ${y - half} L${x(hi)} ${y} L${x(mid)} ${y + half} Z`;

/**
 * Forest plot: each site-year's response and 95 % CI (marker sized by weight), the pooled estimate as a diamond, the
 * prediction interval for a new field as a bar with whiskers, and the zero line. With `groups`, the rows come in
 * blocks, each with a header naming the group and its k, its rows marked in the group's colour and shape, and its
 * subtotal diamond. Width follows the container, so it reads at 390 px; long lists grow downwards, never sideways.
 */
export function ForestPlot({
  rows,
  pooled,
  groups,
  format,
  unitLabel,
  summary,
}: {
  rows: ForestRow[];
  pooled: ForestPooled | null;
  groups?: ForestGroup[];
  format: (v: number) => string;
  unitLabel: string;
  summary: string;
}) {
  const [width, setWidth] = useState(280);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.max(260, Math.floor(e.nativeEvent.layout.width)));
  const lines: Line_[] = [];
  if (groups?.length) {
    for (const group of groups) {
      lines.push({ kind: "header", group });
      for (const row of rows) if (row.group === group.level) lines.push({ kind: "row", row, group });
      lines.push({ kind: "subtotal", group });
    }
    for (const row of rows) if (!groups.some((g) => g.level === row.group)) lines.push({ kind: "row", row, group: null });
  } else for (const row of rows) lines.push({ kind: "row", row, group: null });
  const firstPooled = lines.length;
  if (pooled) {
    lines.push({ kind: "pooled" });
    if (pooled.prediction) lines.push({ kind: "prediction" });
  }
  const height = lines.length * rowHeight + axisHeight + 8;
  const { domain, ticks } = niceDomain([
    ...rows.flatMap((r) => [r.ciLower, r.ciUpper]),
    ...(groups ?? []).flatMap((g) => [g.ciLower, g.ciUpper]),
    ...(pooled ? [pooled.ciLower, pooled.ciUpper, ...(pooled.prediction ? [pooled.prediction.lower, pooled.prediction.upper] : [])] : []),
  ]);
  const x = linearScale(domain, [labelWidth + 6, width - 10]);
  const maxWeight = Math.max(1, ...rows.map((r) => r.weightPercent));
  const plotBottom = lines.length * rowHeight + 4;
  const yOf = (i: number) => (i + 0.5) * rowHeight + (i >= firstPooled ? 4 : 0);
  return (
    <View onLayout={onLayout} role="img" aria-label={summary} testID="forest-plot" style={{ width: "100%" }}>
      <Svg width={width} height={height} aria-hidden>
        <Line x1={x(0)} x2={x(0)} y1={0} y2={plotBottom} stroke={colors.muted} strokeDasharray="4 3" strokeWidth={1} />
        {lines.map((line, i) => {
          const y = yOf(i);
          switch (line.kind) {
            case "header":
              return (
                <G key={`h-${line.group.level}`}>
                  {/* A rule, not a tinted band: group colours are chosen for 3:1 on the white card. */}
                  <Rect x={0} y={y - rowHeight / 2} width={width} height={rowHeight} fill={colors.card} />
                  <Line x1={0} x2={width} y1={y - rowHeight / 2} y2={y - rowHeight / 2} stroke={colors.line} />
                  <Marker x={9} y={y} size={4.5} shape={line.group.shape} fill={line.group.colour} />
                  <SvgText
                    x={20}
                    y={y + 4}
                    fontSize={12}
                    fontFamily={fonts.semibold}
                    fill={colors.ink}
                    data-group-header={line.group.level}
                  >
                    {`${line.group.label} · k = ${line.group.k}`}
                  </SvgText>
                </G>
              );
            case "row": {
              const r = line.row;
              const size = 2.5 + 4 * Math.sqrt(r.weightPercent / maxWeight);
              const colour = line.group?.colour ?? colors.fieldDark;
              return (
                <G key={r.id}>
                  <SvgText x={line.group ? 12 : 4} y={y + 4} fontSize={11} fontFamily={fonts.regular} fill={colors.ink}>
                    {r.siteYearCode}
                  </SvgText>
                  <Line x1={x(r.ciLower)} x2={x(r.ciUpper)} y1={y} y2={y} stroke={colors.ink} strokeWidth={1.5} />
                  {line.group ? (
                    <Marker
                      x={x(r.estimate)}
                      y={y}
                      size={size}
                      shape={line.group.shape}
                      fill={r.significant ? colour : colors.card}
                      stroke={colour}
                    />
                  ) : (
                    <Rect
                      x={x(r.estimate) - size}
                      y={y - size}
                      width={2 * size}
                      height={2 * size}
                      fill={r.significant ? colors.field : colors.card}
                      stroke={colors.fieldDark}
                      strokeWidth={1.5}
                    />
                  )}
                </G>
              );
            }
            case "subtotal":
              return (
                <G key={`s-${line.group.level}`}>
                  <SvgText
                    x={12}
                    y={y + 4}
                    fontSize={11}
                    fontFamily={fonts.semibold}
                    fill={colors.ink}
                  >{`Subtotal, k = ${line.group.k}`}</SvgText>
                  <Path
                    d={diamond(x, line.group.ciLower, line.group.estimate, line.group.ciUpper, y, 6)}
                    fill={line.group.colour}
                    stroke={colors.ink}
                    data-subtotal={line.group.level}
                    data-k={line.group.k}
                  />
                </G>
              );
            case "pooled":
              return (
                <G key="pooled">
                  <Line x1={0} x2={width} y1={y - rowHeight / 2 - 2} y2={y - rowHeight / 2 - 2} stroke={colors.line} />
                  <SvgText x={4} y={y + 4} fontSize={11} fontFamily={fonts.semibold} fill={colors.ink}>
                    {groups?.length ? "All, pooled (95 % CI)" : "Mean (95 % CI)"}
                  </SvgText>
                  <Path
                    d={diamond(x, pooled!.ciLower, pooled!.estimate, pooled!.ciUpper, y, 7)}
                    fill={colors.wheat}
                    stroke={colors.ink}
                    data-pooled="true"
                  />
                </G>
              );
            case "prediction": {
              const pi = pooled!.prediction!;
              return (
                <G key="prediction">
                  <SvgText x={4} y={y + 4} fontSize={11} fontFamily={fonts.semibold} fill={colors.ink}>
                    New field (PI)
                  </SvgText>
                  <Rect
                    x={x(pi.lower)}
                    y={y - 3}
                    width={Math.max(1, x(pi.upper) - x(pi.lower))}
                    height={6}
                    fill={colors.wheatTint}
                    stroke={colors.wheat}
                  />
                  <Line x1={x(pi.lower)} x2={x(pi.lower)} y1={y - 7} y2={y + 7} stroke={colors.wheat} strokeWidth={2} />
                  <Line x1={x(pi.upper)} x2={x(pi.upper)} y1={y - 7} y2={y + 7} stroke={colors.wheat} strokeWidth={2} />
                </G>
              );
            }
          }
        })}
        <Line x1={labelWidth + 6} x2={width - 10} y1={plotBottom} y2={plotBottom} stroke={colors.muted} />
        {ticks.map((t) => (
          <G key={t}>
            <Line x1={x(t)} x2={x(t)} y1={plotBottom} y2={plotBottom + 4} stroke={colors.muted} />
            <SvgText x={x(t)} y={plotBottom + 16} fontSize={11} fontFamily={fonts.regular} fill={colors.muted} textAnchor="middle">
              {format(t)}
            </SvgText>
          </G>
        ))}
        <SvgText x={width / 2} y={plotBottom + 30} fontSize={11} fontFamily={fonts.regular} fill={colors.muted} textAnchor="middle">
          {unitLabel} · filled = significant on its own
        </SvgText>
      </Svg>
    </View>
  );
}

import { useState } from "react";
import { View, type LayoutChangeEvent } from "react-native";
import Svg, { G, Line, Path, Rect, Text as SvgText } from "react-native-svg";
import { colors, fonts } from "@/constants/theme";
import type { ForestRow } from "@/schemas/analysis";
import { linearScale, niceDomain } from "./scale";

export interface ForestPooled {
  estimate: number;
  ciLower: number;
  ciUpper: number;
  prediction: { lower: number; upper: number } | null;
}

const rowHeight = 22;
const labelWidth = 104;
const axisHeight = 34;

/**
 * Forest plot: each site-year's response and 95 % CI (square sized by weight), the pooled estimate as a diamond, the
 * prediction interval for a new field as a bar with whiskers, and the zero line. Width follows the container, so it
 * reads at 390 px; long lists grow downwards, never sideways.
 */
export function ForestPlot({ rows, pooled, format, unitLabel, summary }: { rows: ForestRow[]; pooled: ForestPooled | null; format: (v: number) => string; unitLabel: string; summary: string }) {
  const [width, setWidth] = useState(280);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.max(260, Math.floor(e.nativeEvent.layout.width)));
  const extraRows = pooled ? (pooled.prediction ? 2 : 1) : 0;
  const height = (rows.length + extraRows) * rowHeight + axisHeight + 8;
  const { domain, ticks } = niceDomain([
    ...rows.flatMap((r) => [r.ciLower, r.ciUpper]),
    ...(pooled ? [pooled.ciLower, pooled.ciUpper, ...(pooled.prediction ? [pooled.prediction.lower, pooled.prediction.upper] : [])] : []),
  ]);
  const x = linearScale(domain, [labelWidth + 6, width - 10]);
  const maxWeight = Math.max(1, ...rows.map((r) => r.weightPercent));
  const plotBottom = (rows.length + extraRows) * rowHeight + 4;
  const pooledY = (rows.length + 0.5) * rowHeight + 4;
  return (
    <View onLayout={onLayout} role="img" aria-label={summary} testID="forest-plot" style={{ width: "100%" }}>
      <Svg width={width} height={height} aria-hidden>
        <Line x1={x(0)} x2={x(0)} y1={0} y2={plotBottom} stroke={colors.muted} strokeDasharray="4 3" strokeWidth={1} />
        {rows.map((r, i) => {
          const y = (i + 0.5) * rowHeight;
          const half = 2.5 + 4 * Math.sqrt(r.weightPercent / maxWeight);
          return (
            <G key={r.id}>
              <SvgText x={4} y={y + 4} fontSize={11} fontFamily={fonts.regular} fill={colors.ink}>
                {r.siteYearCode}
              </SvgText>
              <Line x1={x(r.ciLower)} x2={x(r.ciUpper)} y1={y} y2={y} stroke={colors.ink} strokeWidth={1.5} />
              <Rect x={x(r.estimate) - half} y={y - half} width={2 * half} height={2 * half} fill={r.significant ? colors.field : colors.card} stroke={colors.fieldDark} strokeWidth={1.5} />
            </G>
          );
        })}
        {pooled ? (
          <G>
            <Line x1={0} x2={width} y1={rows.length * rowHeight + 2} y2={rows.length * rowHeight + 2} stroke={colors.line} />
            <SvgText x={4} y={pooledY + 4} fontSize={11} fontFamily={fonts.semibold} fill={colors.ink}>Mean (95 % CI)</SvgText>
            <Path
              d={`M${x(pooled.ciLower)} ${pooledY} L${x(pooled.estimate)} ${pooledY - 7} L${x(pooled.ciUpper)} ${pooledY} L${x(pooled.estimate)} ${pooledY + 7} Z`}
              fill={colors.wheat}
              stroke={colors.ink}
            />
            {pooled.prediction ? (
              <G>
                <SvgText x={4} y={pooledY + rowHeight + 4} fontSize={11} fontFamily={fonts.semibold} fill={colors.ink}>New field (PI)</SvgText>
                <Rect x={x(pooled.prediction.lower)} y={pooledY + rowHeight - 3} width={Math.max(1, x(pooled.prediction.upper) - x(pooled.prediction.lower))} height={6} fill={colors.wheatTint} stroke={colors.wheat} />
                <Line x1={x(pooled.prediction.lower)} x2={x(pooled.prediction.lower)} y1={pooledY + rowHeight - 7} y2={pooledY + rowHeight + 7} stroke={colors.wheat} strokeWidth={2} />
                <Line x1={x(pooled.prediction.upper)} x2={x(pooled.prediction.upper)} y1={pooledY + rowHeight - 7} y2={pooledY + rowHeight + 7} stroke={colors.wheat} strokeWidth={2} />
              </G>
            ) : null}
          </G>
        ) : null}
        <Line x1={labelWidth + 6} x2={width - 10} y1={plotBottom} y2={plotBottom} stroke={colors.muted} />
        {ticks.map((t) => (
          <G key={t}>
            <Line x1={x(t)} x2={x(t)} y1={plotBottom} y2={plotBottom + 4} stroke={colors.muted} />
            <SvgText x={x(t)} y={plotBottom + 16} fontSize={11} fontFamily={fonts.regular} fill={colors.muted} textAnchor="middle">{format(t)}</SvgText>
          </G>
        ))}
        <SvgText x={width / 2} y={plotBottom + 30} fontSize={11} fontFamily={fonts.regular} fill={colors.muted} textAnchor="middle">
          {unitLabel} · filled = significant on its own
        </SvgText>
      </Svg>
    </View>
  );
}

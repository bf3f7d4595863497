import { useState } from "react";
import { StyleSheet, View, type LayoutChangeEvent } from "react-native";
import Svg, { G, Line, Polygon, Polyline, Text as SvgText } from "react-native-svg";
import { Text } from "@/components/ui/text";
import { colors, fonts, soilClassColors, space } from "@/constants/theme";
import type { ForestRow } from "@/schemas/analysis";
import { soilTestClasses, soilTestClassLabels } from "@/constants/vocabulary";
import { classShapes, Marker } from "./marker";
import { linearScale, niceDomain } from "./scale";

const height = 250;
const margin = { left: 48, right: 12, top: 10, bottom: 40 };

export interface ScatterPoint {
  id: string;
  x: number;
  y: number;
  shape: string;
  fill: string;
}

/** A fitted line over the x axis with its confidence band, and a level to mark on it (the critical soil-test level). */
export interface ScatterLine {
  points: { x: number; fitted: number; ciLower: number; ciUpper: number }[];
  criticalLevel: number | null;
}

export interface ScatterLegendItem {
  key: string;
  label: string;
  shape: string;
  fill: string;
}

/**
 * One response per marker against a value on the x axis, a dashed line at no response, and a legend of the markers;
 * with `line`, a fitted line, its 95 % band and a mark at its critical level.
 */
export function ScatterPlot({
  points,
  legend,
  xLabel,
  format,
  summary,
  testID,
  footnote,
  line,
}: {
  points: ScatterPoint[];
  legend: ScatterLegendItem[];
  xLabel: string;
  format: (v: number) => string;
  summary: string;
  testID: string;
  footnote?: string | null;
  line?: ScatterLine | null;
}) {
  const [width, setWidth] = useState(280);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.max(260, Math.floor(e.nativeEvent.layout.width)));
  const band = line?.points ?? [];
  const critical = line?.criticalLevel ?? null;
  const xs = niceDomain(
    [
      ...points.map((p) => p.x),
      ...band.map((b) => b.x),
      ...(critical !== null && critical < 2 * Math.max(...band.map((b) => b.x)) ? [critical] : []),
    ],
    false,
  );
  const ys = niceDomain([...points.map((p) => p.y), ...band.flatMap((b) => [b.ciLower, b.ciUpper])]);
  const x = linearScale(xs.domain, [margin.left, width - margin.right]);
  const y = linearScale(ys.domain, [height - margin.bottom, margin.top]);
  return (
    <View onLayout={onLayout} style={styles.box}>
      <View role="img" aria-label={summary} testID={testID}>
        <Svg width={width} height={height} aria-hidden>
          <Line x1={margin.left} x2={width - margin.right} y1={y(0)} y2={y(0)} stroke={colors.muted} strokeDasharray="4 3" />
          <Line x1={margin.left} x2={margin.left} y1={margin.top} y2={height - margin.bottom} stroke={colors.muted} />
          <Line x1={margin.left} x2={width - margin.right} y1={height - margin.bottom} y2={height - margin.bottom} stroke={colors.muted} />
          {ys.ticks.map((t) => (
            <SvgText
              key={`y${t}`}
              x={margin.left - 4}
              y={y(t) + 4}
              fontSize={11}
              fontFamily={fonts.regular}
              fill={colors.muted}
              textAnchor="end"
            >
              {format(t)}
            </SvgText>
          ))}
          {xs.ticks.map((t) => (
            <SvgText
              key={`x${t}`}
              x={x(t)}
              y={height - margin.bottom + 15}
              fontSize={11}
              fontFamily={fonts.regular}
              fill={colors.muted}
              textAnchor="middle"
            >
              {String(t)}
            </SvgText>
          ))}
          <SvgText
            x={(margin.left + width) / 2}
            y={height - 6}
            fontSize={11}
            fontFamily={fonts.regular}
            fill={colors.muted}
            textAnchor="middle"
          >
            {xLabel}
          </SvgText>
          {band.length > 1 ? (
            <G testID="soil-line">
              <Polygon
                points={[
                  ...band.map((b) => `${x(b.x)},${y(b.ciUpper)}`),
                  ...[...band].reverse().map((b) => `${x(b.x)},${y(b.ciLower)}`),
                ].join(" ")}
                fill={colors.field}
                fillOpacity={0.15}
              />
              <Polyline
                points={band.map((b) => `${x(b.x)},${y(b.fitted)}`).join(" ")}
                fill="none"
                stroke={colors.fieldDark}
                strokeWidth={2}
              />
              {critical !== null && x(critical) >= margin.left && x(critical) <= width - margin.right ? (
                <Line
                  x1={x(critical)}
                  x2={x(critical)}
                  y1={margin.top}
                  y2={height - margin.bottom}
                  stroke={colors.fieldDark}
                  strokeDasharray="2 3"
                />
              ) : null}
            </G>
          ) : null}
          <G>
            {points.map((p) => (
              <Marker key={p.id} x={x(p.x)} y={y(p.y)} size={5} shape={p.shape} fill={p.fill} />
            ))}
          </G>
        </Svg>
      </View>
      <View style={styles.legend} aria-label="Legend">
        {legend.map((l) => (
          <View key={l.key} style={styles.legendItem}>
            <Svg width={16} height={16} aria-hidden>
              <Marker x={8} y={8} size={5} shape={l.shape} fill={l.fill} />
            </Svg>
            <Text variant="caption">{l.label}</Text>
          </View>
        ))}
      </View>
      {footnote ? <Text variant="caption">{footnote}</Text> : null}
    </View>
  );
}

/**
 * Response against the soil-test value, one marker per site-year, coloured and shaped by soil-test class; with `line`,
 * the fitted meta-regression line, its 95 % band and a mark at the critical level.
 */
export function SoilTestScatter({
  rows,
  format,
  unitLabel,
  summary,
  line,
}: {
  rows: ForestRow[];
  format: (v: number) => string;
  unitLabel: string;
  summary: string;
  line?: ScatterLine | null;
}) {
  const points = rows.filter((r): r is ForestRow & { soilTestValue: number } => r.soilTestValue !== null);
  const analyte = points[0]?.soilTestAnalyte ?? "";
  const present = soilTestClasses.filter((c) => points.some((p) => p.soilTestClass === c));
  return (
    <ScatterPlot
      testID="soil-scatter"
      line={line}
      summary={summary}
      format={format}
      xLabel={`Soil-test ${analyte} (as reported) · response in ${unitLabel}`}
      points={points.map((p) => ({
        id: p.id,
        x: p.soilTestValue,
        y: p.estimate,
        shape: classShapes[p.soilTestClass ?? ""] ?? "circle",
        fill: soilClassColors[p.soilTestClass ?? ""] ?? colors.muted,
      }))}
      legend={present.map((c) => ({
        key: c,
        label: soilTestClassLabels[c],
        shape: classShapes[c] ?? "circle",
        fill: soilClassColors[c] ?? colors.muted,
      }))}
      footnote={
        points.length < rows.length ? `${rows.length - points.length} site-year(s) have no soil-test value and are not plotted.` : null
      }
    />
  );
}

const styles = StyleSheet.create({
  box: { width: "100%", gap: space.sm },
  legend: { flexDirection: "row", flexWrap: "wrap", gap: space.md },
  legendItem: { flexDirection: "row", alignItems: "center", gap: space.xs },
});

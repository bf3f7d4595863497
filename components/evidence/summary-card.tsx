import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import type { MetaAnalysisResponse, YieldUnit } from "@/schemas/analysis";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { formatInterval, formatPercent, formatResponse, lnrrAsPercent, unitLabel } from "./format";

/** The headline: mean response with its CI, the range for a new field, k, heterogeneity and own-trial significance. */
export function SummaryCard({
  result,
  units,
  onUnits,
}: {
  result: MetaAnalysisResponse;
  units: YieldUnit;
  onUnits: (u: YieldUnit) => void;
}) {
  const { pooled, heterogeneity, decision, provenance } = result;
  const u = result.units;
  const lnrr = result.effect === "lnrr";
  const isYield = result.measure.name === "yield";
  const title = isYield ? "Mean yield response" : `Mean ${result.measure.title.toLowerCase()} response`;
  return (
    <Card testID="summary-card" aria-label="Summary">
      <View style={styles.head}>
        <Text variant="heading" testID="summary-title">
          {title}
        </Text>
        {!isYield ? (
          <Text variant="caption" testID="measure-unit">
            Treated − check, in {result.measure.unit}
            {result.measure.scale ? ` (${result.measure.scale})` : ""}; {result.measure.better} is better.
          </Text>
        ) : null}
        {!lnrr && isYield ? (
          <ChoiceChips
            label="Units"
            testID="units-toggle"
            choices={[
              { value: "bu/ac", label: "bu/ac" },
              { value: "kg/ha", label: "kg/ha" },
            ]}
            selected={[units]}
            onToggle={(v) => onUnits(v as YieldUnit)}
          />
        ) : null}
      </View>
      {pooled ? (
        <>
          <Text
            variant="number"
            testID="pooled-estimate"
            accessibilityLabel={`Mean response ${formatResponse(pooled.estimate, u)} ${unitLabel(u)}`}
          >
            {formatResponse(pooled.estimate, u)} <Text style={styles.unit}>{unitLabel(u)}</Text>
            {lnrr ? <Text style={styles.unit}> ({lnrrAsPercent(pooled.estimate)})</Text> : null}
          </Text>
          <Text testID="pooled-ci">
            95 % CI {formatInterval(pooled.ciLower, pooled.ciUpper, u)} {unitLabel(u)} ({pooled.ciMethod === "hksj" ? "HKSJ" : "Wald"})
          </Text>
          <Text testID="prediction-interval">
            {pooled.predictionInterval
              ? `A new field: 95 % of site-years like these would respond by ${formatInterval(pooled.predictionInterval.lower, pooled.predictionInterval.upper, u)} ${unitLabel(u)}.`
              : "A new field: too few site-years for a prediction interval (needs 3 or more)."}
          </Text>
        </>
      ) : (
        <Text testID="pooled-estimate">No estimate</Text>
      )}
      <Text variant="label" testID="k-site-years">
        {result.k} site-year{result.k === 1 ? "" : "s"} from {provenance.datasets} dataset{provenance.datasets === 1 ? "" : "s"}
      </Text>
      {heterogeneity ? (
        <View style={styles.block} testID="heterogeneity">
          <Text>{heterogeneity.plainWords}</Text>
          <Text variant="caption">
            I² = {heterogeneity.i2Percent === null ? "–" : `${heterogeneity.i2Percent.toFixed(0)} %`} · τ ={" "}
            {lnrr ? heterogeneity.tau.toFixed(3) : `${formatResponse(heterogeneity.tau, u).replace("+", "")} ${unitLabel(u)}`} · Q ={" "}
            {heterogeneity.q.toFixed(1)} on {heterogeneity.df} df
          </Text>
        </View>
      ) : null}
      <Text testID="share-significant">
        {decision.shareSignificant === null
          ? "No site-year could be tested on its own."
          : `${formatPercent(decision.shareSignificant)} of site-years (${decision.significantCount} of ${result.k}) responded significantly in their own trial (p < 0.05).`}
      </Text>
      {result.notes.length ? (
        <View style={styles.notes} testID="analysis-notes">
          {result.notes.map((n) => (
            <Text key={n} variant="caption">
              • {n}
            </Text>
          ))}
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.sm },
  unit: { fontSize: 16, color: colors.muted },
  block: { gap: space.xs },
  notes: { gap: 2, paddingTop: space.xs, borderTopWidth: 1, borderTopColor: colors.line },
});

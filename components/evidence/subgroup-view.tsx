import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import Svg from "react-native-svg";
import { Marker } from "@/components/charts/marker";
import { space } from "@/constants/theme";
import type { Prices } from "@/lib/share-link";
import { groupings, type Grouping, type MetaAnalysisResponse } from "@/schemas/analysis";
import { placementLabels, soilTestClassLabels } from "@/constants/vocabulary";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { pricedDecision } from "@/stats/decision";
import { formatInterval, formatPercent, formatResponse, levelLabel, unitLabel } from "./format";
import { groupStyles, type GroupStyle } from "./group-style";

const groupingLabels: Record<Grouping, string> = {
  soilTestClass: "Soil-test class",
  placement: "Placement",
  nutrient: "Nutrient",
  crop: "Crop",
  tillage: "Tillage",
  plantingWindow: "Planting window",
  dataset: "Dataset",
};

export const levelLabels: Record<string, string> = { ...soilTestClassLabels, ...placementLabels };

/** A level's marker, drawn as in the forest plot (the same colour and shape), for legends and lists. */
function GroupMarker({ style, level, size = 16 }: { style: GroupStyle; level: string; size?: number }) {
  return (
    <View testID={`group-marker-${level}`} aria-hidden>
      <Svg width={size} height={size}>
        <Marker x={size / 2} y={size / 2} size={size / 3.2} shape={style.shape} fill={style.colour} />
      </Svg>
    </View>
  );
}

/**
 * One estimate per level (by soil-test class unless another grouping is chosen), with the between-group test, each
 * level marked with its colour and shape and given its own decision numbers: the chance that a new site-year of that
 * level gains, or beats the break-even at the prices typed (computed here), beside the share observed.
 */
export function SubgroupView({
  result,
  groupBy,
  onGroupBy,
  prices,
}: {
  result: MetaAnalysisResponse;
  groupBy: Grouping;
  onGroupBy: (g: Grouping) => void;
  prices: Prices;
}) {
  const s = result.subgroups;
  const u = result.units;
  const styleOf = groupStyles(groupBy, s?.levels.map((l) => l.level) ?? []);
  const unitsPerBushel = result.decision.breakEvenUnitsPerBushel;
  return (
    <Card testID="subgroup-view">
      <Text variant="heading">By {groupingLabels[groupBy].toLowerCase()}</Text>
      <ChoiceChips
        label="Compare by"
        testID="group-by"
        choices={groupings.map((g) => ({ value: g, label: groupingLabels[g] }))}
        selected={[groupBy]}
        onToggle={onGroupBy}
      />
      {s && s.levels.length ? (
        <View style={styles.levels}>
          {s.levels.map((l) => {
            const local = pricedDecision(prices, { unitsPerBushel, predictive: l.predictive, observedResponses: l.observedResponses });
            const label = levelLabel(l.level, levelLabels);
            return (
              <View key={l.level} style={styles.level} testID={`subgroup-${l.level}`}>
                <View style={styles.swatch}>
                  <GroupMarker style={styleOf.get(l.level)!} level={l.level} />
                </View>
                <View style={styles.levelText}>
                  <Text variant="subheading">
                    {label} · {l.k} site-year{l.k === 1 ? "" : "s"}
                  </Text>
                  <Text>
                    {formatResponse(l.estimate, u)} {unitLabel(u)} (95 % CI {formatInterval(l.ciLower, l.ciUpper, u)})
                  </Text>
                  <Text variant="caption" testID={`subgroup-chance-${l.level}`}>
                    {local.breakEven !== null
                      ? `Beats the break-even on a new site-year: ${formatPercent(local.probabilityAboveBreakEven)} (observed ${formatPercent(local.shareAboveBreakEven)} of these site-years). `
                      : ""}
                    Any gain on a new site-year: {formatPercent(l.probabilityAboveZero)} (observed {formatPercent(l.shareAboveZero)}).
                  </Text>
                </View>
              </View>
            );
          })}
          <Text testID="subgroup-test">
            {s.betweenGroupTest
              ? `Do the groups differ? ${s.betweenGroupTest.text}${s.betweenGroupTest.pValue < 0.05 ? ": yes, beyond chance." : ": not clearly."}`
              : "Only one group: nothing to compare."}
          </Text>
          <Text variant="caption">{s.model}</Text>
          <Text variant="caption">
            Each group's chance uses its own mean with the spread between site-years shared by all groups (
            {s.levels.some((l) => l.predictive?.df === null)
              ? "normal, as the Wald option asks"
              : "t with k − p df, p the number of groups"}
            ).
          </Text>
          {s.notes.map((n) => (
            <Text key={n} variant="caption">
              • {n}
            </Text>
          ))}
        </View>
      ) : (
        <Text variant="caption">No groups to show.</Text>
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  levels: { gap: space.md },
  level: { flexDirection: "row", gap: space.sm, alignItems: "flex-start" },
  swatch: { width: 16, height: 16, marginTop: 3 },
  levelText: { flex: 1, gap: 2 },
});

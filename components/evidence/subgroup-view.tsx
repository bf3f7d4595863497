import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, soilClassColors, space } from "@/constants/theme";
import { groupings, type Grouping, type MetaAnalysisResponse } from "@/schemas/analysis";
import { placementLabels, soilTestClassLabels } from "@/schemas/filters";
import { ChoiceChips } from "./choice-chips";
import { formatInterval, formatResponse, levelLabel, unitLabel } from "./format";

export const groupingLabels: Record<Grouping, string> = {
  soilTestClass: "Soil-test class",
  placement: "Placement",
  nutrient: "Nutrient",
  crop: "Crop",
  tillage: "Tillage",
  plantingWindow: "Planting window",
  dataset: "Dataset",
};

const levelLabels: Record<string, string> = { ...soilTestClassLabels, ...placementLabels };

/** One estimate per level (by soil-test class unless another grouping is chosen), with the between-group test. */
export function SubgroupView({ result, groupBy, onGroupBy }: { result: MetaAnalysisResponse; groupBy: Grouping; onGroupBy: (g: Grouping) => void }) {
  const s = result.subgroups;
  const u = result.units;
  return (
    <Card testID="subgroup-view">
      <Text variant="heading">By {groupingLabels[groupBy].toLowerCase()}</Text>
      <ChoiceChips label="Compare by" testID="group-by" choices={groupings.map((g) => ({ value: g, label: groupingLabels[g] }))} selected={[groupBy]} onToggle={onGroupBy} />
      {s && s.levels.length ? (
        <View style={styles.levels}>
          {s.levels.map((l) => (
            <View key={l.level} style={styles.level} testID={`subgroup-${l.level}`}>
              <View style={[styles.swatch, { backgroundColor: soilClassColors[l.level] ?? colors.field }]} aria-hidden />
              <View style={styles.levelText}>
                <Text variant="subheading">{levelLabel(l.level, levelLabels)} · {l.k} site-year{l.k === 1 ? "" : "s"}</Text>
                <Text>
                  {formatResponse(l.estimate, u)} {unitLabel(u)} (95 % CI {formatInterval(l.ciLower, l.ciUpper, u)})
                </Text>
              </View>
            </View>
          ))}
          <Text testID="subgroup-test">
            {s.betweenGroupTest
              ? `Do the groups differ? ${s.betweenGroupTest.text}${s.betweenGroupTest.pValue < 0.05 ? ": yes, beyond chance." : ": not clearly."}`
              : "Only one group: nothing to compare."}
          </Text>
          <Text variant="caption">{s.model}</Text>
          {s.notes.map((n) => (
            <Text key={n} variant="caption">• {n}</Text>
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
  swatch: { width: 12, height: 12, borderRadius: 6, marginTop: 5 },
  levelText: { flex: 1, gap: 2 },
});

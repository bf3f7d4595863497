import { Link } from "expo-router";
import { Pressable, StyleSheet, View } from "react-native";
import { space } from "@/constants/theme";
import type { DatasetSummary } from "@/schemas/dataset";
import { Card } from "./ui/card";
import { Text } from "./ui/text";

export function DatasetCard({ dataset }: { dataset: DatasetSummary }) {
  const years = dataset.yearFrom && dataset.yearTo ? `${dataset.yearFrom}–${dataset.yearTo}` : "no seasons yet";
  return (
    <Link href={`/datasets/${dataset.slug}`} asChild>
      <Pressable role="link">
        <Card>
          <Text variant="heading">{dataset.title}</Text>
          <View style={styles.meta}>
            <Text variant="label">{dataset.crops.join(", ")}</Text>
            <Text variant="label">
              {dataset.siteYears} site-years · {years}
            </Text>
            <Text variant="label">
              v{dataset.latestVersion} · {dataset.licence}
            </Text>
          </View>
          <Text numberOfLines={3}>{dataset.description}</Text>
        </Card>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  meta: { flexDirection: "row", flexWrap: "wrap", columnGap: space.lg, rowGap: space.xs },
});

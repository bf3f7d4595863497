import { Link } from "expo-router";
import { Pressable, StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";
import type { CurationDataset } from "@/schemas/curation";
import { versionStateLabels } from "@/constants/vocabulary";
import { StateBadge } from "./state-badge";

/** A dataset on the workbench: its newest version's state first, then the rest of its history in one line. */
export function CurationDatasetCard({ dataset }: { dataset: CurationDataset }) {
  const [newest, ...older] = dataset.versions;
  return (
    <Link href={`/curate/datasets/${dataset.slug}`} asChild>
      <Pressable role="link">
        <Card>
          <View style={styles.head}>
            <Text variant="heading" aria-level={3} style={styles.title}>
              {dataset.title}
            </Text>
            {newest ? <StateBadge state={newest.state} /> : null}
          </View>
          <Text variant="label">
            {dataset.slug} · {dataset.crops.join(", ")} · {dataset.region}
          </Text>
          <Text variant="caption">
            {newest ? `v${newest.semver} ${versionStateLabels[newest.state].toLowerCase()}` : "No versions yet"}
            {older.length ? ` · earlier: ${older.map((v) => `v${v.semver} ${versionStateLabels[v.state].toLowerCase()}`).join(", ")}` : ""}
            {dataset.canEdit ? "" : " · view only"}
          </Text>
        </Card>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  head: { flexDirection: "row", alignItems: "center", gap: space.sm, flexWrap: "wrap" },
  title: { flexShrink: 1 },
});

import { Link } from "expo-router";
import { Pressable, StyleSheet, View } from "react-native";
import { EmptyState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, minTap, space } from "@/constants/theme";
import type { VersionBrief } from "@/schemas/curation";
import { formatDay } from "./format";
import { StateBadge } from "./state-badge";

/** Versions newest first, each with its state, dates and changelog, on a vertical line. */
export function VersionTimeline({ versions }: { versions: VersionBrief[] }) {
  if (versions.length === 0) return <EmptyState title="No versions yet" hint="Start version 1.0.0 to upload the first data." />;
  return (
    <View role="list" accessibilityLabel="Versions" style={styles.list}>
      {versions.map((v) => (
        <View key={v.id} role="listitem" style={styles.item}>
          <View style={[styles.dot, v.state === "published" && styles.dotOn, v.state === "withdrawn" && styles.dotOff]} />
          <Link href={`/curate/versions/${v.id}`} asChild>
            <Pressable role="link" style={styles.body}>
              <View style={styles.head}>
                <Text variant="subheading">v{v.semver}</Text>
                <StateBadge state={v.state} />
              </View>
              <Text variant="caption">
                Started {formatDay(v.createdAt)}
                {v.submittedAt ? ` · submitted ${formatDay(v.submittedAt)}` : ""}
                {v.publishedAt ? ` · published ${formatDay(v.publishedAt)}` : ""}
                {v.withdrawnAt ? ` · withdrawn ${formatDay(v.withdrawnAt)}` : ""}
              </Text>
              {v.changelog ? <Text numberOfLines={3}>{v.changelog}</Text> : <Text variant="caption">No changelog yet.</Text>}
            </Pressable>
          </Link>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: 0, borderLeftWidth: 2, borderLeftColor: colors.line, marginLeft: 6 },
  item: { flexDirection: "row", gap: space.md, paddingBottom: space.lg },
  dot: {
    width: 12,
    height: 12,
    borderRadius: 6,
    backgroundColor: colors.card,
    borderWidth: 2,
    borderColor: colors.muted,
    marginLeft: -7,
    marginTop: 6,
  },
  dotOn: { backgroundColor: colors.field, borderColor: colors.field },
  dotOff: { backgroundColor: colors.danger, borderColor: colors.danger },
  body: { flex: 1, gap: space.xs, minHeight: minTap },
  head: { flexDirection: "row", alignItems: "center", gap: space.sm, flexWrap: "wrap" },
});

import { Link } from "expo-router";
import { Pressable, StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, minTap, space } from "@/constants/theme";
import { useFollowMutation, useFollowsQuery } from "@/hooks/use-account";

export function FollowedDatasets() {
  const follows = useFollowsQuery();
  const toggle = useFollowMutation();
  return (
    <Card>
      <Text variant="heading">Datasets you follow</Text>
      <Text variant="caption">You get an e-mail when a new version of one of these is published.</Text>
      {follows.isPending ? (
        <LoadingState label="Loading followed datasets…" />
      ) : follows.isError ? (
        <ErrorState error={follows.error} onRetry={() => follows.refetch()} />
      ) : follows.data.items.length === 0 ? (
        <EmptyState title="Not following any dataset" hint="Open a dataset and choose Follow to hear about its new versions." />
      ) : (
        follows.data.items.map((d) => (
          <View key={d.slug} style={styles.row}>
            <Link href={`/datasets/${d.slug}`} asChild>
              <Pressable role="link" style={styles.title}>
                <Text variant="subheading" style={{ color: colors.fieldDark }}>
                  {d.title}
                </Text>
                <Text variant="caption">{d.latestVersion ? `Latest version ${d.latestVersion}` : "No published version"}</Text>
              </Pressable>
            </Link>
            <Button
              label="Stop following"
              accessibilityLabel={`Stop following ${d.title}`}
              tone="quiet"
              busy={toggle.isPending && toggle.variables?.slug === d.slug}
              onPress={() => toggle.mutate({ slug: d.slug, follow: false })}
            />
          </View>
        ))
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: "row", alignItems: "center", gap: space.sm, borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.sm },
  title: { flex: 1, minHeight: minTap, justifyContent: "center" },
});

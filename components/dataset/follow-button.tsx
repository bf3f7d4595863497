import { Link } from "expo-router";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, space } from "@/constants/theme";
import { useFollowMutation, useFollowsQuery } from "@/hooks/use-account";
import { useSession } from "@/hooks/use-session";

/**
 * Follow a dataset to get an e-mail when a new version is published. Visitors are offered sign-in (and come back
 * here after it); signed-in users toggle, and the account screen lists what they follow.
 */
export function FollowButton({ slug, title }: { slug: string; title: string }) {
  const session = useSession();
  const signedIn = !!session.data;
  const follows = useFollowsQuery(signedIn);
  const toggle = useFollowMutation();
  if (session.isPending) return null;
  if (!signedIn) {
    return (
      <Link
        href={`/sign-in?next=${encodeURIComponent(`/datasets/${slug}`)}`}
        style={styles.link}
        accessibilityLabel={`Sign in to follow new versions of ${title}`}
      >
        Sign in to follow new versions
      </Link>
    );
  }
  const following = follows.data?.items.some((d) => d.slug === slug) ?? false;
  return (
    <View style={styles.row}>
      <Button
        label={following ? "Stop following" : "Follow"}
        accessibilityLabel={following ? `Stop following ${title}` : `Follow ${title}`}
        tone={following ? "quiet" : "secondary"}
        busy={toggle.isPending || follows.isPending}
        onPress={() => toggle.mutate({ slug, follow: !following })}
        testID="follow-dataset"
      />
      <Text variant="caption" style={styles.hint} role="status">
        {toggle.isError
          ? `Could not change that: ${toggle.error.message}`
          : following
            ? "You get an e-mail when a new version is published."
            : "Get an e-mail when a new version is published."}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: "row", alignItems: "center", gap: space.sm, flexWrap: "wrap" },
  hint: { flexShrink: 1, minWidth: 160 },
  link: { minHeight: minTap, paddingVertical: 11, color: colors.info, fontFamily: fonts.medium, textDecorationLine: "underline" },
});

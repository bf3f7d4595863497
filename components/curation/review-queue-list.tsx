import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";
import { useReviewQueue } from "@/hooks/use-review-queue";
import { formatDay } from "./format";
import { LinkButton } from "./link-button";

/** Versions waiting for a reviewer, oldest submission first. */
export function ReviewQueueList() {
  const queue = useReviewQueue();
  if (queue.isPending) return <LoadingState label="Loading the review queue…" />;
  if (queue.isError) return <ErrorState error={queue.error} onRetry={() => queue.refetch()} />;
  if (queue.data.items.length === 0) return <EmptyState title="Nothing waiting for review" hint="Submitted versions appear here." />;
  return (
    <View style={styles.list} role="list" accessibilityLabel="Review queue">
      {queue.data.items.map((item) => (
        <Card key={item.versionId} role="listitem">
          <Text variant="subheading">
            {item.datasetTitle} · v{item.semver}
          </Text>
          <Text variant="caption">
            Submitted {formatDay(item.submittedAt)}
            {item.submittedByName ? ` by ${item.submittedByName}` : ""}
            {item.canApprove ? "" : " · you made or submitted it, so another reviewer approves it"}
          </Text>
          <Text numberOfLines={3}>{item.changelog}</Text>
          <LinkButton
            href={`/curate/versions/${item.versionId}`}
            label="Review"
            accessibilityLabel={`Review ${item.datasetTitle} version ${item.semver}`}
          />
        </Card>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({ list: { gap: space.md } });

import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { useFailedJobsQuery, useRetryJobMutation } from "@/hooks/use-account";
import type { FailedJobEntry } from "@/schemas/account";

const taskNames: Record<FailedJobEntry["task"], string> = {
  "doi-register": "DOI registration",
  "mail-deliver": "Mail delivery",
};

/** Background work that gave up: what it was for, the last error, and a way to send it round again. */
export function FailedJobs() {
  const jobs = useFailedJobsQuery();
  const retry = useRetryJobMutation();
  return (
    <Card>
      <Text variant="heading">Stalled background work</Text>
      <Text variant="caption">
        DOI registrations and mail deliveries that failed on every attempt. Fix the cause (the DOI service, the mail server), then try
        again.
      </Text>
      {jobs.isPending ? (
        <LoadingState label="Loading stalled work…" />
      ) : jobs.isError ? (
        <ErrorState error={jobs.error} onRetry={() => jobs.refetch()} />
      ) : jobs.data.items.length === 0 ? (
        <EmptyState title="Nothing stalled" />
      ) : (
        jobs.data.items.map((j) => (
          <View key={j.id} style={styles.row}>
            <Text>{`${taskNames[j.task]} · ${j.key ?? "no key"}`}</Text>
            <Text variant="caption">{`${j.attempts} of ${j.maxAttempts} attempts · gave up ${new Date(j.failedAt).toLocaleString()}`}</Text>
            {j.lastError ? <Text variant="caption">{`Last error: ${j.lastError}`}</Text> : null}
            <Button
              label="Try again"
              tone="secondary"
              accessibilityLabel={`Try ${taskNames[j.task]} ${j.key ?? j.id} again`}
              busy={retry.isPending && retry.variables === j.id}
              onPress={() => retry.mutate(j.id)}
            />
          </View>
        ))
      )}
      {retry.isError ? <ErrorState error={retry.error} /> : null}
    </Card>
  );
}

const styles = StyleSheet.create({ row: { borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.sm, gap: space.xs } });

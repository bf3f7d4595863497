import { useQuery } from "@tanstack/react-query";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, fonts, space } from "@/constants/theme";
import { useRequeueDoiMutation, versionQuery } from "@/hooks/use-curation-versions";
import type { DoiRegistration, VersionDetail } from "@/schemas/curation";
import { serverFieldIssues } from "./field-issues";

/** While a registration is pending the desk asks again now and then, so the card turns to "registered" by itself. */
const pendingPollMs = 4000;

const headline = (r: DoiRegistration): { text: string; color: string } => {
  if (r.status === "registered") return { text: "Registered", color: colors.fieldDark };
  if (r.status === "failed") return { text: "Refused by the DOI service", color: colors.danger };
  if (r.status === "pending")
    return { text: r.doi ? "Registered; a metadata update is waiting" : "Waiting for the DOI service", color: colors.wheatText };
  return { text: "Not registered: no DOI service is set up", color: colors.muted };
};

/**
 * Where this version's DOI stands, for the dataset's editors and reviewers (the server sends the registration only
 * to them): registered, waiting, or refused with what the service said; a refused or waiting registration can be
 * sent again at once.
 */
export function DoiStatusCard({ version }: { version: VersionDetail }) {
  const r = version.doiRegistration;
  const requeue = useRequeueDoiMutation(version.id);
  useQuery({
    ...versionQuery(version.id),
    enabled: r?.status === "pending",
    refetchInterval: r?.status === "pending" ? pendingPollMs : false,
  });
  if (!r) return null;
  const { text, color } = headline(r);
  const problem = requeue.isError ? (serverFieldIssues(requeue.error)[""] ?? "The request failed.") : null;
  return (
    <Card testID="doi-status" accessibilityLabel="DOI registration">
      <Text variant="heading">DOI</Text>
      <Text role="status" style={[styles.state, { color }]}>
        {text}
      </Text>
      <Text variant="caption" selectable>
        {r.doi ? `https://doi.org/${r.doi}` : `Will be registered as ${r.intendedDoi}`}
        {r.attempts ? ` · ${r.attempts} ${r.attempts === 1 ? "attempt" : "attempts"}` : ""}
      </Text>
      {r.lastError && r.status !== "registered" ? (
        <View style={[styles.reason, r.status === "failed" ? styles.refused : styles.waiting]} testID="doi-last-error">
          <Text variant="subheading">{r.status === "failed" ? "What the service said" : "Last attempt"}</Text>
          <Text selectable>{r.lastError}</Text>
        </View>
      ) : null}
      {r.status === "pending" && !r.lastError ? (
        <Text variant="caption">Registration runs in the background; this card updates when it is done.</Text>
      ) : null}
      {r.canRequeue ? (
        <Button
          label="Send to the DOI service again"
          tone="secondary"
          busy={requeue.isPending}
          onPress={() => requeue.mutate()}
          style={styles.left}
        />
      ) : null}
      {problem ? (
        <Text role="alert" style={{ color: colors.danger }}>
          {problem}
        </Text>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  state: { fontFamily: fonts.semibold },
  reason: { padding: space.md, borderRadius: 10, gap: space.xs },
  refused: { backgroundColor: colors.dangerTint },
  waiting: { backgroundColor: colors.wheatTint },
  left: { alignSelf: "flex-start" },
});

import { StyleSheet, View } from "react-native";
import { CurationDatasetCard } from "@/components/curation/curation-dataset-card";
import { LinkButton } from "@/components/curation/link-button";
import { ReviewQueueList } from "@/components/curation/review-queue-list";
import { WorkbenchGate } from "@/components/curation/workbench-gate";
import { Screen } from "@/components/screen";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";
import { useMyDatasets } from "@/hooks/use-curation-datasets";
import type { SessionUser } from "@/hooks/use-session";

function MyDatasets({ user }: { user: SessionUser }) {
  const list = useMyDatasets();
  const curates = user.role === "curator" || user.role === "admin";
  return (
    <View style={styles.section}>
      <View style={styles.head}>
        <Text variant="heading">{curates ? "My datasets" : "Datasets"}</Text>
        {curates ? <LinkButton href="/curate/new" label="New dataset" tone="primary" /> : null}
      </View>
      {list.isPending ? (
        <LoadingState label="Loading your datasets…" />
      ) : list.isError ? (
        <ErrorState error={list.error} onRetry={() => list.refetch()} />
      ) : list.data.items.length === 0 ? (
        <EmptyState
          title="No datasets yet"
          hint={
            curates ? "Create a dataset, then upload its sites, site-years and plots." : "Datasets appear here once curators create them."
          }
        />
      ) : (
        <View style={styles.list}>
          {list.data.items.map((d) => (
            <CurationDatasetCard key={d.id} dataset={d} />
          ))}
        </View>
      )}
    </View>
  );
}

export default function WorkbenchScreen() {
  return (
    <Screen title="Workbench" subtitle="Prepare dataset versions, check uploads against the data dictionary, and take them through review.">
      <WorkbenchGate>
        {(user) => (
          <>
            {user.role === "reviewer" || user.role === "admin" ? (
              <View style={styles.section}>
                <Text variant="heading">Waiting for review</Text>
                <ReviewQueueList />
              </View>
            ) : null}
            <MyDatasets user={user} />
          </>
        )}
      </WorkbenchGate>
    </Screen>
  );
}

const styles = StyleSheet.create({
  section: { gap: space.md },
  head: { flexDirection: "row", alignItems: "center", justifyContent: "space-between", flexWrap: "wrap", gap: space.sm },
  list: { gap: space.md },
});

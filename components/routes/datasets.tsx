import { View } from "react-native";
import { DatasetCard } from "@/components/dataset-card";
import { Screen } from "@/components/screen";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { space } from "@/constants/theme";
import { useDatasetList } from "@/hooks/use-datasets";

export default function DatasetsScreen() {
  const datasets = useDatasetList();
  return (
    <Screen title="Datasets" subtitle="Published, versioned fertilizer trials. Every figure cites the version it came from.">
      {datasets.isPending ? (
        <LoadingState label="Loading the datasets…" />
      ) : datasets.isError ? (
        <ErrorState error={datasets.error} onRetry={() => datasets.refetch()} />
      ) : datasets.data.items.length === 0 ? (
        <EmptyState title="No published datasets yet" hint="When a curator publishes a trial dataset, it appears here." />
      ) : (
        <View style={{ gap: space.md }}>
          {datasets.data.items.map((d) => (
            <DatasetCard key={d.id} dataset={d} />
          ))}
        </View>
      )}
    </Screen>
  );
}

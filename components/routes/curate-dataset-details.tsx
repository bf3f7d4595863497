import { useLocalSearchParams, useRouter } from "expo-router";
import { DatasetForm } from "@/components/curation/dataset-form";
import { WorkbenchGate } from "@/components/curation/workbench-gate";
import { Screen } from "@/components/screen";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { useCurationDataset, useUpdateDatasetMutation } from "@/hooks/use-curation-datasets";

export default function DatasetDetailsScreen() {
  const { slug } = useLocalSearchParams<{ slug: string }>();
  const router = useRouter();
  const dataset = useCurationDataset(slug);
  const update = useUpdateDatasetMutation(slug);
  return (
    <Screen
      title="Dataset details"
      subtitle="Published versions keep the details they were published with; changes apply to the next one."
      maxWidth={860}
    >
      <WorkbenchGate>
        {() =>
          dataset.isPending ? (
            <LoadingState label="Loading the dataset…" />
          ) : dataset.isError ? (
            <ErrorState error={dataset.error} onRetry={() => dataset.refetch()} />
          ) : (
            <DatasetForm
              dataset={dataset.data}
              submitLabel="Save details"
              busy={update.isPending}
              onSubmit={async ({ slug: _slug, ...patch }) => {
                await update.mutateAsync(patch);
                router.replace(`/curate/datasets/${slug}`);
              }}
            />
          )
        }
      </WorkbenchGate>
    </Screen>
  );
}

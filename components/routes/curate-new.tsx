import { useRouter } from "expo-router";
import { DatasetForm } from "@/components/curation/dataset-form";
import { WorkbenchGate } from "@/components/curation/workbench-gate";
import { Screen } from "@/components/screen";
import { useCreateDatasetMutation } from "@/hooks/use-curation-datasets";

export default function NewDatasetScreen() {
  const router = useRouter();
  const create = useCreateDatasetMutation();
  return (
    <Screen title="New dataset" subtitle="Describe the trials; you upload the data into its first version next." maxWidth={860}>
      <WorkbenchGate>
        {() => (
          <DatasetForm
            dataset={null}
            submitLabel="Create dataset"
            busy={create.isPending}
            onSubmit={async (body) => {
              const dataset = await create.mutateAsync(body);
              router.replace(`/curate/datasets/${dataset.slug}`);
            }}
          />
        )}
      </WorkbenchGate>
    </Screen>
  );
}

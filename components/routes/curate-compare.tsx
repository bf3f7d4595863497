import { useLocalSearchParams, useRouter } from "expo-router";
import { View } from "react-native";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { VersionDiffView } from "@/components/curation/version-diff-view";
import { WorkbenchGate } from "@/components/curation/workbench-gate";
import { Screen } from "@/components/screen";
import { Card } from "@/components/ui/card";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { space } from "@/constants/theme";
import { useCurationDataset } from "@/hooks/use-curation-datasets";

function Compare({ slug, from, to }: { slug: string; from?: string; to?: string }) {
  const router = useRouter();
  const dataset = useCurationDataset(slug);
  if (dataset.isPending) return <LoadingState label="Loading the versions…" />;
  if (dataset.isError) return <ErrorState error={dataset.error} onRetry={() => dataset.refetch()} />;
  const versions = dataset.data.versions;
  // Newest first: by default compare the previous version to the newest.
  const toId = to ?? versions[0]?.id;
  const fromId = from ?? versions[1]?.id;
  const options = versions.map((v) => ({ value: v.id, label: `v${v.semver}` }));
  const pick = (key: "from" | "to", id: string) => router.setParams({ [key]: id, ...(key === "from" ? { to: toId } : { from: fromId }) });
  return (
    <View style={{ gap: space.lg }}>
      <Card>
        <ChoiceChips label="Compare from" choices={options} selected={fromId ? [fromId] : []} onToggle={(id) => pick("from", id)} />
        <ChoiceChips label="To" choices={options} selected={toId ? [toId] : []} onToggle={(id) => pick("to", id)} />
      </Card>
      <VersionDiffView from={fromId} to={toId} />
    </View>
  );
}

export default function CompareScreen() {
  const { dataset, from, to } = useLocalSearchParams<{ dataset: string; from?: string; to?: string }>();
  return (
    <Screen
      title="Compare versions"
      subtitle="Site-years, rows and dictionary fields that changed, and the version number that follows from them."
    >
      <WorkbenchGate>{() => <Compare slug={dataset ?? ""} from={from} to={to} />}</WorkbenchGate>
    </Screen>
  );
}

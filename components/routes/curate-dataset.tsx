import { useLocalSearchParams, useRouter } from "expo-router";
import { StyleSheet, View } from "react-native";
import { EditorsPanel } from "@/components/curation/editors-panel";
import { FieldError } from "@/components/ui/text-field";
import { LinkButton } from "@/components/curation/link-button";
import { VersionTimeline } from "@/components/curation/version-timeline";
import { WorkbenchGate } from "@/components/curation/workbench-gate";
import { Screen } from "@/components/screen";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";
import { useCurationDataset } from "@/hooks/use-curation-datasets";
import { useCreateVersionMutation } from "@/hooks/use-curation-versions";

function DatasetDesk({ slug }: { slug: string }) {
  const router = useRouter();
  const dataset = useCurationDataset(slug);
  const start = useCreateVersionMutation(slug);
  if (dataset.isPending) return <LoadingState label="Loading the dataset…" />;
  if (dataset.isError) return <ErrorState error={dataset.error} onRetry={() => dataset.refetch()} />;
  const d = dataset.data;
  const open = d.versions.find((v) => v.state === "draft" || v.state === "in_review");
  const first = d.versions.length === 0;
  return (
    <>
      <Card>
        <Text variant="heading">{d.title}</Text>
        <Text variant="label">
          {d.slug} · {d.crops.join(", ")} · {d.region} · {d.licence}
        </Text>
        <Text numberOfLines={4}>{d.description}</Text>
        {d.keywords.length ? <Text variant="caption">Keywords: {d.keywords.join(", ")}</Text> : null}
        {d.contributors.length ? (
          <Text variant="caption">Contributors: {d.contributors.map((c) => `${c.name} (${c.role.replace(/_/g, " ")})`).join("; ")}</Text>
        ) : null}
        <View style={styles.row}>
          {d.canEdit ? <LinkButton href={`/curate/datasets/${d.slug}/details`} label="Edit details" /> : null}
          {d.versions.length >= 2 ? <LinkButton href={`/curate/compare?dataset=${d.slug}`} label="Compare versions" /> : null}
        </View>
      </Card>

      <View style={styles.row}>
        {open ? (
          <LinkButton
            href={`/curate/versions/${open.id}`}
            tone="primary"
            label={`${open.state === "draft" ? "Continue draft" : "Open version in review"} v${open.semver}`}
          />
        ) : null}
        {d.canStartVersion ? (
          <Button
            label={first ? "Start version 1.0.0" : "Start a new version"}
            busy={start.isPending}
            onPress={async () => {
              const v = await start.mutateAsync({}).catch(() => null);
              if (v) router.push(`/curate/versions/${v.id}`);
            }}
          />
        ) : null}
      </View>
      {start.isError ? <FieldError message={start.error.message} /> : null}
      {!first && d.canStartVersion ? (
        <Text variant="caption">
          A new version starts as a copy of the latest published one; upload the new season or corrections into it.
        </Text>
      ) : null}

      <View style={styles.section}>
        <Text variant="heading">Versions</Text>
        <VersionTimeline versions={d.versions} />
      </View>

      <EditorsPanel dataset={d} />
    </>
  );
}

export default function DatasetDeskScreen() {
  const { slug } = useLocalSearchParams<{ slug: string }>();
  return (
    <Screen title="Dataset" subtitle="Its versions, from the first draft to the latest publication.">
      <WorkbenchGate>{() => <DatasetDesk slug={slug} />}</WorkbenchGate>
    </Screen>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: "row", flexWrap: "wrap", gap: space.sm, alignItems: "center" },
  section: { gap: space.md },
});

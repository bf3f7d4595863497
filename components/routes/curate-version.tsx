import { useLocalSearchParams } from "expo-router";
import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { DictionaryEditor, VersionRowsGrid } from "@/components/lazy-tables";
import { DoiStatusCard } from "@/components/curation/doi-status-card";
import { LinkButton } from "@/components/curation/link-button";
import { SegmentTabs } from "@/components/curation/segment-tabs";
import { StateBadge } from "@/components/curation/state-badge";
import { UploadPanel } from "@/components/curation/upload-panel";
import { TemplateLinks, WorkbookPanel } from "@/components/curation/workbook-panel";
import { VersionActions } from "@/components/curation/version-actions";
import { VersionDiffView } from "@/components/curation/version-diff-view";
import { VersionOverview } from "@/components/curation/version-overview";
import { WorkbenchGate } from "@/components/curation/workbench-gate";
import { ReviewPanel } from "@/components/review/review-panel";
import { Screen } from "@/components/screen";
import { Card } from "@/components/ui/card";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { versionStateLabels } from "@/constants/vocabulary";
import { useVersion } from "@/hooks/use-curation-versions";

type Panel = "overview" | "review" | "grid" | "upload" | "dictionary" | "changes";

function VersionDesk({ id }: { id: string }) {
  const version = useVersion(id);
  const [panel, setPanel] = useState<Panel>("overview");
  if (version.isPending) return <LoadingState label="Loading the version…" />;
  if (version.isError) return <ErrorState error={version.error} onRetry={() => version.refetch()} />;
  const v = version.data;
  const editable = v.canEdit && v.state === "draft";
  const tabs = [
    { value: "overview" as const, label: "Overview" },
    ...(v.state === "draft" || v.state === "in_review" ? [{ value: "review" as const, label: "Review: data and results" }] : []),
    { value: "grid" as const, label: "Data grid" },
    ...(editable ? [{ value: "upload" as const, label: "Upload" }] : []),
    { value: "dictionary" as const, label: "Data dictionary" },
    ...(v.basedOnVersionId ? [{ value: "changes" as const, label: `Changes since v${v.basedOnSemver}` }] : []),
  ];
  const current = tabs.some((t) => t.value === panel) ? panel : "overview";
  return (
    <>
      <Card>
        <View style={styles.head}>
          <Text variant="heading">
            {v.datasetTitle} · v{v.semver}
          </Text>
          <StateBadge state={v.state} />
        </View>
        <Text variant="caption">
          {v.basedOnSemver ? `Based on v${v.basedOnSemver}` : "First version"}
          {v.latestPublishedSemver ? ` · latest published v${v.latestPublishedSemver}` : " · nothing published yet"}
          {v.suggestedBump && v.state === "draft" ? ` · suggested number v${v.suggestedSemver} (${v.suggestedBump})` : ""}
        </Text>
        {v.changelog ? <Text>{v.changelog}</Text> : null}
        {v.reviewComment ? (
          <View style={styles.comment}>
            <Text variant="subheading">Reviewer's comment</Text>
            <Text>{v.reviewComment}</Text>
          </View>
        ) : null}
        {v.withdrawnReason ? <Text style={{ color: colors.danger }}>Withdrawn: {v.withdrawnReason}</Text> : null}
        <LinkButton href={`/curate/datasets/${v.datasetSlug}`} label="All versions of this dataset" tone="quiet" />
      </Card>
      <VersionActions version={v} />
      <DoiStatusCard version={v} />
      <SegmentTabs label="Version panels" tabs={tabs} value={current} onChange={setPanel} />
      {current === "overview" ? <VersionOverview version={v} /> : null}
      {current === "review" ? <ReviewPanel version={v} /> : null}
      {current === "grid" ? (
        <Card>
          <Text variant="heading">Data grid</Text>
          <Text variant="caption">
            {editable
              ? "Change a cell with a reason: the row is checked as a merge upload would be, and the changelog records the old and new value."
              : v.state === "draft"
                ? "Only the dataset's editors change a draft's cells; here its rows are read-only."
                : `This version is ${versionStateLabels[v.state].toLowerCase()}, so its rows are read-only; changes go into a new draft.`}
          </Text>
          <VersionRowsGrid versionId={v.id} editable={editable} />
        </Card>
      ) : null}
      {current === "upload" ? (
        <>
          <TemplateLinks version={v} />
          <UploadPanel version={v} />
          <WorkbookPanel version={v} />
        </>
      ) : null}
      {current === "dictionary" ? <DictionaryEditor version={v} /> : null}
      {current === "changes" && v.basedOnVersionId ? <VersionDiffView from={v.basedOnVersionId} to={v.id} /> : null}
    </>
  );
}

export default function VersionScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return (
    <Screen title="Version" subtitle="Upload, check, document and submit; reviewers approve or return it.">
      <WorkbenchGate>{() => <VersionDesk id={id} />}</WorkbenchGate>
    </Screen>
  );
}

const styles = StyleSheet.create({
  head: { flexDirection: "row", alignItems: "center", gap: space.sm, flexWrap: "wrap" },
  comment: { padding: space.md, borderRadius: 10, backgroundColor: colors.infoTint, gap: space.xs },
});

import { StyleSheet, View } from "react-native";
import { VersionRowsGrid } from "@/components/lazy-tables";
import { Disclosure } from "@/components/evidence/disclosure";
import { Card } from "@/components/ui/card";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";
import { useReviewSummary } from "@/hooks/use-review";
import type { VersionDetail } from "@/schemas/curation";
import { DiffValues } from "./diff-values";
import { DraftPreview } from "./draft-preview";
import { SiteYearResults } from "./site-year-results";

/**
 * The review screen of a version: the draft's Evidence preview, its per-site-year results with flags and comments,
 * its rows and the diff against the latest published version. For its editors and reviewers (the server's rule).
 */
export function ReviewPanel({ version }: { version: VersionDetail }) {
  // The first page (shared with the results below) says what the preview can filter on and what the diff compares with.
  const summary = useReviewSummary(version.id, 1, false);
  if (summary.isPending) return <LoadingState label="Preparing the review…" />;
  if (summary.isError) return <ErrorState error={summary.error} onRetry={() => summary.refetch()} />;
  const s = summary.data;
  return (
    <View style={styles.box}>
      <Disclosure title="Draft preview of the Evidence screen" hint="The meta-analysis on this version's responses, not published">
        <DraftPreview versionId={version.id} placements={s.placements} nutrients={s.nutrients} />
      </Disclosure>
      <SiteYearResults versionId={version.id} />
      <Card>
        <Text variant="heading">Rows</Text>
        <VersionRowsGrid versionId={version.id} />
      </Card>
      {s.comparedTo ? (
        <DiffValues from={s.comparedTo.id} to={version.id} />
      ) : (
        <Card>
          <Text variant="heading">Changes</Text>
          <Text>Nothing of this dataset is published yet: every row is new.</Text>
        </Card>
      )}
    </View>
  );
}

const styles = StyleSheet.create({ box: { gap: space.lg } });

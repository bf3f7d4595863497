import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { Cautions } from "@/components/evidence/cautions";
import { SummaryCard } from "@/components/evidence/summary-card";
import { SiteYearTable } from "@/components/lazy-tables";
import { Card } from "@/components/ui/card";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { nutrientLabels, placementLabels } from "@/constants/vocabulary";
import { colors, fonts, space } from "@/constants/theme";
import { useDraftPreview } from "@/hooks/use-review";
import type { YieldUnit } from "@/schemas/analysis";

const label = (labels: Record<string, string>, v: string) => labels[v] ?? v;

/**
 * What the Evidence screen will show once this version is published: the same meta-analysis, run on this version's
 * responses alone. The server answers only the dataset's editors and reviewers.
 */
export function DraftPreview({ versionId, placements, nutrients }: { versionId: string; placements: string[]; nutrients: string[] }) {
  const [placement, setPlacement] = useState<string | undefined>(placements[0]);
  const [nutrient, setNutrient] = useState<string | undefined>(nutrients[0]);
  const [units, setUnits] = useState<YieldUnit>("bu/ac");
  const preview = useDraftPreview(versionId, { placement, nutrient, units });
  return (
    <Card testID="draft-preview">
      <View style={styles.banner} role="note" aria-label="Draft preview — not published">
        <Text style={styles.bannerText}>Draft preview — not published</Text>
        <Text variant="caption">
          The Evidence screen&apos;s analysis run on this version alone. Nobody outside its editors and reviewers sees it; the public
          numbers change only when a reviewer approves the version.
        </Text>
      </View>
      {placements.length ? (
        <ChoiceChips
          label="Placement"
          choices={placements.map((p) => ({ value: p, label: label(placementLabels, p) }))}
          selected={placement ? [placement] : []}
          onToggle={(p) => setPlacement(p === placement ? undefined : p)}
        />
      ) : null}
      {nutrients.length ? (
        <ChoiceChips
          label="Nutrient tested"
          choices={nutrients.map((n) => ({ value: n, label: label(nutrientLabels, n) }))}
          selected={nutrient ? [nutrient] : []}
          onToggle={(n) => setNutrient(n === nutrient ? undefined : n)}
        />
      ) : null}
      {preview.isPending ? <LoadingState label="Running the analysis on the draft…" /> : null}
      {preview.isError ? <ErrorState error={preview.error} onRetry={() => preview.refetch()} /> : null}
      {preview.data ? (
        preview.data.k === 0 ? (
          <EmptyState title="No site-year of this version matches" hint="Pick another placement or nutrient." />
        ) : (
          <View style={styles.box}>
            <SummaryCard result={preview.data} units={units} onUnits={setUnits} />
            <SiteYearTable rows={preview.data.rows} units={preview.data.units} />
            <Text variant="caption">
              Read: v{preview.data.provenance.versions[0]?.version} of {preview.data.provenance.versions[0]?.title}, {preview.data.k}{" "}
              site-years; {preview.data.provenance.excluded.length} left out.
            </Text>
            <Cautions cautions={preview.data.cautions} />
          </View>
        )
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.md },
  banner: {
    padding: space.md,
    borderRadius: 10,
    backgroundColor: colors.wheatTint,
    borderLeftWidth: 4,
    borderLeftColor: colors.wheat,
    gap: space.xs,
  },
  bannerText: { fontFamily: fonts.bold, color: colors.wheatText, fontSize: 16 },
});

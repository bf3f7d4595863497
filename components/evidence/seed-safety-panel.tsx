import { StyleSheet, View } from "react-native";
import { ScatterPlot } from "@/components/charts/scatter-plot";
import { Card } from "@/components/ui/card";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { useSeedSafety } from "@/hooks/use-analysis";
import type { EvidenceState } from "@/lib/share-link";
import type { SeedSafetyResult } from "@/schemas/seed-safety";
import { Cautions } from "./cautions";
import { formatResponse } from "./format";

const seedColour = colors.wheat;
const awayColour = colors.field;

function scatterSummary(result: SeedSafetyResult): string {
  const rates = result.byRate
    .map(
      (r) =>
        `${r.seedPlacedNK2oLbAc} lb/ac: ${r.tests} comparisons, mean ${r.meanRelativePercent === null ? "–" : formatResponse(r.meanRelativePercent, "%")} %`,
    )
    .join("; ");
  const away = result.points.filter((p) => !p.seedPlaced).length;
  return `Scatter of the ${result.measure.title.toLowerCase()} response (% of the check) against the N + K2O placed with the seed. Seed-placed: ${rates || "none"}. Placed away from the seed: ${away} comparisons at 0 lb/ac.`;
}

function Evidence({ result }: { result: SeedSafetyResult }) {
  const what = result.measure.title.toLowerCase();
  const points = result.points.filter((p) => p.relativePercent !== null);
  return (
    <View style={styles.stack}>
      <Text testID="seed-safety-statement">{result.statement}</Text>
      {result.byRate.length > 1 ? (
        <Text variant="caption" testID="seed-safety-by-rate">
          By rate with the seed:{" "}
          {result.byRate
            .map(
              (r) =>
                `${r.seedPlacedNK2oLbAc} lb/ac N + K2O, ${r.meanRelativePercent === null ? "–" : formatResponse(r.meanRelativePercent, "%")} % (${r.tests})`,
            )
            .join(" · ")}
        </Text>
      ) : null}
      <Text variant="caption">{result.lossRule}</Text>
      <ScatterPlot
        testID="seed-safety-scatter"
        summary={scatterSummary(result)}
        format={(v) => `${formatResponse(v, "%").replace("+", "")} %`}
        xLabel={`N + K2O with the seed, lb/ac · ${what}, % of check`}
        points={points.map((p, i) => ({
          id: `${p.dataset}/${p.siteYearCode}/${p.treatmentCode}/${i}`,
          x: p.seedPlacedNK2oLbAc,
          y: p.relativePercent!,
          shape: p.seedPlaced ? "triangle" : "circle",
          fill: p.seedPlaced ? seedColour : awayColour,
        }))}
        legend={[
          { key: "seed", label: "Seed-placed (in-furrow)", shape: "triangle", fill: seedColour },
          { key: "away", label: "Away from the seed (band, broadcast …)", shape: "circle", fill: awayColour },
        ]}
      />
      <Text variant="subheading">Guideline check</Text>
      <Cautions cautions={result.cautions} />
      {result.notes.map((n) => (
        <Text key={n} variant="caption">
          • {n}
        </Text>
      ))}
    </View>
  );
}

/**
 * Seed safety, shown when stand or early growth is compared: did seed-placed treatments reduce it, by how much, how
 * often a site-year's own test found a loss, the guideline rules beside it, and the response against the rate with the seed.
 */
export function SeedSafetyPanel({ state }: { state: EvidenceState }) {
  const enabled = state.measure === "stand" || state.measure === "vigour";
  const query = useSeedSafety(state, enabled);
  if (!enabled) return null;
  return (
    <Card testID="seed-safety">
      <Text variant="heading">Seed safety</Text>
      <Text variant="caption">
        Placement filters are set aside here: seed-placed treatments are compared with those placed away from the seed.
      </Text>
      {query.isError ? (
        <ErrorState error={query.error} onRetry={() => query.refetch()} />
      ) : !query.data ? (
        <LoadingState label="Checking seed-placed treatments…" />
      ) : (
        <Evidence result={query.data} />
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.sm },
});

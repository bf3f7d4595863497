import { StyleSheet, View } from "react-native";
import { SoilTestScatter } from "@/components/charts/scatter-plot";
import { LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, radius, space } from "@/constants/theme";
import { useSoilTestLine } from "@/hooks/use-analysis";
import { ApiError } from "@/lib/api-error";
import type { EvidenceState, Prices } from "@/lib/share-link";
import type { MetaAnalysisResponse } from "@/schemas/analysis";
import { pricedDecision } from "@/stats/decision";
import { breakEvenWhat, describeCrossing } from "./moderator-words";

/**
 * Response against the soil test with the fitted line, its band and the critical soil-test level (where the line falls
 * to zero, and to the break-even at the grower's prices, computed here so the prices never leave the device), with
 * the caution that it is an estimate from these trials.
 */
export function SoilTestPanel({
  result,
  state,
  prices,
  format,
  unitLabel,
  summary,
}: {
  result: MetaAnalysisResponse;
  state: EvidenceState;
  prices: Prices;
  format: (v: number) => string;
  unitLabel: string;
  summary: string;
}) {
  const query = useSoilTestLine(state);
  const m = query.data?.moderatorRegression ?? null;
  const fit = m?.fit ?? null;
  const line = fit
    ? { intercept: fit.intercept.estimate, slope: fit.slope.estimate, covariance: fit.covariance, critical: fit.critical }
    : null;
  const breakEven = pricedDecision(prices, {
    unitsPerBushel: result.decision.breakEvenUnitsPerBushel,
    predictive: null,
    observedResponses: null,
  }).breakEven;
  const atBreakEven =
    line && m?.range && breakEven !== null
      ? describeCrossing(line, breakEven, { what: breakEvenWhat(breakEven, result.units), unit: m.unit, range: m.range })
      : null;
  const refused =
    query.error instanceof ApiError && query.error.status === 422 ? (query.error.problem?.detail ?? query.error.message) : null;
  const lineSummary = fit && m ? ` Fitted line: ${m.plainWords} ${m.criticalLevel?.zero.text ?? ""}` : "";
  return (
    <View style={styles.stack}>
      <SoilTestScatter
        rows={result.rows}
        format={format}
        unitLabel={unitLabel}
        summary={summary + lineSummary}
        line={fit ? { points: fit.line, criticalLevel: m?.criticalLevel?.zero.value ?? null } : null}
      />
      {query.isPending && !refused ? <LoadingState label="Fitting the line…" /> : null}
      {refused ? (
        <Text testID="soil-line-refused">No line: {refused}</Text>
      ) : query.isError ? (
        <Text testID="soil-line-error">The fitted line could not be loaded.</Text>
      ) : null}
      {m ? (
        <View style={styles.stack} testID="soil-line-text">
          <Text variant="caption">
            {m.label} · k = {m.k}
            {m.excluded.count ? ` · ${m.excluded.count} site-year(s) without a soil-test value left out` : ""}
          </Text>
          <Text>{m.plainWords}</Text>
          {m.criticalLevel ? (
            <View style={styles.critical} testID="critical-level">
              <Text variant="heading" aria-level={3}>
                Critical soil-test level
              </Text>
              <Text>{m.criticalLevel.zero.text}</Text>
              {atBreakEven ? <Text testID="critical-level-break-even">{atBreakEven.text}</Text> : null}
              {!atBreakEven && m.fit ? (
                <Text variant="caption">Enter your prices above to see where the line falls to your break-even.</Text>
              ) : null}
              <Text variant="caption" testID="critical-level-caution">
                {m.criticalLevel.caution.text}
              </Text>
            </View>
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.sm },
  critical: {
    gap: space.xs,
    padding: space.md,
    borderRadius: radius.sm,
    borderLeftWidth: 4,
    borderLeftColor: colors.field,
    backgroundColor: colors.card,
  },
});

import * as Clipboard from "expo-clipboard";
import { router, useLocalSearchParams } from "expo-router";
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import { Platform, ScrollView, StyleSheet, View } from "react-native";
import { ForestPlot } from "@/components/charts/forest-plot";
import { SoilTestScatter } from "@/components/charts/scatter-plot";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { useMetaAnalysis } from "@/hooks/use-analysis";
import { useDatasetList } from "@/hooks/use-datasets";
import { useLayout } from "@/hooks/use-layout";
import { apiUrl } from "@/lib/api-client";
import { ApiError } from "@/lib/api-error";
import { loadPrices, savePrices } from "@/lib/device-storage";
import { countActiveFilters, evidenceStateFromParams, metaApiPath, routerParams, shareUrl, type EvidenceState, type Prices } from "@/lib/share-link";
import type { MetaAnalysisResponse } from "@/schemas/analysis";
import { AdvancedOptions } from "./advanced-options";
import { ApiLinkPanel, CopyRow } from "./api-link-panel";
import { BreakEvenPanel } from "./break-even-panel";
import { Cautions } from "./cautions";
import { Disclosure } from "./disclosure";
import { FilterPanel } from "./filter-panel";
import { formatInterval, formatResponse, unitLabel } from "./format";
import { ProvenancePanel } from "./provenance-panel";
import { SiteYearTable } from "@/components/lazy-tables";
import { PageHead } from "@/components/page-head";
import { SubgroupView } from "./subgroup-view";
import { SummaryCard } from "./summary-card";

function origin(): string {
  if (Platform.OS === "web" && typeof window !== "undefined") return window.location.origin;
  return apiUrl("");
}

/** The screen's state lives in the URL; this reads it and writes changes back with router.setParams. */
function useEvidenceState(): [EvidenceState, (next: EvidenceState) => void] {
  const params = useLocalSearchParams();
  const key = JSON.stringify(params);
  // Keyed by the serialised params: the router hands a new object on every render.
  const state = useMemo(() => evidenceStateFromParams(JSON.parse(key)), [key]);
  const update = useCallback((next: EvidenceState) => router.setParams(routerParams(next)), []);
  return [state, update];
}

/** Prices come from the link when it has them, else from this device; edits go to both. */
function usePrices(state: EvidenceState, update: (next: EvidenceState) => void): [Prices, (p: Prices) => void] {
  const stateRef = useRef(state);
  stateRef.current = state;
  const hasLinkPrices = state.price !== undefined || state.productCost !== undefined || state.applicationCost !== undefined;
  const arrived = useRef(false);
  useEffect(() => {
    // Only on arrival: once the user edits, the device copy follows them, not the other way round.
    if (arrived.current) return;
    arrived.current = true;
    if (hasLinkPrices) return;
    void loadPrices().then((stored) => {
      if (Object.keys(stored).length) update({ ...stateRef.current, ...stored });
    });
  }, [hasLinkPrices, update]);
  const prices = { price: state.price, productCost: state.productCost, applicationCost: state.applicationCost };
  const setPrices = useCallback(
    (p: Prices) => {
      void savePrices(p);
      update({ ...stateRef.current, price: p.price, productCost: p.productCost, applicationCost: p.applicationCost });
    },
    [update],
  );
  return [prices, setPrices];
}

function plotSummary(result: MetaAnalysisResponse): string {
  const u = unitLabel(result.units);
  if (!result.pooled || !result.rows.length) return "Forest plot: no site-years.";
  const lo = Math.min(...result.rows.map((r) => r.estimate));
  const hi = Math.max(...result.rows.map((r) => r.estimate));
  const pi = result.pooled.predictionInterval;
  return (
    `Forest plot of ${result.forest.truncated ? `the ${result.rows.length} most precise of ${result.forest.total}` : result.rows.length} site-year responses, from ${formatResponse(lo, result.units)} to ${formatResponse(hi, result.units)} ${u}. ` +
    `Mean ${formatResponse(result.pooled.estimate, result.units)} ${u}, 95 % CI ${formatInterval(result.pooled.ciLower, result.pooled.ciUpper, result.units)}` +
    (pi ? `; a new field ${formatInterval(pi.lower, pi.upper, result.units)}.` : ".")
  );
}

function scatterSummary(result: MetaAnalysisResponse): string {
  const byClass = new Map<string, number[]>();
  for (const r of result.rows) if (r.soilTestClass) byClass.set(r.soilTestClass, [...(byClass.get(r.soilTestClass) ?? []), r.estimate]);
  const parts = [...byClass.entries()].map(([c, v]) => `${c.replace("_", " ")}: ${v.length} site-years, mean ${formatResponse(v.reduce((a, b) => a + b, 0) / v.length, result.units)}`);
  return `Scatter of response against soil-test value. ${parts.join("; ")}.`;
}

function Results({ result, state, update, prices, setPrices }: { result: MetaAnalysisResponse; state: EvidenceState; update: (s: EvidenceState) => void; prices: Prices; setPrices: (p: Prices) => void }) {
  const fmt = (v: number) => formatResponse(v, result.units).replace("+", "");
  const pooled = result.pooled
    ? { estimate: result.pooled.estimate, ciLower: result.pooled.ciLower, ciUpper: result.pooled.ciUpper, prediction: result.pooled.predictionInterval }
    : null;
  return (
    <View style={styles.stack}>
      <SummaryCard result={result} units={state.units} onUnits={(units) => update({ ...state, units })} />
      <Cautions cautions={result.cautions} />
      <BreakEvenPanel result={result} prices={prices} onPrices={setPrices} />
      <SubgroupView result={result} groupBy={state.groupBy} onGroupBy={(groupBy) => update({ ...state, groupBy })} />
      <Card>
        <Disclosure title="Forest plot" hint={`${result.rows.length} rows, the mean and the range for a new field`} testID="open-forest-plot">
          <ForestPlot rows={result.rows} pooled={pooled} format={fmt} unitLabel={unitLabel(result.units)} summary={plotSummary(result)} />
        </Disclosure>
      </Card>
      <Card>
        <Disclosure title="Response and soil test" hint="Coloured and shaped by soil-test class" testID="open-scatter">
          <SoilTestScatter rows={result.rows} format={fmt} unitLabel={unitLabel(result.units)} summary={scatterSummary(result)} />
        </Disclosure>
      </Card>
      <Card>
        <Disclosure title="Site-years" hint="Sortable table" testID="open-table">
          <SiteYearTable rows={result.rows} units={result.units} />
        </Disclosure>
      </Card>
      <Card>
        <AdvancedOptions value={{ effect: state.effect, method: state.method, ci: state.ci }} onChange={(o) => update({ ...state, ...o })} />
      </Card>
      <ProvenancePanel result={result} />
      <Card>
        <ApiLinkPanel apiUrl={`${origin()}${metaApiPath(state)}`} />
      </Card>
    </View>
  );
}

const evidenceDescription = "A random-effects meta-analysis of the yield response across the site-years you filter to.";

function ShareButton({ state }: { state: EvidenceState }) {
  const [shown, setShown] = useState<string | null>(null);
  const url = shareUrl(origin(), state);
  return (
    <View style={styles.share}>
      <Button
        label="Share this view"
        tone="secondary"
        testID="share-link"
        onPress={async () => {
          await Clipboard.setStringAsync(url);
          setShown(url);
        }}
      />
      {shown ? <CopyRow label="link" text={shown} testID="share-url" /> : null}
    </View>
  );
}

/** The home screen: what the filtered trials say about a practice's yield response, and whether it pays. */
export function EvidenceScreen() {
  const { wide } = useLayout();
  const [state, update] = useEvidenceState();
  const [prices, setPrices] = usePrices(state, update);
  const analysis = useMetaAnalysis(state);
  const datasets = useDatasetList();
  const years = useMemo(() => {
    const items = datasets.data?.items ?? [];
    const from = Math.min(...items.flatMap((d) => (d.yearFrom ? [d.yearFrom] : [])));
    const to = Math.max(...items.flatMap((d) => (d.yearTo ? [d.yearTo] : [])));
    return Number.isFinite(from) && Number.isFinite(to) ? Array.from({ length: to - from + 1 }, (_, i) => from + i) : [];
  }, [datasets.data]);
  const active = countActiveFilters(state.filters);
  const filters = <FilterPanel filters={state.filters} onChange={(f) => update({ ...state, filters: f })} years={years} />;

  // Without a network the query pauses rather than fails; say so instead of showing stale numbers as current.
  const offline = analysis.fetchStatus === "paused";
  const body = offline ? (
    <ErrorState error={new ApiError(0, null, "offline")} onRetry={() => analysis.refetch()} />
  ) : analysis.isError ? (
    <ErrorState error={analysis.error} onRetry={() => analysis.refetch()} />
  ) : !analysis.data ? (
    <LoadingState label="Pooling the site-years…" />
  ) : analysis.data.k === 0 ? (
    <View style={styles.stack} testID="empty-result">
      <EmptyState title="No site-years match; widen these filters" hint={analysis.data.notes.join(" ")} action={<Button label="Clear filters" tone="secondary" onPress={() => update({ ...state, filters: {} })} />} />
      <Cautions cautions={analysis.data.cautions} />
    </View>
  ) : (
    <Results result={analysis.data} state={state} update={update} prices={prices} setPrices={setPrices} />
  );

  const header = (
    <View style={styles.header}>
      <PageHead title="Evidence" description={evidenceDescription} />
      <Text variant="title" aria-level={1}>Evidence</Text>
      <Text variant="caption">{evidenceDescription}</Text>
      {analysis.isFetching && analysis.data ? <Text variant="caption" role="status" aria-live="polite" testID="updating">Updating…</Text> : null}
    </View>
  );

  if (wide) {
    return (
      <View style={styles.wideRoot}>
        <ScrollView style={styles.side} contentContainerStyle={styles.sideInner} accessibilityLabel="Filters">
          <Text variant="heading">Filters</Text>
          {filters}
        </ScrollView>
        <ScrollView style={styles.main} contentContainerStyle={styles.mainInner}>
          {header}
          <ShareButton state={state} />
          {body}
        </ScrollView>
      </View>
    );
  }
  return (
    <ScrollView contentContainerStyle={styles.phoneInner}>
      {header}
      <Card>
        <Disclosure title="Filters" hint={active ? `${active} active` : "None: all published site-years"} testID="filters-toggle">
          {filters}
        </Disclosure>
      </Card>
      <ShareButton state={state} />
      {body}
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  header: { gap: space.xs },
  share: { gap: space.sm, alignItems: "stretch" },
  wideRoot: { flex: 1, flexDirection: "row" },
  side: { width: 340, flexGrow: 0, borderRightWidth: 1, borderRightColor: colors.line, backgroundColor: colors.card },
  sideInner: { padding: space.lg, gap: space.md },
  main: { flex: 1 },
  mainInner: { padding: space.xl, gap: space.lg, maxWidth: 960 },
  phoneInner: { padding: space.lg, gap: space.lg },
});

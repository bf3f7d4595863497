import * as Clipboard from "expo-clipboard";
import { router, useLocalSearchParams } from "expo-router";
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import { Platform, Pressable, ScrollView, StyleSheet, View } from "react-native";
import { ForestPlot, type ForestGroup } from "@/components/charts/forest-plot";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { BusyState, EmptyState, ErrorState, isBusy, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, minTap, radius, space } from "@/constants/theme";
import { useMetaAnalysis } from "@/hooks/use-analysis";
import { useDatasetList } from "@/hooks/use-datasets";
import { useLayout } from "@/hooks/use-layout";
import { apiUrl } from "@/lib/api-client";
import { ApiError } from "@/lib/api-error";
import { loadPrices, savePrices } from "@/lib/device-storage";
import { startedAt } from "@/lib/query-client";
import {
  countActiveFilters,
  evidenceStateFromParams,
  metaApiPath,
  priceKeys,
  routerParams,
  shareUrl,
  type EvidenceState,
  type Prices,
} from "@/lib/share-link";
import type { MetaAnalysisResponse } from "@/schemas/analysis";
import { AdvancedOptions } from "./advanced-options";
import { ApiLinkPanel, CopyRow } from "./api-link-panel";
import { BreakEvenPanel } from "./break-even-panel";
import { Cautions } from "./cautions";
import { Disclosure } from "./disclosure";
import { FilterPanel } from "./filter-panel";
import { formatInterval, formatResponse, levelLabel, unitLabel } from "./format";
import { groupStyles } from "./group-style";
import { ProvenancePanel } from "./provenance-panel";
import { SiteYearTable } from "@/components/lazy-tables";
import { PageHead } from "@/components/page-head";
import { levelLabels, SubgroupView } from "./subgroup-view";
import { SoilTestPanel } from "./soil-test-panel";
import { SummaryCard } from "./summary-card";
import { MeasureChoice } from "./measure-choice";
import { SeedSafetyPanel } from "./seed-safety-panel";

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

/** Filter taps in quick succession make one request: the query follows the screen's state after it rests this long. */
const settleMs = 300;

function useSettledState(state: EvidenceState): EvidenceState {
  const [settled, setSettled] = useState(state);
  const path = metaApiPath(state);
  const latest = useRef(state);
  latest.current = state;
  useEffect(() => {
    const timer = setTimeout(() => setSettled(latest.current), settleMs);
    return () => clearTimeout(timer);
  }, [path]);
  // Options that do not change the request (prices) pass at once.
  return metaApiPath(settled) === path ? state : settled;
}

const savedDate = (ms: number) => new Date(ms).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" });

/**
 * The grower's prices live on this device: loaded from its storage, or taken from a link that carries them, and
 * then kept out of the screen's URL, so neither an API request nor a reload sends them. Edits are saved on the device
 * only; the break-even and its chances are computed here from the answer's predictive distribution.
 */
function usePrices(state: EvidenceState, update: (next: EvidenceState) => void, routerReady: boolean): [Prices, (p: Prices) => void] {
  const linkPrices = useRef<Prices | null>(null);
  if (linkPrices.current === null) {
    linkPrices.current = Object.fromEntries(priceKeys.flatMap((k) => (state[k] === undefined ? [] : [[k, state[k]]])));
  }
  const [prices, setPricesState] = useState<Prices>(linkPrices.current);
  const stateRef = useRef(state);
  stateRef.current = state;
  const inLink = priceKeys.some((k) => state[k] !== undefined);
  useEffect(() => {
    // A link's prices are used, then taken out of the address bar (routerParams never writes prices). The router
    // ignores setParams until it is mounted, so this waits for the first answer.
    if (inLink && routerReady) update({ ...stateRef.current });
  }, [inLink, routerReady, update]);
  useEffect(() => {
    if (Object.keys(linkPrices.current ?? {}).length) return;
    let live = true;
    void loadPrices().then((stored) => {
      if (live && Object.keys(stored).length) setPricesState((current) => (Object.keys(current).length ? current : stored));
    });
    return () => {
      live = false;
    };
  }, []);
  // A change names only the fields it changes and is merged into the latest prices: the three fields settle on
  // their own timers, often in the same tick, and each must not undo another's.
  const setPrices = useCallback((change: Prices) => {
    setPricesState((current) => {
      const next = { ...current, ...change };
      void savePrices(next);
      return next;
    });
  }, []);
  return [prices, setPrices];
}

function plotSummary(result: MetaAnalysisResponse): string {
  const u = unitLabel(result.units);
  if (!result.pooled || !result.rows.length) return "Forest plot: no site-years.";
  const lo = Math.min(...result.rows.map((r) => r.estimate));
  const hi = Math.max(...result.rows.map((r) => r.estimate));
  const pi = result.pooled.predictionInterval;
  return (
    `Forest plot of ${result.forest.truncated ? `the ${result.rows.length} most precise of ${result.forest.total}` : result.rows.length} site-year responses${result.subgroups && result.subgroups.levels.length > 1 ? " (a site-year once in each group it has a treatment in)" : ""}, from ${formatResponse(lo, result.units)} to ${formatResponse(hi, result.units)} ${u}. ` +
    `Mean ${formatResponse(result.pooled.estimate, result.units)} ${u}, 95 % CI ${formatInterval(result.pooled.ciLower, result.pooled.ciUpper, result.units)}` +
    (pi ? `; a new field ${formatInterval(pi.lower, pi.upper, result.units)}.` : ".")
  );
}

function scatterSummary(result: MetaAnalysisResponse): string {
  const byClass = new Map<string, number[]>();
  for (const r of result.rows) if (r.soilTestClass) byClass.set(r.soilTestClass, [...(byClass.get(r.soilTestClass) ?? []), r.estimate]);
  const parts = [...byClass.entries()].map(
    ([c, v]) =>
      `${c.replace("_", " ")}: ${v.length} site-years, mean ${formatResponse(v.reduce((a, b) => a + b, 0) / v.length, result.units)}`,
  );
  return `Scatter of response against soil-test value. ${parts.join("; ")}.`;
}

/** The forest's groups: one per subgroup level, in the answer's order, with the level's colour and shape. */
function forestGroups(result: MetaAnalysisResponse, groupBy: EvidenceState["groupBy"]): ForestGroup[] {
  const levels = result.subgroups?.levels ?? [];
  if (levels.length === 0) return [];
  const styleOf = groupStyles(
    groupBy,
    levels.map((l) => l.level),
  );
  return levels.map((l) => ({
    level: l.level,
    label: levelLabel(l.level, levelLabels),
    k: l.k,
    estimate: l.estimate,
    ciLower: l.ciLower,
    ciUpper: l.ciUpper,
    ...styleOf.get(l.level)!,
  }));
}

function groupedSummary(groups: ForestGroup[], units: string): string {
  if (groups.length === 0) return "";
  return ` Grouped: ${groups.map((g) => `${g.label}, k = ${g.k}, subtotal ${formatResponse(g.estimate, units)} (${formatInterval(g.ciLower, g.ciUpper, units)})`).join("; ")}.`;
}

function Results({
  result,
  state,
  update,
  prices,
  setPrices,
}: {
  result: MetaAnalysisResponse;
  state: EvidenceState;
  update: (s: EvidenceState) => void;
  prices: Prices;
  setPrices: (p: Prices) => void;
}) {
  const fmt = (v: number) => formatResponse(v, result.units).replace("+", "");
  const pooled = result.pooled
    ? {
        estimate: result.pooled.estimate,
        ciLower: result.pooled.ciLower,
        ciUpper: result.pooled.ciUpper,
        prediction: result.pooled.predictionInterval,
      }
    : null;
  const groups = forestGroups(result, state.groupBy);
  return (
    <View style={styles.stack}>
      <SummaryCard result={result} units={state.units} onUnits={(units) => update({ ...state, units })} />
      <SeedSafetyPanel state={state} />
      <Cautions cautions={result.cautions} />
      {/* Whether it pays is a question about yield only. */}
      {result.measure.name === "yield" ? <BreakEvenPanel result={result} prices={prices} onPrices={setPrices} /> : null}
      <SubgroupView result={result} groupBy={state.groupBy} onGroupBy={(groupBy) => update({ ...state, groupBy })} prices={prices} />
      <Card>
        <Disclosure
          title="Forest plot"
          hint={
            groups.length > 1
              ? `${result.rows.length} rows in ${groups.length} groups, each with its subtotal, then the mean and the range for a new field`
              : `${result.rows.length} rows, the mean and the range for a new field`
          }
          testID="open-forest-plot"
        >
          <ForestPlot
            rows={result.rows}
            pooled={pooled}
            groups={groups.length > 1 ? groups : undefined}
            format={fmt}
            unitLabel={unitLabel(result.units)}
            summary={plotSummary(result) + (groups.length > 1 ? groupedSummary(groups, result.units) : "")}
          />
        </Disclosure>
      </Card>
      <Card>
        <Disclosure
          title="Response and soil test"
          hint="Coloured and shaped by soil-test class, with the fitted line and the critical soil-test level"
          testID="open-scatter"
        >
          <SoilTestPanel
            result={result}
            state={state}
            prices={prices}
            format={fmt}
            unitLabel={unitLabel(result.units)}
            summary={scatterSummary(result)}
          />
        </Disclosure>
      </Card>
      <Card>
        <Disclosure title="Site-years" hint="Sortable list, with each site-year's weight in the mean" testID="open-table">
          <SiteYearTable rows={result.rows} units={result.units} groupLabels={Object.fromEntries(groups.map((g) => [g.level, g.label]))} />
        </Disclosure>
      </Card>
      <Card>
        <AdvancedOptions
          value={{ effect: state.effect, method: state.method, ci: state.ci }}
          onChange={(o) => update({ ...state, ...o })}
        />
      </Card>
      <ProvenancePanel result={result} />
      <Card>
        <ApiLinkPanel apiUrl={`${origin()}${metaApiPath(state)}`} />
      </Card>
    </View>
  );
}

const evidenceDescription =
  "A random-effects meta-analysis of the yield response (or stand, early growth, test weight, moisture) across the site-years you filter to.";

function ShareButton({ state, prices }: { state: EvidenceState; prices: Prices }) {
  const [shown, setShown] = useState<string | null>(null);
  const [withPrices, setWithPrices] = useState(false);
  const hasPrices = priceKeys.some((k) => prices[k] !== undefined);
  const url = shareUrl(origin(), { ...state, ...prices }, { withPrices: withPrices && hasPrices });
  useEffect(() => {
    // A link already shown follows the choice, so what is on screen is what was copied last.
    setShown((current) => (current === null ? null : url));
  }, [url]);
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
      {hasPrices ? (
        <Pressable
          role="checkbox"
          aria-checked={withPrices}
          accessibilityLabel="Include my prices in the link"
          testID="share-with-prices"
          onPress={() => setWithPrices((v) => !v)}
          style={({ focused }: { pressed: boolean; focused?: boolean }) => [styles.check, focused && styles.checkFocused]}
        >
          <View style={[styles.box, withPrices && styles.boxOn]} aria-hidden>
            {withPrices ? <Text style={styles.tick}>✓</Text> : null}
          </View>
          <Text>Include my prices in the link</Text>
        </Pressable>
      ) : null}
      {shown ? <CopyRow label="link" text={shown} testID="share-url" /> : null}
    </View>
  );
}

/** The home screen: what the filtered trials say about a practice's yield response, and whether it pays. */
export function EvidenceScreen() {
  const { wide } = useLayout();
  const [state, update] = useEvidenceState();
  const analysis = useMetaAnalysis(useSettledState(state));
  const [prices, setPrices] = usePrices(state, update, analysis.data !== undefined);
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
  // An answer of the current filters that was saved on this device in an earlier visit is shown, with its date.
  const offline = analysis.fetchStatus === "paused";
  const current = analysis.data !== undefined && !analysis.isPlaceholderData;
  const savedAt = current && analysis.dataUpdatedAt < startedAt ? analysis.dataUpdatedAt : null;
  const busy = analysis.isFetching && isBusy(analysis.failureReason) ? analysis.failureReason : null;
  const body =
    offline && !current ? (
      <ErrorState error={new ApiError(0, null, "offline")} onRetry={() => analysis.refetch()} />
    ) : busy && !current ? (
      <BusyState error={busy} />
    ) : analysis.isError ? (
      <ErrorState error={analysis.error} onRetry={() => analysis.refetch()} />
    ) : !analysis.data ? (
      <LoadingState label="Pooling the site-years…" />
    ) : analysis.data.k === 0 ? (
      <View style={styles.stack} testID="empty-result">
        <EmptyState
          title="No site-years match; widen these filters"
          hint={analysis.data.notes.join(" ")}
          action={<Button label="Clear filters" tone="secondary" onPress={() => update({ ...state, filters: {} })} />}
        />
        <Cautions cautions={analysis.data.cautions} />
      </View>
    ) : (
      <Results result={analysis.data} state={state} update={update} prices={prices} setPrices={setPrices} />
    );

  const header = (
    <View style={styles.header}>
      <PageHead title="Evidence" description={evidenceDescription} />
      <Text variant="title" aria-level={1}>
        Evidence
      </Text>
      <Text variant="caption">{evidenceDescription}</Text>
      <MeasureChoice measure={state.measure} onMeasure={(measure) => update({ ...state, measure })} />
      {savedAt !== null ? (
        <Text variant="caption" role="status" testID="saved-answer">
          {offline
            ? `You are offline: this is the answer saved on this device on ${savedDate(savedAt)}.`
            : `Saved on this device on ${savedDate(savedAt)}; checking for a newer answer…`}
        </Text>
      ) : analysis.isFetching && analysis.data && !offline && !(busy && !current) ? (
        // While the body says Busy (no answer of these filters yet), the header does not say it a second time.
        <Text variant="caption" role="status" aria-live="polite" testID="updating">
          {busy ? `Busy — trying again in ${Math.max(1, Math.ceil((busy.retryAt - Date.now()) / 1000))} s` : "Updating…"}
        </Text>
      ) : null}
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
          <ShareButton state={state} prices={prices} />
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
      <ShareButton state={state} prices={prices} />
      {body}
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  header: { gap: space.xs },
  share: { gap: space.sm, alignItems: "stretch" },
  check: {
    minHeight: minTap,
    flexDirection: "row",
    alignItems: "center",
    gap: space.sm,
    alignSelf: "flex-start",
    paddingRight: space.sm,
    borderWidth: 2,
    borderColor: "transparent",
    borderRadius: radius.sm,
  },
  checkFocused: { borderColor: colors.focus },
  box: {
    width: 22,
    height: 22,
    borderRadius: 4,
    borderWidth: 2,
    borderColor: colors.muted,
    alignItems: "center",
    justifyContent: "center",
    backgroundColor: colors.card,
  },
  boxOn: { backgroundColor: colors.field, borderColor: colors.field },
  tick: { color: "#ffffff", fontSize: 14, lineHeight: 16 },
  wideRoot: { flex: 1, flexDirection: "row" },
  side: { width: 340, flexGrow: 0, borderRightWidth: 1, borderRightColor: colors.line, backgroundColor: colors.card },
  sideInner: { padding: space.lg, gap: space.md },
  main: { flex: 1 },
  mainInner: { padding: space.xl, gap: space.lg, maxWidth: 960 },
  phoneInner: { padding: space.lg, gap: space.lg },
});

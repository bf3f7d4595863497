import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { Disclosure } from "@/components/evidence/disclosure";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, fonts, radius, space } from "@/constants/theme";
import { useSiteYearAnova, type AnovaChoice, type AnovaSource } from "@/hooks/use-site-year-anova";
import { yieldUnits, type YieldUnit } from "@/schemas/public";
import { anovaMeasures, type AnovaMeasure, type SiteYearAnova } from "@/schemas/site-year-anova";

const measureLabels: Record<AnovaMeasure, string> = {
  yield: "Yield",
  stand_count: "Stand count",
  vigour: "Vigour",
  test_weight: "Test weight",
  harvest_moisture: "Harvest moisture",
};

/** Numbers at a precision their size calls for: 12,345 · 123.4 · 1.23 (grouped, true minus sign). */
function formatNumber(value: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "–";
  const size = Math.abs(value);
  const digits = size >= 1000 ? 0 : size >= 10 ? 1 : 2;
  const text = Math.abs(value).toLocaleString("en-US", { minimumFractionDigits: digits, maximumFractionDigits: digits });
  return value < 0 && Number(text.replace(/,/g, "")) !== 0 ? `−${text}` : text;
}
/** Sums of squares in (kg/ha)² run to millions: from 10,000 on, the table writes them as 432K or 1.3M to fit a phone. */
function formatSquare(value: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value) || Math.abs(value) < 10_000) return formatNumber(value);
  return value.toLocaleString("en-US", { notation: "compact", maximumSignificantDigits: 3 });
}
type TermRow = NonNullable<SiteYearAnova["table"]>["block"];
const pCell = (p: number | null) => (p === null ? "–" : p < 0.001 ? "<0.001" : p.toFixed(3));
const termCells = (name: string, r: TermRow) => [
  name,
  String(r.df),
  formatSquare(r.sumOfSquares),
  formatSquare(r.meanSquare),
  r.fStatistic === null ? "–" : r.fStatistic.toFixed(2),
  pCell(r.pValue),
];
const signed = (value: number) => (value > 0 ? `+${formatNumber(value)}` : formatNumber(value));

/** A small table of text cells, announced as a table; the first column takes the room the numbers leave. */
function GridTable({
  label,
  head,
  rows,
  weights,
  testID,
}: {
  label: string;
  head: string[];
  rows: string[][];
  /** Relative column widths (flex), first column first. */
  weights: number[];
  testID?: string;
}) {
  const width = (i: number) => ({ flex: weights[i] ?? 1 });
  return (
    <View role="table" aria-label={label} testID={testID} style={styles.table}>
      <View role="row" style={[styles.row, styles.headRow]}>
        {head.map((h, i) => (
          <View key={h} role="columnheader" style={[styles.cell, i === 0 && styles.firstCell, width(i)]}>
            <Text style={[styles.cellText, styles.headText, i > 0 && styles.right]}>{h}</Text>
          </View>
        ))}
      </View>
      {rows.map((cells, r) => (
        <View key={cells[0]} role="row" style={[styles.row, r % 2 === 1 && styles.zebra]}>
          {cells.map((c, i) => (
            <View key={i} role={i === 0 ? "rowheader" : "cell"} style={[styles.cell, i === 0 && styles.firstCell, width(i)]}>
              <Text style={[styles.cellText, i === 0 ? styles.rowHead : styles.right]}>{c}</Text>
            </View>
          ))}
        </View>
      ))}
    </View>
  );
}

function missingText(a: SiteYearAnova): string {
  const cells = a.missingPlots.map((m) => `block ${m.block} ${m.treatment}${m.plot ? ` (plot ${m.plot})` : ""}`);
  return cells.length > 6 ? `${cells.slice(0, 6).join("; ")} and ${cells.length - 6} more` : cells.join("; ");
}

/**
 * One site-year's own analysis as its answer gives it: the ANOVA table, the error mean square and CV, LSD(0.05) (one,
 * or one per pair when plots are missing) and the least-squares means with their SEs. Draws no data of its own, so
 * any screen holding a `SiteYearAnova` answer can show it.
 */
function SiteYearAnovaView({ anova: a }: { anova: SiteYearAnova }) {
  const unit = a.measure.unit;
  const pairsOpen = a.lsd.single === null;
  return (
    <View style={styles.view} testID="site-year-anova">
      <Text variant="subheading" aria-level={3} role="heading">
        {a.siteYear.code} · {a.siteYear.crop} {a.siteYear.year} · {a.measure.title} ({unit})
      </Text>
      <Text variant="caption">
        {a.siteYear.design}, {a.siteYear.blocks} blocks · site {a.siteYear.siteCode} · dataset {a.dataset} v{a.version}
        {a.versionState !== "published" ? ` (${a.versionState.replace("_", " ")})` : ""}
      </Text>
      {a.source === "plots" && a.balanced !== null ? (
        <View style={[styles.status, a.balanced ? styles.statusOk : styles.statusWarn]} testID="anova-balance">
          <Text style={styles.statusText}>
            {a.balanced
              ? `Balanced: every treatment in every block (${a.plots} plots).`
              : `Unbalanced: ${a.missingPlots.length} plot${a.missingPlots.length === 1 ? "" : "s"} missing (${missingText(a)}). ` +
                "Fitted by least squares; means are adjusted for blocks and each pair has its own LSD."}
          </Text>
        </View>
      ) : null}
      {!a.computed && a.reason ? (
        <View style={[styles.status, styles.statusInfo]} testID="anova-not-computed">
          <Text style={styles.statusText}>{a.reason}</Text>
        </View>
      ) : null}
      {a.table ? (
        <GridTable
          label={`Analysis of variance of ${a.siteYear.code}`}
          testID="anova-table"
          head={["Source", "df", "SS", "MS", "F", "p"]}
          weights={[2.3, 0.7, 1.4, 1.3, 1.1, 1.5]}
          rows={[
            termCells("Block", a.table.block),
            termCells("Treatment", a.table.treatment),
            [
              "Residual",
              String(a.table.residual.df),
              formatSquare(a.table.residual.sumOfSquares),
              formatSquare(a.table.residual.meanSquare),
              "",
              "",
            ],
            ["Total", String(a.table.total.df), formatSquare(a.table.total.sumOfSquares), "", "", ""],
          ]}
        />
      ) : null}
      {a.mse !== null ? (
        <View style={styles.facts} testID="anova-facts">
          <Fact label={`MSE (${unit})²`} value={formatNumber(a.mse)} />
          <Fact label="Error df" value={String(a.dfError ?? "–")} />
          <Fact label="CV" value={a.cvPercent === null ? "–" : `${a.cvPercent.toFixed(1)} %`} />
          <Fact
            label="LSD(0.05)"
            value={a.lsd.single !== null ? `${formatNumber(a.lsd.single)} ${unit}` : a.lsd.pairs.length ? "per pair" : "–"}
            testID="anova-lsd"
          />
        </View>
      ) : null}
      {a.means.length ? (
        <GridTable
          label={`Treatment means of ${a.siteYear.code}`}
          testID="anova-means"
          head={["Treatment", a.source === "plots" ? "LS-mean" : "Mean", "SE", a.source === "plots" ? "Plots" : "Reps"]}
          weights={[3, 1.3, 1, 1]}
          rows={a.means.map((m) => [
            `${m.name} (${m.code})${m.isCheck ? " · check" : ""}`,
            formatNumber(m.lsMean ?? m.mean),
            formatNumber(m.standardError),
            String(m.observations),
          ])}
        />
      ) : null}
      {a.lsd.pairs.length ? (
        <Disclosure
          title={pairsOpen ? "LSD(0.05) of each pair" : "Each pair against the LSD"}
          hint={
            pairsOpen
              ? "Plots are missing, so the LSD differs from pair to pair"
              : `Every pair has the one LSD, ${formatNumber(a.lsd.single)} ${unit}`
          }
          initiallyOpen={pairsOpen}
          testID="anova-pairs-toggle"
        >
          <GridTable
            label={`Pairwise differences of ${a.siteYear.code}`}
            testID="anova-pairs"
            head={["Pair", "Diff.", "LSD", "Differs"]}
            weights={[2.6, 1.1, 1, 1.1]}
            rows={a.lsd.pairs.map((p) => [`${p.b} − ${p.a}`, signed(p.difference), formatNumber(p.lsd), p.differs ? "Yes" : "No"])}
          />
          <Text variant="caption">
            Difference: the first treatment's {a.source === "plots" ? "least-squares " : ""}mean minus the second's, in {unit}. A pair
            differs when the difference is larger than its LSD; read pairs after a significant treatment F.
          </Text>
        </Disclosure>
      ) : null}
      {a.notes.map((n) => (
        <Text key={n} variant="caption">
          {n}
        </Text>
      ))}
      <Text variant="caption">One trial's own analysis: another field, season or soil can differ.</Text>
    </View>
  );
}

function Fact({ label, value, testID }: { label: string; value: string; testID?: string }) {
  return (
    <View style={styles.fact} testID={testID}>
      <Text variant="label">{label}</Text>
      <Text style={styles.factValue}>{value}</Text>
    </View>
  );
}

/**
 * A site-year's ANOVA read from the API, with the measure and (for yield) the unit to show it in. `source` names a
 * published version (`{ slug, semver }`) or any version by id (`{ versionId }`: a draft for its editors and reviewers).
 */
export function SiteYearAnovaPanel({
  source,
  code,
  initialChoice = { measure: "yield", units: "bu/ac" },
}: {
  source: AnovaSource;
  code: string;
  initialChoice?: AnovaChoice;
}) {
  const [choice, setChoice] = useState<AnovaChoice>(initialChoice);
  const anova = useSiteYearAnova(source, code, choice);
  return (
    <View style={styles.view} testID="site-year-anova-panel">
      <ChoiceChips
        label="Measure"
        testID="anova-measure"
        choices={anovaMeasures.map((m) => ({ value: m, label: measureLabels[m] }))}
        selected={[choice.measure]}
        onToggle={(measure) => setChoice((c) => ({ ...c, measure }))}
      />
      {choice.measure === "yield" ? (
        <ChoiceChips
          label="Yield unit"
          testID="anova-units"
          choices={yieldUnits.map((u) => ({ value: u, label: u }))}
          selected={[choice.units]}
          onToggle={(units: YieldUnit) => setChoice((c) => ({ ...c, units }))}
        />
      ) : null}
      {anova.isPending ? (
        <LoadingState label={`Loading the analysis of ${code}…`} />
      ) : anova.isError ? (
        <ErrorState error={anova.error} onRetry={() => anova.refetch()} />
      ) : (
        <SiteYearAnovaView anova={anova.data} />
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  view: { gap: space.md },
  status: { borderRadius: radius.md, padding: space.md },
  statusOk: { backgroundColor: colors.fieldTint },
  statusWarn: { backgroundColor: colors.wheatTint },
  statusInfo: { backgroundColor: colors.infoTint },
  statusText: { fontSize: 15, lineHeight: 21 },
  table: { width: "100%", maxWidth: 760, borderWidth: 1, borderColor: colors.line, borderRadius: radius.md, overflow: "hidden" },
  row: { flexDirection: "row", alignItems: "stretch" },
  headRow: { backgroundColor: colors.fieldTint },
  zebra: { backgroundColor: colors.paper },
  cell: { minWidth: 0, paddingVertical: space.sm, paddingHorizontal: 3, justifyContent: "center" },
  firstCell: { paddingLeft: space.sm },
  cellText: { fontSize: 14, lineHeight: 19, fontVariant: ["tabular-nums"] },
  headText: { fontFamily: fonts.semibold, color: colors.fieldDark },
  rowHead: { fontFamily: fonts.medium },
  right: { textAlign: "right" },
  facts: { flexDirection: "row", flexWrap: "wrap", gap: space.md },
  fact: { minWidth: 130, flexGrow: 1, gap: 2 },
  factValue: { fontFamily: fonts.semibold, fontSize: 18, lineHeight: 24, fontVariant: ["tabular-nums"] },
});

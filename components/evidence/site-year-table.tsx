import {
  createColumnHelper,
  createSortedRowModel,
  rowSortingFeature,
  sortFn_alphanumeric,
  sortFn_basic,
  tableFeatures,
  useTable,
  type SortingState,
} from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { Pressable, StyleSheet, View, type LayoutChangeEvent } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, space } from "@/constants/theme";
import type { ForestRow } from "@/schemas/analysis";
import { soilTestClassLabels } from "@/constants/vocabulary";
import { formatInterval, formatResponse, formatPValue, levelLabel } from "./format";

const features = tableFeatures({
  rowSortingFeature,
  sortedRowModel: createSortedRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric, basic: sortFn_basic },
});
const helper = createColumnHelper<typeof features, ForestRow>();

/** Column widths of the table layout; the treatment column takes what is left. */
const widths: Record<string, number> = { siteYearCode: 96, soil: 88, estimate: 116, pooledWeight: 72, pValue: 84 };
const minTreatmentWidth = 280;
/** Narrower than this the rows become a list, so nothing is clipped or scrolls sideways. */
const tableMinWidth = Object.values(widths).reduce((a, b) => a + b, 0) + minTreatmentWidth;

/** One line per treatment (several share the site-year's check when they were combined). */
const treatmentText = (r: ForestRow) => (r.treatmentLabels.length ? r.treatmentLabels : r.treatments).join("\n");
const soilText = (r: ForestRow) =>
  r.soilTestClass === null && r.soilTestValue === null
    ? "–"
    : `${r.soilTestAnalyte ?? ""} ${soilTestClassLabels[r.soilTestClass as keyof typeof soilTestClassLabels] ?? r.soilTestClass ?? ""}${r.soilTestValue !== null ? ` (${r.soilTestValue})` : ""}`.trim();
const weightText = (w: number | null) => (w === null ? "–" : `${w.toFixed(1)} %`);
const ownTrialText = (r: ForestRow) => (r.pValue === null ? "–" : `${r.significant ? "Yes" : "No"}, ${formatPValue(r.pValue)}`);

function buildColumns(units: string) {
  return helper.columns([
    helper.accessor("siteYearCode", { header: "Site-year", sortFn: "alphanumeric" }),
    helper.accessor(treatmentText, { id: "treatments", header: "Treatment", sortFn: "alphanumeric" }),
    helper.accessor((r) => r.soilTestValue ?? Number.NEGATIVE_INFINITY, {
      id: "soil",
      header: "Soil test",
      sortFn: "basic",
      cell: (c) => soilText(c.row.original),
    }),
    helper.accessor("estimate", {
      header: `Response (${units === "ln(treated/check)" ? "ln" : units})`,
      sortFn: "basic",
      cell: (c) => `${formatResponse(c.getValue(), units)}\n${formatInterval(c.row.original.ciLower, c.row.original.ciUpper, units)}`,
    }),
    helper.accessor((r) => r.pooledWeightPercent ?? -1, {
      id: "pooledWeight",
      header: "Weight in mean",
      sortFn: "basic",
      cell: (c) => weightText(c.row.original.pooledWeightPercent),
    }),
    helper.accessor((r) => r.pValue ?? 2, {
      id: "pValue",
      header: "Own trial",
      sortFn: "basic",
      cell: (c) => ownTrialText(c.row.original),
    }),
  ]);
}

/**
 * The site-years behind the estimate, sortable by any column (tap a header; again to reverse). Where the card is too
 * narrow for the columns (a phone) the same rows, in the same order, are a list of labelled lines. The weight shown
 * is each site-year's weight in the headline mean above; grouped rows also give their weight within their group.
 */
export function SiteYearTable({
  rows,
  units,
  groupLabels = {},
}: {
  rows: ForestRow[];
  units: string;
  groupLabels?: Record<string, string>;
}) {
  const columns = useMemo(() => buildColumns(units), [units]);
  const [sorting, setSorting] = useState<SortingState>([]);
  const [width, setWidth] = useState(0);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.floor(e.nativeEvent.layout.width));
  const table = useTable({ features, columns, data: rows, state: { sorting }, onSortingChange: setSorting, getRowId: (r) => r.id });
  const list = width < tableMinWidth;
  const grouped = rows.some((r) => r.group !== null);
  return (
    <View onLayout={onLayout} style={styles.box} testID="site-year-box">
      <Text variant="caption">
        Weight: each site-year's share of the mean above
        {grouped ? "; in a grouped view each row also shows its weight within its group's subtotal" : ""}.
      </Text>
      {list ? <Text variant="label">Sort by (tap again to reverse)</Text> : null}
      <View
        role="table"
        aria-label="Site-years in this analysis"
        aria-rowcount={rows.length + 1}
        testID="site-year-table"
        style={styles.table}
      >
        <View role="row" style={[styles.row, styles.headRow, list && styles.sortRow]}>
          {table.getHeaderGroups()[0]!.headers.map((header) => {
            const sorted = header.column.getIsSorted();
            const title = String(header.column.columnDef.header ?? header.id);
            return (
              <Pressable
                key={header.id}
                role="columnheader"
                aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : "none"}
                accessibilityLabel={`Sort by ${title}`}
                testID={`sort-${header.id}`}
                onPress={() => header.column.toggleSorting(sorted === "asc", false)}
                style={({ focused }: { pressed: boolean; focused?: boolean }) => [
                  styles.cell,
                  styles.headCell,
                  list ? styles.sortChip : header.id === "treatments" ? styles.flexCell : { width: widths[header.id] ?? 90 },
                  focused && styles.focused,
                ]}
              >
                <Text style={styles.headText}>
                  {title}
                  {sorted === "asc" ? " ▲" : sorted === "desc" ? " ▼" : ""}
                </Text>
              </Pressable>
            );
          })}
        </View>
        {table.getRowModel().rows.map((row, i) => {
          const r = row.original;
          const group = r.group !== null ? (groupLabels[r.group] ?? levelLabel(r.group)) : null;
          if (list) {
            return (
              <View key={row.id} role="row" style={[styles.item, i % 2 === 1 && styles.zebra]} testID={`site-year-row-${r.siteYearCode}`}>
                <View role="cell" style={styles.itemHead}>
                  <Text variant="subheading">{r.siteYearCode}</Text>
                  <Text style={styles.itemResponse}>
                    {formatResponse(r.estimate, units)} {units === "ln(treated/check)" ? "ln" : units}
                  </Text>
                </View>
                <View role="cell">
                  <Text style={styles.cellText}>{treatmentText(r)}</Text>
                </View>
                <View role="cell">
                  <Text variant="caption">
                    95 % CI {formatInterval(r.ciLower, r.ciUpper, units)} · soil test {soilText(r)} · own trial {ownTrialText(r)}
                  </Text>
                </View>
                <View role="cell">
                  <Text variant="caption" testID="site-year-weight">
                    Weight in the mean above {weightText(r.pooledWeightPercent)}
                    {group ? ` · within ${group} ${weightText(r.weightPercent)}` : ""}
                  </Text>
                </View>
              </View>
            );
          }
          return (
            <View key={row.id} role="row" style={[styles.row, i % 2 === 1 && styles.zebra]} testID={`site-year-row-${r.siteYearCode}`}>
              {row.getAllCells().map((cell) => (
                <View
                  key={cell.id}
                  role="cell"
                  style={[styles.cell, cell.column.id === "treatments" ? styles.flexCell : { width: widths[cell.column.id] ?? 90 }]}
                >
                  <Text style={styles.cellText}>
                    <table.FlexRender cell={cell} />
                  </Text>
                  {cell.column.id === "treatments" && group ? <Text variant="caption">{group}</Text> : null}
                  {cell.column.id === "pooledWeight" && group ? (
                    <Text variant="caption">{`within group ${weightText(r.weightPercent)}`}</Text>
                  ) : null}
                </View>
              ))}
            </View>
          );
        })}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { width: "100%", gap: space.sm },
  table: { width: "100%" },
  row: { flexDirection: "row", borderBottomWidth: 1, borderBottomColor: colors.line },
  headRow: { borderBottomWidth: 2, borderBottomColor: colors.muted },
  sortRow: { flexWrap: "wrap", gap: space.xs, paddingBottom: space.xs },
  sortChip: { borderColor: colors.line, borderRadius: 8 },
  zebra: { backgroundColor: colors.paper },
  cell: { paddingHorizontal: space.sm, paddingVertical: 6, justifyContent: "center" },
  flexCell: { flex: 1, minWidth: minTreatmentWidth },
  headCell: { minHeight: minTap, borderWidth: 2, borderColor: "transparent" },
  focused: { borderColor: colors.focus },
  headText: { fontFamily: fonts.semibold, fontSize: 13, color: colors.fieldDark },
  cellText: { fontSize: 13, lineHeight: 18, fontVariant: ["tabular-nums"] },
  item: { paddingVertical: space.sm, paddingHorizontal: space.xs, gap: 2, borderBottomWidth: 1, borderBottomColor: colors.line },
  itemHead: { flexDirection: "row", justifyContent: "space-between", gap: space.sm, flexWrap: "wrap" },
  itemResponse: { fontFamily: fonts.semibold, fontVariant: ["tabular-nums"] },
});

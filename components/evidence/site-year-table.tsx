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
import { Pressable, ScrollView, StyleSheet, View } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, space } from "@/constants/theme";
import type { ForestRow } from "@/schemas/analysis";
import { soilTestClassLabels } from "@/constants/vocabulary";
import { formatInterval, formatResponse, formatPValue } from "./format";

const features = tableFeatures({ rowSortingFeature, sortedRowModel: createSortedRowModel(), sortFns: { alphanumeric: sortFn_alphanumeric, basic: sortFn_basic } });
const helper = createColumnHelper<typeof features, ForestRow>();

const widths: Record<string, number> = { siteYearCode: 112, year: 60, treatments: 104, estimate: 84, ci: 150, weightPercent: 72, soilTestClass: 92, soilTestValue: 72, pValue: 108 };

function buildColumns(units: string) {
  return helper.columns([
    helper.accessor("siteYearCode", { header: "Site-year", sortFn: "alphanumeric" }),
    helper.accessor("year", { header: "Year", sortFn: "basic" }),
    helper.accessor((r) => r.treatments.join(" + ") + (r.group ? ` (${r.group})` : ""), { id: "treatments", header: "Treatment", sortFn: "alphanumeric" }),
    helper.accessor("estimate", { header: `Response (${units === "ln(treated/check)" ? "ln" : units})`, sortFn: "basic", cell: (c) => formatResponse(c.getValue(), units) }),
    helper.accessor((r) => r.ciLower, { id: "ci", header: "95 % CI", sortFn: "basic", cell: (c) => formatInterval(c.row.original.ciLower, c.row.original.ciUpper, units) }),
    helper.accessor("weightPercent", { header: "Weight", sortFn: "basic", cell: (c) => `${c.getValue().toFixed(1)} %` }),
    helper.accessor((r) => r.soilTestClass ?? "", { id: "soilTestClass", header: "Soil class", sortFn: "alphanumeric", cell: (c) => soilTestClassLabels[c.getValue() as keyof typeof soilTestClassLabels] ?? "–" }),
    helper.accessor((r) => r.soilTestValue ?? Number.NEGATIVE_INFINITY, { id: "soilTestValue", header: "Soil test", sortFn: "basic", cell: (c) => (c.row.original.soilTestValue === null ? "–" : String(c.row.original.soilTestValue)) }),
    helper.accessor((r) => r.pValue ?? 2, { id: "pValue", header: "Own trial", sortFn: "basic", cell: (c) => (c.row.original.pValue === null ? "–" : `${c.row.original.significant ? "Yes" : "No"}, ${formatPValue(c.row.original.pValue)}`) }),
  ]);
}

/** The site-years behind the estimate, sortable by any column (tap a header; again to reverse). */
export function SiteYearTable({ rows, units }: { rows: ForestRow[]; units: string }) {
  const columns = useMemo(() => buildColumns(units), [units]);
  const [sorting, setSorting] = useState<SortingState>([]);
  const table = useTable({ features, columns, data: rows, state: { sorting }, onSortingChange: setSorting, getRowId: (r) => r.id });
  return (
    <ScrollView horizontal contentContainerStyle={styles.scroller} accessibilityLabel="Site-year table; scrolls sideways">
      <View role="table" aria-label="Site-years in this analysis" aria-rowcount={rows.length + 1} testID="site-year-table">
        {table.getHeaderGroups().map((group) => (
          <View key={group.id} role="row" style={[styles.row, styles.headRow]}>
            {group.headers.map((header) => {
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
                  style={({ focused }: { pressed: boolean; focused?: boolean }) => [styles.cell, styles.headCell, { width: widths[header.id] ?? 90 }, focused && styles.focused]}
                >
                  <Text style={styles.headText}>
                    {title}
                    {sorted === "asc" ? " ▲" : sorted === "desc" ? " ▼" : ""}
                  </Text>
                </Pressable>
              );
            })}
          </View>
        ))}
        {table.getRowModel().rows.map((row, i) => (
          <View key={row.id} role="row" style={[styles.row, i % 2 === 1 && styles.zebra]} testID={`site-year-row-${row.original.siteYearCode}`}>
            {row.getAllCells().map((cell) => (
              <View key={cell.id} role="cell" style={[styles.cell, { width: widths[cell.column.id] ?? 90 }]}>
                <Text style={styles.cellText}>
                  <table.FlexRender cell={cell} />
                </Text>
              </View>
            ))}
          </View>
        ))}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroller: { flexGrow: 0 },
  row: { flexDirection: "row", borderBottomWidth: 1, borderBottomColor: colors.line },
  headRow: { borderBottomWidth: 2, borderBottomColor: colors.muted },
  zebra: { backgroundColor: colors.paper },
  cell: { paddingHorizontal: space.sm, paddingVertical: 6, justifyContent: "center" },
  headCell: { minHeight: minTap, borderWidth: 2, borderColor: "transparent" },
  focused: { borderColor: colors.focus },
  headText: { fontFamily: fonts.semibold, fontSize: 13, color: colors.fieldDark },
  cellText: { fontSize: 13, lineHeight: 18, fontVariant: ["tabular-nums"] },
});

import { flexRender, type Cell, type Header, type HeaderGroup, type Row, type RowData, type TableFeatures } from "@tanstack/react-table";
import { Platform, ScrollView, StyleSheet, View, type TextStyle } from "react-native";
import { colors, fonts, space } from "@/constants/theme";
import { Text } from "@/components/ui/text";

interface GridTable<F extends TableFeatures, T extends RowData> {
  getHeaderGroups: () => HeaderGroup<F, T>[];
  getRowModel: () => { rows: Row<F, T>[] };
}

/**
 * Column renderers here are plain functions without hooks, so they are called directly: a string they return must be
 * wrapped in Text, which rendering them as components (flexRender) would hide from us.
 */
function render<P extends object>(renderer: unknown, props: P): React.ReactNode {
  if (typeof renderer === "function") return (renderer as (p: P) => React.ReactNode)(props);
  return flexRender(renderer as React.ReactNode, props) as React.ReactNode;
}

// Inter's contextual alternates draw "20x1" as "20×1"; a data value must show the characters it holds.
export const literal = (Platform.OS === "web" ? { fontFeatureSettings: '"calt" 0' } : {}) as TextStyle;

function renderContent(node: React.ReactNode) {
  if (typeof node === "string" || typeof node === "number") return <Text style={[styles.cellText, literal]}>{node}</Text>;
  return node;
}

/**
 * Renders a headless table as an ARIA grid of Views (table/row/columnheader/cell roles), scrolling sideways on a
 * narrow screen instead of squeezing the columns. Column widths are fixed per column id so header and cells line up.
 */
export function DataGrid<F extends TableFeatures, T extends RowData>({
  table,
  widths,
  label,
  rowLabel,
  rowTone,
}: {
  table: GridTable<F, T>;
  widths: Record<string, number>;
  label: string;
  rowLabel?: (row: T) => string;
  rowTone?: (row: T) => "danger" | "warn" | undefined;
}) {
  const width = (id: string) => widths[id] ?? 140;
  const total = Object.values(widths).reduce((a, b) => a + b, 0);
  return (
    // Focusable, so a keyboard can scroll a grid of plain values sideways (axe: scrollable-region-focusable).
    <ScrollView horizontal focusable style={styles.scroller} contentContainerStyle={{ minWidth: "100%" }}>
      <View role="table" accessibilityLabel={label} style={[styles.table, { minWidth: total }]}>
        <View role="rowgroup">
          {table.getHeaderGroups().map((group) => (
            <View key={group.id} role="row" style={[styles.row, styles.headerRow]}>
              {group.headers.map((header: Header<F, T, unknown>) => (
                <View
                  key={header.id}
                  role="columnheader"
                  style={[styles.cell, { width: width(header.column.id), flexGrow: width(header.column.id) }]}
                >
                  {header.isPlaceholder ? null : (
                    <Text style={styles.headerText}>{render(header.column.columnDef.header, header.getContext())}</Text>
                  )}
                </View>
              ))}
            </View>
          ))}
        </View>
        <View role="rowgroup">
          {table.getRowModel().rows.map((row) => {
            const tone = rowTone?.(row.original);
            return (
              <View
                key={row.id}
                role="row"
                accessibilityLabel={rowLabel?.(row.original)}
                style={[styles.row, tone === "danger" && styles.rowDanger, tone === "warn" && styles.rowWarn]}
              >
                {row.getAllCells().map((cell: Cell<F, T, unknown>) => (
                  <View key={cell.id} role="cell" style={[styles.cell, { width: width(cell.column.id), flexGrow: width(cell.column.id) }]}>
                    {renderContent(render(cell.column.columnDef.cell, cell.getContext()))}
                  </View>
                ))}
              </View>
            );
          })}
        </View>
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroller: { borderWidth: 1, borderColor: colors.line, borderRadius: 10, backgroundColor: colors.card },
  table: { flexGrow: 1 },
  row: { flexDirection: "row", borderBottomWidth: 1, borderBottomColor: colors.line, minHeight: 44, alignItems: "stretch" },
  headerRow: { backgroundColor: colors.fieldTint },
  rowDanger: { borderLeftWidth: 4, borderLeftColor: colors.danger },
  rowWarn: { borderLeftWidth: 4, borderLeftColor: colors.wheat },
  cell: { paddingHorizontal: space.sm, paddingVertical: space.xs, justifyContent: "center", flexShrink: 0 },
  headerText: { fontFamily: fonts.semibold, fontSize: 13, color: colors.fieldDark },
  cellText: { fontSize: 14, lineHeight: 19 },
});

import {
  columnFilteringFeature,
  createColumnHelper,
  createFilteredRowModel,
  createPaginatedRowModel,
  filterFn_equalsString,
  filterFn_includesString,
  globalFilteringFeature,
  rowPaginationFeature,
  tableFeatures,
  useTable,
  type PaginationState,
} from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import type { ValidationProblem } from "@/schemas/curation";
import { DataGrid } from "./data-grid";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { FieldError, TextField } from "@/components/ui/text-field";

const features = tableFeatures({
  columnFilteringFeature,
  globalFilteringFeature,
  rowPaginationFeature,
  filteredRowModel: createFilteredRowModel(),
  paginatedRowModel: createPaginatedRowModel(),
  filterFns: { equalsString: filterFn_equalsString, includesString: filterFn_includesString },
});

const helper = createColumnHelper<typeof features, ValidationProblem>();
const columns = helper.columns([
  helper.accessor("severity", { header: "Severity", filterFn: "equalsString", enableGlobalFilter: false }),
  helper.accessor("file", { header: "File", enableGlobalFilter: false }),
  // The spreadsheet line is the data row + 1 (the header is line 1); both are shown so nobody counts by hand.
  helper.accessor((p) => (p.row === null ? "" : String(p.row)), {
    id: "row",
    header: "Row",
    cell: (c) => (c.row.original.row === null ? "—" : `${c.row.original.row} (line ${c.row.original.row + 1})`),
    enableGlobalFilter: false,
  }),
  helper.accessor((p) => p.column ?? "", { id: "column", header: "Column", filterFn: "equalsString", cell: (c) => c.getValue() || "—" }),
  helper.accessor((p) => p.value ?? "", { id: "value", header: "Value", cell: (c) => c.getValue() || "—" }),
  helper.accessor("message", { header: "Problem" }),
]);

const widths = { severity: 90, file: 150, row: 120, column: 140, value: 140, message: 360 };
const severityOptions = [
  { value: "all", label: "All" },
  { value: "error", label: "Errors" },
  { value: "warning", label: "Warnings" },
] as const;
type SeverityChoice = (typeof severityOptions)[number]["value"];

/** A validation report: every problem with file, row, column and value, filterable, and downloadable as CSV. */
export function ProblemReportTable({
  problems,
  filename,
  onDownload,
}: {
  problems: ValidationProblem[];
  filename: string;
  onDownload: () => Promise<void>;
}) {
  const [downloading, setDownloading] = useState(false);
  const [downloadError, setDownloadError] = useState<string | null>(null);
  const [severity, setSeverity] = useState<SeverityChoice>("all");
  const [column, setColumn] = useState<string>("");
  const [text, setText] = useState("");
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 50 });

  const columnOptions = useMemo(
    () => [
      { value: "", label: "All columns" },
      ...[...new Set(problems.map((p) => p.column ?? "").filter(Boolean))].sort().map((c) => ({ value: c, label: c })),
    ],
    [problems],
  );
  const columnFilters = useMemo(
    () => [...(severity === "all" ? [] : [{ id: "severity", value: severity }]), ...(column ? [{ id: "column", value: column }] : [])],
    [severity, column],
  );

  const table = useTable({
    features,
    columns,
    data: problems,
    state: { columnFilters, globalFilter: text, pagination },
    onPaginationChange: setPagination,
    globalFilterFn: "includesString",
    getColumnCanGlobalFilter: (c) => c.id === "message" || c.id === "value" || c.id === "column",
  });
  const shown = table.getFilteredRowModel().rows.length;
  const pages = table.getPageCount();

  if (problems.length === 0) return <EmptyState title="No problems" hint="Every row passed the data dictionary's checks." />;

  return (
    <View style={styles.box}>
      <View style={styles.filters}>
        <ChoiceChips
          label="Severity"
          choices={severityOptions}
          selected={[severity]}
          onToggle={(v) => {
            setSeverity(v);
            setPagination((p) => ({ ...p, pageIndex: 0 }));
          }}
        />
        {columnOptions.length > 2 ? (
          <ChoiceChips
            label="Column"
            choices={columnOptions}
            selected={[column]}
            onToggle={(v) => {
              setColumn(v);
              setPagination((p) => ({ ...p, pageIndex: 0 }));
            }}
          />
        ) : null}
        <TextField
          label="Search problems"
          placeholder="Text in the message or value"
          value={text}
          onChangeText={(t) => {
            setText(t);
            setPagination((p) => ({ ...p, pageIndex: 0 }));
          }}
        />
      </View>
      <View style={styles.bar}>
        <Text variant="label" role="status" aria-live="polite">
          Showing {shown} of {problems.length} problem{problems.length === 1 ? "" : "s"}
        </Text>
        <Button
          label="Download report (CSV)"
          tone="secondary"
          busy={downloading}
          onPress={() => {
            setDownloading(true);
            setDownloadError(null);
            onDownload()
              .catch((e: unknown) => setDownloadError(e instanceof Error ? e.message : "The download failed."))
              .finally(() => setDownloading(false));
          }}
        />
      </View>
      {downloadError ? <FieldError message={`The report could not be downloaded: ${downloadError}`} /> : null}
      {shown === 0 ? (
        <EmptyState title="Nothing matches the filter" hint="Clear the search or pick another severity or column." />
      ) : (
        <DataGrid
          table={table}
          widths={widths}
          label={`Validation problems in ${filename}`}
          rowTone={(p) => (p.severity === "error" ? "danger" : "warn")}
          rowLabel={(p) =>
            `${p.severity}${p.row === null ? "" : ` in row ${p.row}`}${p.column ? `, column ${p.column}` : ""}: ${p.message}`
          }
        />
      )}
      {pages > 1 ? (
        <View style={styles.pager}>
          <Button label="Previous page" tone="quiet" disabled={!table.getCanPreviousPage()} onPress={() => table.previousPage()} />
          <Text variant="label">
            Page {pagination.pageIndex + 1} of {pages}
          </Text>
          <Button label="Next page" tone="quiet" disabled={!table.getCanNextPage()} onPress={() => table.nextPage()} />
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.md },
  filters: { gap: space.md, padding: space.md, backgroundColor: colors.paper, borderRadius: 10 },
  bar: { flexDirection: "row", flexWrap: "wrap", alignItems: "center", justifyContent: "space-between", gap: space.sm },
  pager: { flexDirection: "row", alignItems: "center", justifyContent: "center", gap: space.md },
});

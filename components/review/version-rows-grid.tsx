import { createColumnHelper, tableFeatures, useTable } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { Pressable, StyleSheet, View } from "react-native";
import { DataGrid, literal } from "@/components/curation/data-grid";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { resourceTitles } from "@/constants/vocabulary";
import { colors, fonts, minTap, space } from "@/constants/theme";
import { useVersionRows } from "@/hooks/use-review";
import type { CellEditResult } from "@/schemas/curation";
import { resourceName, type ResourceName } from "@/schemas/table-schema";
import { CellEditForm, describeKey, type PickedCell } from "./cell-edit-form";
import { Pager } from "./pager";

const features = tableFeatures({});
type Row = (string | null)[];
const helper = createColumnHelper<typeof features, Row>();

const keyOf = (fields: string[], keyFields: string[], row: Row) =>
  Object.fromEntries(keyFields.map((k) => [k, row[fields.indexOf(k)] ?? ""]));
const sameCell = (a: PickedCell | null, resource: ResourceName, key: Record<string, string>, field: string) =>
  !!a && a.resource === resource && a.field === field && describeKey(a.key) === describeKey(key);

function RowsTable({
  fields,
  keyFields,
  rows,
  resource,
  picked,
  onPick,
}: {
  fields: string[];
  keyFields: string[];
  rows: Row[];
  resource: ResourceName;
  picked: PickedCell | null;
  onPick?: (cell: PickedCell) => void;
}) {
  const columns = useMemo(
    () =>
      helper.columns(
        fields.map((field, i) =>
          helper.accessor((r) => r[i] ?? "", {
            id: field,
            header: keyFields.includes(field) ? `${field} (key)` : field,
            cell: (c) => {
              const shown = c.getValue() === "" ? "—" : c.getValue();
              if (!onPick || keyFields.includes(field)) return shown;
              const key = keyOf(fields, keyFields, c.row.original);
              const on = sameCell(picked, resource, key, field);
              return (
                <Pressable
                  role="button"
                  aria-pressed={on}
                  // The visible value starts the name (WCAG 2.5.3, label in name), then what picking it does.
                  accessibilityLabel={`${c.getValue() === "" ? "empty" : c.getValue()}: change ${field} of ${describeKey(key)}`}
                  onPress={() => onPick({ resource, key, field, current: c.row.original[i] ?? null })}
                  style={({ focused, hovered }: { pressed: boolean; focused?: boolean; hovered?: boolean }) => [
                    styles.editable,
                    (hovered || focused) && styles.editableHover,
                    on && styles.editableOn,
                  ]}
                >
                  <Text style={[styles.value, literal, on && styles.valueOn]}>{shown}</Text>
                </Pressable>
              );
            },
          }),
        ),
      ),
    [fields, keyFields, onPick, picked, resource],
  );
  const table = useTable({ features, columns, data: rows });
  const widths = Object.fromEntries(
    fields.map((f) => [f, Math.max(96, Math.min(200, (f.length + (keyFields.includes(f) ? 6 : 0)) * 9 + 24))]),
  );
  return <DataGrid table={table} widths={widths} label={`${resourceTitles[resource]} rows`} />;
}

/** The last line of a changelog: the one a cell edit adds. */
const lastLine = (text: string) => text.trimEnd().split("\n").at(-1) ?? "";

/**
 * The version's own rows, one resource at a time, paged on the server: what the reviewer approves. With `editable`
 * (a draft, for its editors) each cell that is not a key field can be picked and changed with a reason.
 */
export function VersionRowsGrid({ versionId, editable = false }: { versionId: string; editable?: boolean }) {
  const [resource, setResource] = useState<ResourceName>(editable ? "plots" : "site_years");
  const [page, setPage] = useState(1);
  const [picked, setPicked] = useState<PickedCell | null>(null);
  const [saved, setSaved] = useState<CellEditResult | null>(null);
  // Editing, a shorter page keeps the picked cell and its form close together on a phone.
  const rows = useVersionRows(versionId, resource, page, editable ? 20 : undefined);
  const pick = (cell: PickedCell) => {
    setSaved(null);
    setPicked(cell);
  };
  return (
    <View style={styles.box}>
      <ChoiceChips
        label="Resource"
        choices={resourceName.options.map((r) => ({ value: r, label: resourceTitles[r] }))}
        selected={[resource]}
        onToggle={(r) => {
          setResource(r);
          setPage(1);
          setPicked(null);
        }}
      />
      {rows.isPending ? <LoadingState label="Reading the rows…" /> : null}
      {rows.isError ? <ErrorState error={rows.error} onRetry={() => rows.refetch()} /> : null}
      {rows.data && rows.data.resource === resource ? (
        rows.data.total === 0 ? (
          <EmptyState title={`No ${resourceTitles[resource].toLowerCase()} in this version`} />
        ) : (
          <>
            <Text variant="caption">
              Values as the resource file holds them (stored units).
              {editable
                ? ` Pick a cell to change it; key fields (${rows.data.keyFields.join(", ")}) name the row and stay as they are.`
                : ""}
            </Text>
            <RowsTable
              fields={rows.data.fields}
              keyFields={rows.data.keyFields}
              rows={rows.data.rows}
              resource={resource}
              picked={picked}
              onPick={editable ? pick : undefined}
            />
            <Pager
              page={rows.data.page}
              limit={rows.data.limit}
              total={rows.data.total}
              what={`${resourceTitles[resource]} rows`}
              onPage={setPage}
            />
          </>
        )
      ) : null}
      {editable && picked ? (
        <CellEditForm
          key={`${picked.resource} ${describeKey(picked.key)} ${picked.field}`}
          versionId={versionId}
          cell={picked}
          onCancel={() => setPicked(null)}
          onSaved={(result) => {
            setPicked(null);
            setSaved(result);
          }}
        />
      ) : null}
      {saved ? (
        <View role="status" style={styles.saved}>
          <Text style={styles.savedHead}>
            Saved: {saved.field} of {describeKey(saved.key)} is now {saved.to ?? "(empty)"} (was {saved.from ?? "(empty)"}).
          </Text>
          <Text variant="caption">Changelog: {lastLine(saved.changelog)}</Text>
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.md },
  editable: {
    minHeight: minTap - 8,
    justifyContent: "center",
    paddingHorizontal: space.xs,
    borderRadius: 6,
    borderWidth: 1,
    borderColor: colors.line,
    borderStyle: "dashed",
  },
  editableHover: { borderColor: colors.focus, borderStyle: "solid" },
  editableOn: { borderColor: colors.field, borderWidth: 2, borderStyle: "solid", backgroundColor: colors.fieldTint },
  value: { fontSize: 14, lineHeight: 19 },
  valueOn: { fontFamily: fonts.semibold, color: colors.fieldDark },
  saved: { padding: space.md, borderRadius: 10, backgroundColor: colors.fieldTint, gap: space.xs },
  savedHead: { fontFamily: fonts.semibold, color: colors.fieldDark },
});

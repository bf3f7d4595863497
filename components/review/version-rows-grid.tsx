import { createColumnHelper, tableFeatures, useTable } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { StyleSheet, View } from "react-native";
import { DataGrid } from "@/components/curation/data-grid";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { resourceTitles } from "@/constants/vocabulary";
import { space } from "@/constants/theme";
import { useVersionRows } from "@/hooks/use-review";
import { resourceName, type ResourceName } from "@/schemas/table-schema";
import { Pager } from "./pager";

const features = tableFeatures({});
type Row = (string | null)[];
const helper = createColumnHelper<typeof features, Row>();

function RowsTable({ fields, rows, resource }: { fields: string[]; rows: Row[]; resource: ResourceName }) {
  const columns = useMemo(
    () =>
      helper.columns(
        fields.map((field, i) =>
          helper.accessor((r) => r[i] ?? "", { id: field, header: field, cell: (c) => (c.getValue() === "" ? "—" : c.getValue()) }),
        ),
      ),
    [fields],
  );
  const table = useTable({ features, columns, data: rows });
  const widths = Object.fromEntries(fields.map((f) => [f, Math.max(96, Math.min(200, f.length * 9 + 24))]));
  return <DataGrid table={table} widths={widths} label={`${resourceTitles[resource]} rows`} />;
}

/** The version's own rows, one resource at a time, paged on the server: what the reviewer approves. */
export function VersionRowsGrid({ versionId }: { versionId: string }) {
  const [resource, setResource] = useState<ResourceName>("site_years");
  const [page, setPage] = useState(1);
  const rows = useVersionRows(versionId, resource, page);
  return (
    <View style={styles.box}>
      <ChoiceChips
        label="Resource"
        choices={resourceName.options.map((r) => ({ value: r, label: resourceTitles[r] }))}
        selected={[resource]}
        onToggle={(r) => {
          setResource(r);
          setPage(1);
        }}
      />
      {rows.isPending ? <LoadingState label="Reading the rows…" /> : null}
      {rows.isError ? <ErrorState error={rows.error} onRetry={() => rows.refetch()} /> : null}
      {rows.data && rows.data.resource === resource ? (
        rows.data.total === 0 ? (
          <EmptyState title={`No ${resourceTitles[resource].toLowerCase()} in this version`} />
        ) : (
          <>
            <Text variant="caption">Values as the resource file holds them (stored units).</Text>
            <RowsTable fields={rows.data.fields} rows={rows.data.rows} resource={resource} />
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
    </View>
  );
}

const styles = StyleSheet.create({ box: { gap: space.md } });

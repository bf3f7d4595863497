import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { resourceTitles } from "@/constants/vocabulary";
import { colors, fonts, space } from "@/constants/theme";
import { useVersionDiff } from "@/hooks/use-curation-versions";
import { useDiffRows } from "@/hooks/use-review";
import type { VersionDiff } from "@/schemas/curation";
import type { VersionDiffRows } from "@/schemas/review";
import type { ResourceName } from "@/schemas/table-schema";
import { Pager } from "./pager";

const changeWords = { added: "Added", removed: "Removed", changed: "Changed" } as const;
const toneOf = { added: colors.fieldDark, removed: colors.danger, changed: colors.info } as const;
const show = (x: string | null) => (x === null || x === "" ? "(empty)" : x);

function DiffRow({ row }: { row: VersionDiffRows["rows"][number] }) {
  const cells =
    row.change === "changed"
      ? row.cells.filter((c) => c.changed).map((c) => `${c.field}: ${show(c.old)} → ${show(c.new)}`)
      : row.cells.map((c) => `${c.field}: ${show(row.change === "added" ? c.new : c.old)}`);
  return (
    <View role="listitem" style={styles.row} aria-label={`${changeWords[row.change]} ${row.key}`} testID={`diff-row-${row.key}`}>
      <Text style={[styles.change, { color: toneOf[row.change] }]}>
        {changeWords[row.change]} {row.key}
      </Text>
      {row.change === "changed" ? (
        cells.map((c) => (
          <Text key={c} style={styles.changedCell}>
            {c}
          </Text>
        ))
      ) : (
        // A whole added or removed row reads as one line of its values.
        <Text style={styles.cell}>{cells.join(" · ")}</Text>
      )}
    </View>
  );
}

function ResourceRows({ from, to, resource }: { from: string; to: string; resource: ResourceName }) {
  const [page, setPage] = useState(1);
  const rows = useDiffRows(from, to, resource, page);
  if (rows.isPending) return <LoadingState label="Reading the changed rows…" />;
  if (rows.isError) return <ErrorState error={rows.error} onRetry={() => rows.refetch()} />;
  return (
    <View style={styles.box}>
      <View role="list" aria-label={`${resourceTitles[resource]}: rows that differ`} style={styles.list}>
        {rows.data.rows.map((r) => (
          <DiffRow key={`${r.change}-${r.key}`} row={r} />
        ))}
      </View>
      <Pager
        page={rows.data.page}
        limit={rows.data.limit}
        total={rows.data.total}
        what={`changed ${resourceTitles[resource]} rows`}
        onPage={setPage}
      />
    </View>
  );
}

function Summary({ diff }: { diff: VersionDiff }) {
  const entries = Object.entries(diff.rows) as [ResourceName, VersionDiff["rows"][ResourceName]][];
  const touched = entries.filter(([, r]) => r.added || r.removed || r.changed);
  const [resource, setResource] = useState<ResourceName | null>(null);
  const current = resource && touched.some(([r]) => r === resource) ? resource : (touched[0]?.[0] ?? null);
  return (
    <Card>
      <Text variant="heading">Changes since v{diff.from.semver} (the latest published)</Text>
      <View style={styles.explain} role="status" testID="bump-explanation">
        <Text style={styles.explainText}>{diff.explanation}</Text>
        <Text variant="caption">Suggested number v{diff.suggestedSemver}.</Text>
      </View>
      {touched.length === 0 ? <EmptyState title="No rows differ" hint="The rows are those of the published version." /> : null}
      <View role="list" aria-label="Changes per resource" style={styles.list}>
        {touched.map(([r, d]) => (
          <Text key={r} role="listitem">
            <Text style={styles.bold}>{resourceTitles[r]}</Text>: {d.added} added, {d.removed} removed, {d.changed} changed
            {d.fields.length ? ` (${d.fields.map((f) => `${f.field} in ${f.rows}`).join(", ")})` : ""}
          </Text>
        ))}
      </View>
      {current ? (
        <>
          <ChoiceChips
            label="Rows of"
            choices={touched.map(([r]) => ({ value: r, label: resourceTitles[r] }))}
            selected={[current]}
            onToggle={setResource}
          />
          <ResourceRows key={current} from={diff.from.id} to={diff.to.id} resource={current} />
        </>
      ) : null}
    </Card>
  );
}

/** The diff against the latest published version: a summary per resource first, then the rows, old → new. */
export function DiffValues({ from, to }: { from: string; to: string }) {
  const diff = useVersionDiff(from, to);
  if (diff.isPending) return <LoadingState label="Comparing with the published version…" />;
  if (diff.isError) return <ErrorState error={diff.error} onRetry={() => diff.refetch()} />;
  return <Summary diff={diff.data} />;
}

const styles = StyleSheet.create({
  box: { gap: space.sm },
  list: { gap: space.sm },
  row: { gap: 2, paddingVertical: space.xs, borderBottomWidth: 1, borderBottomColor: colors.line },
  change: { fontFamily: fonts.semibold },
  cell: { fontSize: 13 },
  changedCell: { fontSize: 13, fontFamily: fonts.medium },
  explain: { padding: space.md, borderRadius: 10, backgroundColor: colors.infoTint, gap: space.xs },
  explainText: { fontFamily: fonts.semibold, color: colors.info },
  bold: { fontFamily: fonts.semibold },
});

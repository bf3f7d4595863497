import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, fonts, space } from "@/constants/theme";
import { useVersionDiff } from "@/hooks/use-curation-versions";
import type { VersionDiff } from "@/schemas/curation";
import type { ResourceName } from "@/schemas/table-schema";
import { resourceTitles } from "@/constants/vocabulary";

const bumpWords = { major: "MAJOR", minor: "MINOR", patch: "PATCH" } as const;

function List({ title, items, tone }: { title: string; items: string[]; tone: "add" | "remove" | "change" }) {
  if (items.length === 0) return null;
  const color = tone === "add" ? colors.fieldDark : tone === "remove" ? colors.danger : colors.info;
  return (
    <View style={styles.group}>
      <Text variant="subheading" style={{ color }}>
        {title} ({items.length})
      </Text>
      <Text>{items.join(", ")}</Text>
    </View>
  );
}

function DiffSummary({ diff }: { diff: VersionDiff }) {
  const rowEntries = Object.entries(diff.rows) as [ResourceName, VersionDiff["rows"][ResourceName]][];
  const changedRows = rowEntries.filter(([, r]) => r && (r.added || r.removed || r.changed));
  const nothing =
    !diff.siteYears.added.length &&
    !diff.siteYears.removed.length &&
    !diff.siteYears.changed.length &&
    !changedRows.length &&
    !diff.schema.added.length &&
    !diff.schema.removed.length &&
    !diff.schema.changed.length;
  return (
    <View style={styles.box}>
      <View
        style={styles.bump}
        role="status"
        accessibilityLabel={`Suggested bump ${bumpWords[diff.suggestedBump]}, version ${diff.suggestedSemver}`}
      >
        <Text variant="label">Suggested version</Text>
        <Text style={styles.bumpText}>
          {bumpWords[diff.suggestedBump]} → v{diff.suggestedSemver}
        </Text>
        <Text variant="caption">
          From v{diff.from.semver} to v{diff.to.semver}.
        </Text>
        {diff.reasons.map((r) => (
          <Text key={r}>• {r}</Text>
        ))}
      </View>
      {nothing ? <EmptyState title="No differences" hint="The two versions hold the same rows and dictionary." /> : null}
      <Card>
        <Text variant="heading">Site-years</Text>
        <List title="Added" items={diff.siteYears.added} tone="add" />
        <List title="Removed" items={diff.siteYears.removed} tone="remove" />
        <List title="Changed" items={diff.siteYears.changed.map((c) => `${c.siteYear} (${c.fields.join(", ")})`)} tone="change" />
        {!diff.siteYears.added.length && !diff.siteYears.removed.length && !diff.siteYears.changed.length ? (
          <Text variant="caption">Same site-years.</Text>
        ) : null}
      </Card>
      <Card>
        <Text variant="heading">Rows</Text>
        <View role="table" accessibilityLabel="Rows added, removed and changed per resource">
          <View role="row" style={[styles.tr, styles.th]}>
            {["Resource", "Added", "Removed", "Changed"].map((h) => (
              <Text key={h} role="columnheader" style={[styles.td, styles.thText]}>
                {h}
              </Text>
            ))}
          </View>
          {rowEntries.map(([res, r]) => (
            <View key={res} role="row" style={styles.tr}>
              <Text role="cell" style={styles.td}>
                {resourceTitles[res]}
              </Text>
              <Text role="cell" style={[styles.td, styles.num]}>
                {r?.added ?? 0}
              </Text>
              <Text role="cell" style={[styles.td, styles.num]}>
                {r?.removed ?? 0}
              </Text>
              <Text role="cell" style={[styles.td, styles.num]}>
                {r?.changed ?? 0}
              </Text>
            </View>
          ))}
        </View>
        {changedRows.flatMap(([res, r]) =>
          (r?.sample ?? []).slice(0, 5).map((s) => (
            <Text key={`${res}-${s.key}-${s.change}`} variant="caption">
              {resourceTitles[res]} {s.key}: {s.change}
              {s.fields.length ? ` (${s.fields.join(", ")})` : ""}
            </Text>
          )),
        )}
      </Card>
      <Card>
        <Text variant="heading">Data dictionary</Text>
        <List title="Fields added" items={diff.schema.added} tone="add" />
        <List title="Fields removed" items={diff.schema.removed} tone="remove" />
        <List title="Fields changed" items={diff.schema.changed.map((c) => `${c.field} (${c.what.join(", ")})`)} tone="change" />
        {!diff.schema.added.length && !diff.schema.removed.length && !diff.schema.changed.length ? (
          <Text variant="caption">Same fields.</Text>
        ) : null}
      </Card>
    </View>
  );
}

/** The differences between two versions, fetched from the server. */
export function VersionDiffView({ from, to }: { from: string | undefined; to: string | undefined }) {
  const diff = useVersionDiff(from, to);
  if (!from || !to || from === to)
    return <EmptyState title="Pick two different versions" hint="Choose the version to compare from and the one to compare to." />;
  if (diff.isPending) return <LoadingState label="Comparing the versions…" />;
  if (diff.isError) return <ErrorState error={diff.error} onRetry={() => diff.refetch()} />;
  return <DiffSummary diff={diff.data} />;
}

const styles = StyleSheet.create({
  box: { gap: space.lg },
  group: { gap: space.xs },
  bump: { padding: space.lg, borderRadius: 12, backgroundColor: colors.infoTint, gap: space.xs },
  bumpText: { fontFamily: fonts.bold, fontSize: 22, lineHeight: 28, color: colors.info },
  tr: { flexDirection: "row", borderBottomWidth: 1, borderBottomColor: colors.line, minHeight: 40, alignItems: "center" },
  th: { backgroundColor: colors.fieldTint },
  thText: { fontFamily: fonts.semibold, color: colors.fieldDark },
  td: { flex: 1, paddingHorizontal: space.sm },
  num: { fontVariant: ["tabular-nums"] },
});

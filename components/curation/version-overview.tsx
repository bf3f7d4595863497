import { useState } from "react";
import { Pressable, StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { EmptyState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, space } from "@/constants/theme";
import type { VersionDetail } from "@/schemas/curation";
import { resourceName } from "@/schemas/table-schema";
import { resourceTitles } from "@/constants/vocabulary";
import { formatBytes, formatDay } from "./format";
import { ReportView } from "./report-view";
import { placeList } from "@/schemas/messages";

/** Site-years without responses, one line per reason ("no plots or summary means yet: TB-01, TB-02, TB-03 and 69 more"). */
function groupByReason(list: readonly { siteYear: string; reason: string }[]): [string, string[]][] {
  const by = new Map<string, string[]>();
  for (const u of list) by.set(u.reason, [...(by.get(u.reason) ?? []), u.siteYear]);
  return [...by];
}

/** What the version holds: rows per resource, site-years without responses, uploads and their reports. */
export function VersionOverview({ version }: { version: VersionDetail }) {
  const [reportId, setReportId] = useState<string | null>(null);
  return (
    <View style={styles.box}>
      <Card>
        <Text variant="heading">Contents</Text>
        {version.counts === null ? (
          <Text>This version was withdrawn; only its description remains.</Text>
        ) : (
          <View style={styles.counts} role="list" accessibilityLabel="Rows per resource">
            {resourceName.options.map((r) => (
              <View key={r} role="listitem" style={styles.count} accessibilityLabel={`${resourceTitles[r]}: ${version.counts?.[r] ?? 0}`}>
                <Text style={styles.countNum}>{version.counts?.[r] ?? 0}</Text>
                <Text variant="caption">{resourceTitles[r]}</Text>
              </View>
            ))}
            <View role="listitem" style={styles.count} accessibilityLabel={`Responses: ${version.responses ?? 0}`}>
              <Text style={styles.countNum}>{version.responses ?? 0}</Text>
              <Text variant="caption">Responses</Text>
            </View>
          </View>
        )}
        {version.uncomputedSiteYears.length ? (
          <View style={styles.warn}>
            <Text variant="subheading" style={{ color: colors.wheatText }}>
              Site-years without responses ({version.uncomputedSiteYears.length})
            </Text>
            {groupByReason(version.uncomputedSiteYears).map(([reason, codes]) => (
              <Text key={reason}>
                {reason}: {placeList(codes, codes.length)}
              </Text>
            ))}
          </View>
        ) : null}
        {version.checksum ? (
          <Text variant="caption" selectable>
            Checksum {version.checksum}
          </Text>
        ) : null}
      </Card>

      <Card>
        <Text variant="heading">Uploads and reports</Text>
        {version.reports.length === 0 ? (
          <EmptyState title="No uploads yet" hint="Upload sites first, then site-years, treatments, soil tests and plots (or summaries)." />
        ) : (
          <View role="list" accessibilityLabel="Validation reports">
            {version.reports.map((r) => (
              <View key={r.id} role="listitem">
                <Pressable
                  role="button"
                  aria-expanded={reportId === r.id}
                  onPress={() => setReportId(reportId === r.id ? null : r.id)}
                  style={StyleSheet.flatten([styles.report, reportId === r.id && styles.reportOn])}
                >
                  <Text style={{ color: r.accepted ? colors.fieldDark : colors.danger, fontFamily: fonts.semibold }}>
                    {r.accepted ? "Accepted" : "Rejected"}
                  </Text>
                  <Text style={styles.grow}>
                    {resourceTitles[r.resource]} · {r.filename}
                  </Text>
                  <Text variant="caption">
                    {r.errors} errors · {r.warnings} warnings · {formatDay(r.createdAt)}
                  </Text>
                </Pressable>
              </View>
            ))}
          </View>
        )}
        {version.uploads.length ? (
          <Text variant="caption">
            Stored files:{" "}
            {version.uploads
              .map((u) => `${u.filename} (${resourceTitles[u.resource]}, ${u.rowCount} rows, ${formatBytes(u.byteSize)})`)
              .join("; ")}
          </Text>
        ) : null}
      </Card>
      {reportId ? <ReportView versionId={version.id} reportId={reportId} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.lg },
  counts: { flexDirection: "row", flexWrap: "wrap", gap: space.md },
  count: { minWidth: 96, padding: space.sm, borderRadius: 10, backgroundColor: colors.paper, alignItems: "flex-start" },
  countNum: { fontFamily: fonts.bold, fontSize: 22, lineHeight: 28, fontVariant: ["tabular-nums"] },
  warn: { padding: space.md, borderRadius: 10, backgroundColor: colors.wheatTint, gap: space.xs },
  report: {
    minHeight: minTap,
    flexDirection: "row",
    flexWrap: "wrap",
    alignItems: "center",
    gap: space.md,
    paddingVertical: space.sm,
    paddingHorizontal: space.sm,
    borderBottomWidth: 1,
    borderBottomColor: colors.line,
  },
  reportOn: { backgroundColor: colors.fieldTint },
  grow: { flexGrow: 1 },
});

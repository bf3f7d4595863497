import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { curationPaths } from "@/hooks/curation-keys";
import { useReport } from "@/hooks/use-validation-reports";
import { send } from "@/lib/api-client";
import { resourceTitles } from "@/constants/vocabulary";
import { ProblemReportTable } from "@/components/lazy-tables";
import { saveTextFile } from "./save-text-file";

/** One stored validation report: the verdict, the counts, then every problem. */
/** "plots-2024.csv" → "plots-2024-report.csv". */
const reportFilename = (file: string) => `${file.replace(/\.[^.]+$/, "") || "upload"}-report.csv`;

export function ReportView({ versionId, reportId }: { versionId: string; reportId: string }) {
  const report = useReport(versionId, reportId);
  if (report.isPending) return <LoadingState label="Loading the validation report…" />;
  if (report.isError) return <ErrorState error={report.error} onRetry={() => report.refetch()} />;
  const r = report.data;
  return (
    <Card accessibilityLabel={`Validation report for ${r.filename}`}>
      <View style={[styles.verdict, r.accepted ? styles.ok : styles.bad]} role="status">
        <Text variant="subheading" style={{ color: r.accepted ? colors.fieldDark : colors.danger }}>
          {r.accepted ? `${r.filename} was accepted` : `${r.filename} was not stored`}
        </Text>
        <Text>
          {resourceTitles[r.resource]} · {r.errors} error{r.errors === 1 ? "" : "s"} · {r.warnings} warning{r.warnings === 1 ? "" : "s"}
          {r.accepted ? "" : ". Nothing from this file was saved: fix the rows below and upload it again."}
        </Text>
      </View>
      {r.groups.some((g) => g.count > 1) ? (
        <View role="list" accessibilityLabel="Problems by kind" style={styles.groups}>
          {r.groups.map((g, i) => (
            <View key={`${g.kind ?? "one"}-${i}`} role="listitem" style={styles.group}>
              <Text style={{ color: g.severity === "error" ? colors.danger : colors.wheatText }}>
                {g.severity === "error" ? "Error" : "Warning"}
                {g.count > 1 ? ` ×${g.count}` : ""}
              </Text>
              <Text style={styles.grow}>{g.message}</Text>
            </View>
          ))}
        </View>
      ) : null}
      <ProblemReportTable
        problems={r.problems}
        filename={r.filename}
        // The server's CSV is the whole report (all problems, not only those loaded here), spreadsheet-safe.
        onDownload={async () => {
          const res = await send(curationPaths.reportCsv(versionId, reportId), { headers: { Accept: "text/csv" } });
          await saveTextFile(reportFilename(r.filename), await res.text());
        }}
      />
    </Card>
  );
}

const styles = StyleSheet.create({
  verdict: { padding: space.md, borderRadius: 10, gap: space.xs },
  groups: { gap: space.xs },
  group: { flexDirection: "row", gap: space.sm, flexWrap: "wrap" },
  grow: { flex: 1, minWidth: 200 },
  ok: { backgroundColor: colors.fieldTint },
  bad: { backgroundColor: colors.dangerTint },
});

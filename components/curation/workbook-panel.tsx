import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { ServerLink } from "@/components/ui/server-link";
import { ErrorState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { resourceTitles } from "@/constants/vocabulary";
import { curationKeys } from "@/hooks/curation-keys";
import { uploadWithProgress, type PickedFile } from "@/lib/upload-client";
import { workbookUploadResult, type VersionDetail } from "@/schemas/curation";
import { resourceName } from "@/schemas/table-schema";
import { CsvFilePicker } from "./csv-file-picker";
import { ProgressBar } from "./progress-bar";
import { ReportView } from "./report-view";

const versionPath = (id: string) => `/api/v1/curation/versions/${encodeURIComponent(id)}`;

/** Blank files made from the draft's data dictionary, so they carry every field it has (the curator's own included). */
export function TemplateLinks({ version }: { version: VersionDetail }) {
  const base = versionPath(version.id);
  return (
    <Card>
      <Text variant="heading">Blank files to fill in</Text>
      <Text variant="caption">Made from this draft&apos;s data dictionary: each has its columns and two example rows to replace.</Text>
      <ServerLink href={`${base}/templates/workbook.xlsx`} label="Workbook template (.xlsx, one sheet per resource)" />
      <ServerLink href={`${base}/templates/README.txt`} label="What each column means (README.txt)" />
      <View style={styles.links}>
        {resourceName.options.map((r) => (
          <ServerLink key={r} href={`${base}/templates/${r}.csv`} label={`${resourceTitles[r]} CSV template`} />
        ))}
      </View>
    </Card>
  );
}

/**
 * Upload a whole .xlsx workbook (one sheet per resource). All sheets are stored or none; a rejected sheet's report
 * names the workbook and sheet, the row and the column, as a CSV report does.
 */
export function WorkbookPanel({ version }: { version: VersionDetail }) {
  const qc = useQueryClient();
  const [file, setFile] = useState<PickedFile | null>(null);
  const [progress, setProgress] = useState(0);
  const upload = useMutation({
    mutationFn: async (picked: PickedFile) =>
      workbookUploadResult.parse(
        await uploadWithProgress(`${versionPath(version.id)}/workbook-uploads`, { mode: "merge", file: picked }, setProgress),
      ),
    onSettled: () => qc.invalidateQueries({ queryKey: curationKeys.version(version.id) }),
  });
  const start = () => {
    if (!file) return;
    setProgress(0);
    upload.mutate(file);
  };
  const result = upload.data;
  const rejected = result?.sheets.find((s) => s.status === "rejected");
  return (
    <View style={styles.box}>
      <Card>
        <Text variant="heading">Add data from a workbook</Text>
        <Text variant="caption">
          An .xlsx with one sheet per resource, named as in the workbook template. Every sheet is stored, or none.
        </Text>
        <CsvFilePicker
          file={file}
          label="Choose .xlsx workbook"
          accept=".xlsx,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
          inputLabel="Workbook file"
          onPick={(f) => {
            setFile(f);
            upload.reset();
          }}
        />
        <Button label="Upload workbook" disabled={!file || upload.isPending} busy={upload.isPending} onPress={start} style={styles.left} />
        {upload.isPending ? <ProgressBar fraction={progress} label={`Uploading ${file?.name ?? "the workbook"}`} /> : null}
        {upload.isError ? <ErrorState error={upload.error} onRetry={start} /> : null}
        {result ? (
          <View role="status" style={[styles.verdict, result.accepted ? styles.ok : styles.bad]}>
            <Text variant="subheading" style={{ color: result.accepted ? colors.fieldDark : colors.danger }}>
              {result.accepted
                ? `${result.filename} was accepted: ${result.sheets.length} sheet(s) stored`
                : `${result.filename} was not stored: sheet ${rejected?.sheet ?? "?"} has ${result.errors} error(s)`}
            </Text>
            {result.sheets.map((s) => (
              <Text key={s.sheet}>
                Sheet {s.sheet}: {s.status}
              </Text>
            ))}
          </View>
        ) : null}
      </Card>
      {rejected ? <ReportView versionId={version.id} reportId={rejected.reportId} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.lg },
  left: { alignSelf: "flex-start" },
  links: { flexDirection: "row", flexWrap: "wrap", columnGap: space.lg },
  verdict: { padding: space.md, borderRadius: 10, gap: space.xs },
  ok: { backgroundColor: colors.fieldTint },
  bad: { backgroundColor: colors.dangerTint },
});

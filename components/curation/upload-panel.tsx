import { useEffect, useState } from "react";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { ErrorState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { useUploadMutation } from "@/hooks/use-uploads";
import type { PickedFile } from "@/lib/upload-client";
import type { UploadOptions, UploadUnits, VersionDetail } from "@/schemas/curation";
import { resourceName, type ResourceName } from "@/schemas/table-schema";
import { CsvFilePicker } from "./csv-file-picker";
import { readCsvHeader } from "./csv-header";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { resourceTitles } from "@/constants/vocabulary";
import { ProgressBar } from "./progress-bar";
import { ReportView } from "./report-view";

const resourceOptions = resourceName.options.map((value) => ({ value, label: resourceTitles[value] }));
const yieldUnits = [
  { value: "kg/ha", label: "kg/ha" },
  { value: "bu/ac", label: "bu/ac" },
  { value: "lb/ac", label: "lb/ac" },
] as const;
const moistureBases = [
  { value: "standard", label: "At standard moisture" },
  { value: "harvest", label: "At harvest moisture" },
] as const;
const soilUnits = [
  { value: "ppm", label: "ppm" },
  { value: "lb/ac", label: "lb/ac" },
] as const;
const gradeBases = [
  { value: "oxide", label: "Oxide (P2O5, K2O)" },
  { value: "element", label: "Element (P, K)" },
] as const;
const modes = [
  { value: "merge", label: "Merge with what is there" },
  { value: "replace", label: "Replace the whole resource" },
] as const;

const defaultUnits: UploadUnits = { yield: "kg/ha", yieldMoisture: "standard", soilTest: "ppm", gradeBasis: "oxide" };

/**
 * Upload one CSV into a draft: pick the resource and file, optionally map headers and say the units, watch it go up,
 * then read the validation report. A rejected file stores nothing, so fixing and re-sending is always safe.
 */
export function UploadPanel({ version }: { version: VersionDetail }) {
  const [resource, setResource] = useState<ResourceName>("sites");
  const [file, setFile] = useState<PickedFile | null>(null);
  const [header, setHeader] = useState<string[]>([]);
  const [mapping, setMapping] = useState<Record<string, string>>({});
  const [units, setUnits] = useState<UploadUnits>(defaultUnits);
  const [mode, setMode] = useState<UploadOptions["mode"]>("merge");
  const [showOptions, setShowOptions] = useState(false);
  const [progress, setProgress] = useState(0);
  const [reportId, setReportId] = useState<string | null>(null);
  const upload = useUploadMutation(version.id);

  useEffect(() => {
    let live = true;
    setMapping({});
    if (file)
      readCsvHeader(file).then(
        (h) => live && setHeader(h),
        () => live && setHeader([]),
      );
    else setHeader([]);
    return () => {
      live = false;
    };
  }, [file]);

  const fields = version.tableSchema.resources[resource]?.fields.map((f) => f.name) ?? [];
  // The server matches headers to fields ignoring case, so the hint does too.
  const lowerFields = new Set(fields.map((f) => f.toLowerCase()));
  const unmatched = header.filter((h) => !lowerFields.has(h.toLowerCase()));

  const start = () => {
    if (!file) return;
    setProgress(0);
    setReportId(null);
    upload.mutate(
      { resource, file, options: { mapping, units, mode }, onProgress: setProgress },
      { onSuccess: (result) => setReportId(result.reportId) },
    );
  };

  return (
    <View style={styles.box}>
      <Card>
        <Text variant="heading">Add data from a CSV</Text>
        <ChoiceChips
          label="Resource"
          choices={resourceOptions}
          selected={[resource]}
          onToggle={(r) => {
            setResource(r);
            setMapping({});
          }}
        />
        <CsvFilePicker
          file={file}
          onPick={(f) => {
            setFile(f);
            setReportId(null);
            upload.reset();
          }}
        />
        {header.length ? (
          <Text variant="caption">
            Columns found: {header.join(", ")}
            {unmatched.length
              ? ` — ${unmatched.length} not in the ${resourceTitles[resource].toLowerCase()} dictionary`
              : " — all match the dictionary"}
          </Text>
        ) : null}

        <Button
          label={showOptions ? "Hide column mapping and units" : "Column mapping and units"}
          tone="quiet"
          aria-expanded={showOptions}
          onPress={() => setShowOptions((s) => !s)}
          style={styles.left}
        />
        {showOptions ? (
          <View style={styles.options}>
            {unmatched.length ? (
              <View style={styles.mapping}>
                <Text variant="subheading">Map columns to dictionary fields</Text>
                {unmatched.map((h) => (
                  <ChoiceChips
                    key={h}
                    label={`Column "${h}" holds`}
                    choices={[{ value: "", label: "(ignore)" }, ...fields.map((f) => ({ value: f, label: f }))]}
                    selected={[mapping[h] ?? ""]}
                    onToggle={(f) =>
                      setMapping((m) => {
                        const next = { ...m };
                        if (f) next[h] = f;
                        else delete next[h];
                        return next;
                      })
                    }
                  />
                ))}
              </View>
            ) : (
              <Text variant="caption">
                {file ? "Every column matches a dictionary field by name." : "Choose a file to map its columns."}
              </Text>
            )}
            {resource === "plots" || resource === "summaries" ? (
              <>
                <ChoiceChips
                  label="Yield unit"
                  choices={yieldUnits}
                  selected={[units.yield]}
                  onToggle={(v) => setUnits((u) => ({ ...u, yield: v }))}
                />
                <ChoiceChips
                  label="Yield moisture basis"
                  choices={moistureBases}
                  selected={[units.yieldMoisture]}
                  onToggle={(v) => setUnits((u) => ({ ...u, yieldMoisture: v }))}
                />
              </>
            ) : null}
            {resource === "soil_tests" ? (
              <ChoiceChips
                label="Soil-test unit"
                choices={soilUnits}
                selected={[units.soilTest]}
                onToggle={(v) => setUnits((u) => ({ ...u, soilTest: v }))}
              />
            ) : null}
            {resource === "treatments" ? (
              <ChoiceChips
                label="Fertilizer grade basis"
                choices={gradeBases}
                selected={[units.gradeBasis]}
                onToggle={(v) => setUnits((u) => ({ ...u, gradeBasis: v }))}
              />
            ) : null}
            <ChoiceChips label="How to combine" choices={modes} selected={[mode]} onToggle={setMode} />
          </View>
        ) : null}

        <Button
          label={`Upload ${resourceTitles[resource].toLowerCase()}`}
          disabled={!file || upload.isPending}
          busy={upload.isPending}
          onPress={start}
          style={styles.left}
        />
        {upload.isPending ? <ProgressBar fraction={progress} label={`Uploading ${file?.name ?? "the file"}`} /> : null}
        {upload.isError ? <ErrorState error={upload.error} onRetry={start} /> : null}
      </Card>
      {reportId ? <ReportView versionId={version.id} reportId={reportId} /> : null}
      {upload.data && !upload.data.accepted ? null : upload.data?.responses?.uncomputed.length ? (
        <Card>
          <Text variant="subheading" style={{ color: colors.wheatText }}>
            Site-years without responses
          </Text>
          <Text>
            {upload.data.groups
              .filter((g) => g.kind?.startsWith("no-responses:"))
              .map((g) => g.message)
              .join(" · ")}
          </Text>
        </Card>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.lg },
  left: { alignSelf: "flex-start" },
  options: { gap: space.md, padding: space.md, backgroundColor: colors.paper, borderRadius: 10 },
  mapping: { gap: space.md },
});

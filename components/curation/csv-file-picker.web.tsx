import { useRef } from "react";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";
import type { PickedFile } from "@/lib/upload-client";
import { formatBytes } from "./format";

/** The browser's own file chooser behind a button of our style; the input stays in the page for keyboard and tests. */
export function CsvFilePicker({
  file,
  onPick,
  label = "Choose CSV file",
  accept = ".csv,.tsv,.txt,text/csv,text/tab-separated-values,text/plain",
  inputLabel = "CSV file",
}: {
  file: PickedFile | null;
  onPick: (file: PickedFile | null) => void;
  label?: string;
  accept?: string;
  inputLabel?: string;
}) {
  const input = useRef<HTMLInputElement>(null);
  return (
    <View style={styles.row}>
      <input
        ref={input}
        type="file"
        accept={accept}
        aria-label={inputLabel}
        style={{ position: "absolute", width: 1, height: 1, opacity: 0, overflow: "hidden" }}
        onChange={(e) => {
          const f = e.currentTarget.files?.[0];
          onPick(f ? { kind: "web", name: f.name, size: f.size, blob: f } : null);
          // Picking the same file again after fixing it must fire change again.
          e.currentTarget.value = "";
        }}
      />
      <Button label={label} tone="secondary" onPress={() => input.current?.click()} />
      <Text variant="label" numberOfLines={1} style={styles.name}>
        {file ? `${file.name}${file.size !== null ? ` · ${formatBytes(file.size)}` : ""}` : "No file chosen"}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: "row", alignItems: "center", gap: space.md, flexWrap: "wrap" },
  name: { flexShrink: 1 },
});

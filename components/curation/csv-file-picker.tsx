import * as DocumentPicker from "expo-document-picker";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";
import type { PickedFile } from "@/lib/upload-client";

/** On a phone, the system document picker; the file is streamed from its local URI when uploaded. */
export function CsvFilePicker({
  file,
  onPick,
  label = "Choose CSV file",
}: {
  file: PickedFile | null;
  onPick: (file: PickedFile | null) => void;
  label?: string;
  /** File types for the web chooser; the phone's picker offers every document. */
  accept?: string;
  inputLabel?: string;
}) {
  return (
    <View style={styles.row}>
      <Button
        label={label}
        tone="secondary"
        onPress={async () => {
          const result = await DocumentPicker.getDocumentAsync({
            type: ["text/csv", "text/comma-separated-values", "text/plain", "*/*"],
            copyToCacheDirectory: true,
          });
          const asset = result.canceled ? undefined : result.assets[0];
          onPick(
            asset
              ? { kind: "native", name: asset.name, size: asset.size ?? null, uri: asset.uri, mimeType: asset.mimeType ?? "text/csv" }
              : null,
          );
        }}
      />
      <Text variant="label" numberOfLines={1} style={styles.name}>
        {file ? file.name : "No file chosen"}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: "row", alignItems: "center", gap: space.md, flexWrap: "wrap" },
  name: { flexShrink: 1 },
});

import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { serverFieldIssues, zodFieldIssues, type FieldIssues } from "@/components/curation/field-issues";
import { Button } from "@/components/ui/button";
import { FieldError, TextField } from "@/components/ui/text-field";
import { Text } from "@/components/ui/text";
import { resourceTitles } from "@/constants/vocabulary";
import { colors, space } from "@/constants/theme";
import { useCellEditMutation } from "@/hooks/use-review";
import { cellEditBody, type CellEditResult } from "@/schemas/curation";
import type { ResourceName } from "@/schemas/table-schema";

/** The cell being changed: its row (by its key fields), its field and the value it holds now. */
export interface PickedCell {
  resource: ResourceName;
  key: Record<string, string>;
  field: string;
  current: string | null;
}

export const describeKey = (key: Record<string, string>) =>
  Object.entries(key)
    .map(([k, v]) => `${k} ${v}`)
    .join(", ");

/**
 * Change one cell of a draft: the new value as the resource file would hold it (stored unit) and why. The server
 * checks the edited row as a merge upload would; a refusal is shown at the value and changes nothing.
 */
export function CellEditForm({
  versionId,
  cell,
  onSaved,
  onCancel,
}: {
  versionId: string;
  cell: PickedCell;
  onSaved: (result: CellEditResult) => void;
  onCancel: () => void;
}) {
  const [value, setValue] = useState(cell.current ?? "");
  const [reason, setReason] = useState("");
  const [issues, setIssues] = useState<FieldIssues>({});
  const edit = useCellEditMutation(versionId);
  const where = describeKey(cell.key);

  const save = async () => {
    const body = cellEditBody.safeParse({ resource: cell.resource, key: cell.key, field: cell.field, value, reason });
    if (!body.success) return setIssues(zodFieldIssues(body.error));
    setIssues({});
    try {
      onSaved(await edit.mutateAsync(body.data));
    } catch (error) {
      setIssues(serverFieldIssues(error));
    }
  };

  const other = Object.entries(issues).filter(([k]) => k !== "value" && k !== "reason");
  return (
    <View style={styles.box} role="group" aria-label={`Change ${cell.field} of ${where}`}>
      <Text variant="subheading">
        {resourceTitles[cell.resource]}: {cell.field} of {where}
      </Text>
      <Text variant="caption">Now: {cell.current ?? "(empty)"}. Values are in the stored unit, as the resource file holds them.</Text>
      <TextField
        label="New value"
        value={value}
        onChangeText={setValue}
        autoCapitalize="none"
        // Focused on opening, which also brings the form into view under a long grid.
        autoFocus
        error={issues.value}
        hint="Leave empty for a missing value."
      />
      <TextField
        label="Reason for the change"
        value={reason}
        onChangeText={setReason}
        multiline
        error={issues.reason}
        hint="Goes into the version's changelog with the old and new value."
      />
      {other.map(([k, m]) => (
        <FieldError key={k} message={k ? `${k}: ${m}` : m} />
      ))}
      <View style={styles.actions}>
        <Button label="Save the change" busy={edit.isPending} onPress={save} />
        <Button label="Cancel" tone="quiet" onPress={onCancel} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.sm, padding: space.md, borderRadius: 10, borderWidth: 1, borderColor: colors.field, backgroundColor: colors.card },
  actions: { flexDirection: "row", flexWrap: "wrap", gap: space.md, alignItems: "center" },
});

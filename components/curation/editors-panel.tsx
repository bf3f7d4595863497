import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { FieldError, TextField } from "@/components/ui/text-field";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { useAddEditorMutation, useRemoveEditorMutation } from "@/hooks/use-curation-datasets";
import { ApiError } from "@/lib/api-error";
import type { CurationDataset } from "@/schemas/curation";

/**
 * Who works on a dataset besides its owner. Editors may change drafts, upload and submit; only the owner (or an
 * admin) chooses them. Anyone who may see the dataset's desk sees the list.
 */
export function EditorsPanel({ dataset }: { dataset: CurationDataset }) {
  const [email, setEmail] = useState("");
  const add = useAddEditorMutation(dataset.slug);
  const remove = useRemoveEditorMutation(dataset.slug);
  const addErrors = add.error instanceof ApiError ? add.error.fieldErrors() : {};
  const share = () =>
    add.mutate(email.trim(), {
      onSuccess: () => setEmail(""),
    });
  return (
    <Card style={{ gap: space.md }} testID="editors-panel">
      <Text variant="heading">Editors</Text>
      <Text variant="caption">
        Editors may change drafts, upload and submit versions for review. Only the dataset's owner or an admin chooses them.
      </Text>
      {dataset.editors.length === 0 ? (
        <Text>No editors yet: only the owner works on this dataset.</Text>
      ) : (
        <View role="list" aria-label="Editors" style={{ gap: space.xs }}>
          {dataset.editors.map((e) => (
            <View key={e.id} role="listitem" style={styles.row}>
              <View style={{ flex: 1, minWidth: 180 }}>
                <Text variant="subheading">{e.displayName}</Text>
                {e.email ? <Text variant="caption">{e.email}</Text> : null}
              </View>
              {dataset.canShare ? (
                <Button
                  tone="danger"
                  label="Remove"
                  accessibilityLabel={`Remove ${e.displayName} as editor`}
                  busy={remove.isPending && remove.variables === e.id}
                  onPress={() => remove.mutate(e.id)}
                />
              ) : null}
            </View>
          ))}
        </View>
      )}
      {remove.isError ? <FieldError message={remove.error.message} /> : null}
      {dataset.canShare ? (
        <View style={{ gap: space.sm }}>
          <TextField
            label="Share with a curator (e-mail)"
            value={email}
            onChangeText={setEmail}
            inputMode="email"
            autoCapitalize="none"
            autoComplete="email"
            error={addErrors.email ?? (add.error && !Object.keys(addErrors).length ? add.error.message : undefined)}
            hint="They need a curator account; they will see the dataset in their workbench."
            onSubmitEditing={share}
          />
          <Button label="Add editor" busy={add.isPending} style={{ alignSelf: "flex-start" }} disabled={!email.trim()} onPress={share} />
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  row: {
    flexDirection: "row",
    flexWrap: "wrap",
    alignItems: "center",
    gap: space.sm,
    paddingVertical: space.xs,
    borderBottomWidth: StyleSheet.hairlineWidth,
    borderBottomColor: colors.line,
  },
});

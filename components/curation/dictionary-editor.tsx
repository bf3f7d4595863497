import { createColumnHelper, tableFeatures, useTable } from "@tanstack/react-table";
import { useCallback, useMemo, useState } from "react";
import { Pressable, StyleSheet, TextInput, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, radius, space } from "@/constants/theme";
import { useSaveTableSchemaMutation } from "@/hooks/use-curation-versions";
import type { VersionDetail } from "@/schemas/curation";
import { resourceName, tableSchemaDescriptor, tableSchemaFieldType, type ResourceName } from "@/schemas/table-schema";
import { DataGrid } from "./data-grid";
import { blankRow, renamesOf, rowsOf, withResourceFields, type DictionaryRow, type RowRename } from "./dictionary-rows";
import { issuesUnder, serverFieldIssues, zodFieldIssues, type FieldIssues } from "./field-issues";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { FieldError } from "@/components/ui/text-field";
import { resourceTitles } from "@/constants/vocabulary";

const features = tableFeatures({});
const helper = createColumnHelper<typeof features, DictionaryRow>();
type TextKey = "name" | "type" | "unit" | "description" | "minimum" | "maximum" | "enumText";
const issueKey: Record<TextKey, string> = {
  name: "name",
  type: "type",
  unit: "unit",
  description: "description",
  minimum: "constraints.minimum",
  maximum: "constraints.maximum",
  enumText: "constraints.enum",
};
const widths = { name: 170, type: 110, unit: 100, description: 280, required: 100, minimum: 100, maximum: 100, enumText: 220, remove: 110 };
const resourceOptions = resourceName.options.map((value) => ({ value, label: resourceTitles[value] }));
const typeHint = tableSchemaFieldType.options.join(", ");
/** How a row is named to assistive tech: by its stored name, so the name stays put while the Field cell is edited. */
const rowName = (row: DictionaryRow, index: number) => (row.original ? `field ${row.original.name}` : `new field ${index + 1}`);

/** The server's answer about a rename (renames.N.from/to) shown at the Field cell of the row it came from. */
function atRenamedRows(issues: FieldIssues, renames: readonly RowRename[]): FieldIssues {
  const out: FieldIssues = {};
  for (const [key, message] of Object.entries(issues)) {
    const m = /^renames\.(\d+)\./.exec(key);
    const r = m ? renames[Number(m[1])] : undefined;
    out[r ? `resources.${r.resource}.fields.${r.row}.name` : key] ??= message;
  }
  return out;
}

function Cell({
  value,
  label,
  error,
  readOnly,
  onChange,
}: {
  value: string;
  label: string;
  error?: string;
  readOnly: boolean;
  onChange: (v: string) => void;
}) {
  if (readOnly) return <Text style={styles.readOnly}>{value || "—"}</Text>;
  return (
    <View>
      <TextInput
        accessibilityLabel={label}
        aria-invalid={error ? true : undefined}
        value={value}
        onChangeText={onChange}
        autoCapitalize="none"
        style={[styles.input, !!error && styles.inputError]}
      />
      {error ? (
        <Text variant="caption" style={styles.error}>
          {error}
        </Text>
      ) : null}
    </View>
  );
}

/**
 * The version's data dictionary, one Table Schema per resource, edited in a grid. Saving checks the whole descriptor
 * with the shared schema first and shows each problem in its cell; the server checks it again.
 */
export function DictionaryEditor({ version }: { version: VersionDetail }) {
  const [resource, setResource] = useState<ResourceName>("plots");
  const [rowsByResource, setRowsByResource] = useState<Partial<Record<ResourceName, DictionaryRow[]>>>({});
  const [issues, setIssues] = useState<FieldIssues>({});
  const [saved, setSaved] = useState(false);
  const save = useSaveTableSchemaMutation(version.id);
  const readOnly = !(version.canEdit && version.state === "draft");

  const stored = useMemo(() => rowsOf(version.tableSchema.resources[resource]?.fields ?? []), [version.tableSchema, resource]);
  const rows = rowsByResource[resource] ?? stored;
  const dirty = Object.keys(rowsByResource).length > 0;

  const update = useCallback(
    (index: number, patch: Partial<DictionaryRow>) => {
      setSaved(false);
      setRowsByResource((all) => {
        const current = all[resource] ?? rowsOf(version.tableSchema.resources[resource]?.fields ?? []);
        return { ...all, [resource]: current.map((r, i) => (i === index ? { ...r, ...patch } : r)) };
      });
    },
    [resource, version.tableSchema],
  );
  const removeRow = useCallback(
    (index: number) => {
      setSaved(false);
      setRowsByResource((all) => {
        const current = all[resource] ?? rowsOf(version.tableSchema.resources[resource]?.fields ?? []);
        return { ...all, [resource]: current.filter((_, i) => i !== index) };
      });
    },
    [resource, version.tableSchema],
  );

  const rowIssues = useCallback((index: number) => issuesUnder(issues, `resources.${resource}.fields.${index}.`), [issues, resource]);

  const columns = useMemo(() => {
    const text = (key: TextKey, header: string) =>
      helper.accessor(key, {
        header,
        cell: (c) => (
          <Cell
            value={c.getValue()}
            label={`${resourceTitles[resource]} ${rowName(c.row.original, c.row.index)}: ${header}`}
            error={rowIssues(c.row.index)[issueKey[key]]}
            readOnly={readOnly}
            onChange={(v) => update(c.row.index, { [key]: v })}
          />
        ),
      });
    return helper.columns([
      text("name", "Field"),
      text("type", "Type"),
      text("unit", "Unit"),
      text("description", "Description"),
      helper.accessor("required", {
        header: "Required",
        cell: (c) => (
          <Pressable
            role="checkbox"
            aria-checked={c.getValue()}
            aria-disabled={readOnly}
            accessibilityLabel={`${resourceTitles[resource]} ${rowName(c.row.original, c.row.index)}: required`}
            disabled={readOnly}
            onPress={() => update(c.row.index, { required: !c.getValue() })}
            style={styles.check}
          >
            <Text style={styles.checkMark}>{c.getValue() ? "✓ yes" : "no"}</Text>
          </Pressable>
        ),
      }),
      text("minimum", "Minimum"),
      text("maximum", "Maximum"),
      text("enumText", "Allowed values"),
      helper.display({
        id: "remove",
        // A column header needs words (axe: empty-table-header); a read-only dictionary has nothing to remove.
        header: readOnly ? "—" : "Remove",
        cell: (c) =>
          readOnly ? null : (
            <Button
              label="Remove"
              tone="quiet"
              accessibilityLabel={`Remove ${resourceTitles[resource].toLowerCase()} ${rowName(c.row.original, c.row.index)}`}
              onPress={() => removeRow(c.row.index)}
            />
          ),
      }),
    ]);
  }, [resource, readOnly, update, removeRow, rowIssues]);

  const table = useTable({ features, columns, data: rows });

  const onSave = async () => {
    let descriptor = version.tableSchema;
    const renames: RowRename[] = [];
    for (const [res, edited] of Object.entries(rowsByResource) as [ResourceName, DictionaryRow[]][]) {
      descriptor = withResourceFields(descriptor, res, edited);
      renames.push(...renamesOf(res, edited));
    }
    const checked = tableSchemaDescriptor.safeParse(descriptor);
    if (!checked.success) {
      setIssues(zodFieldIssues(checked.error));
      const first = checked.error.issues[0]?.path[1];
      if (typeof first === "string" && (resourceName.options as readonly string[]).includes(first)) setResource(first as ResourceName);
      return;
    }
    setIssues({});
    try {
      await save.mutateAsync({ ...checked.data, renames: renames.map(({ row: _row, ...r }) => r) });
      setRowsByResource({});
      setSaved(true);
    } catch (error) {
      const found = atRenamedRows(serverFieldIssues(error), renames);
      setIssues(found);
      const first = /^resources\.(\w+)\./.exec(Object.keys(found)[0] ?? "")?.[1];
      if (first && (resourceName.options as readonly string[]).includes(first)) setResource(first as ResourceName);
    }
  };

  const otherIssues = Object.entries(issues).filter(([k]) => !/^resources\.\w+\.fields\.\d+\./.test(k));
  const issueCount = Object.keys(issues).length;
  return (
    <Card>
      <Text variant="heading">Data dictionary</Text>
      <Text variant="caption">
        Each resource is a Frictionless Table Schema: field names, types, units and constraints. Uploads are checked against it before
        anything is stored.
        {readOnly ? " This version is not an editable draft, so the dictionary is read-only." : ""}
      </Text>
      <ChoiceChips label="Resource" choices={resourceOptions} selected={[resource]} onToggle={setResource} />
      <Text variant="caption">
        Types: {typeHint}. Allowed values are separated by commas. A field of your own keeps its values when you rename it and takes them
        with it when you remove it; Plotbank's own fields keep their names.
      </Text>
      <DataGrid table={table} widths={widths} label={`${resourceTitles[resource]} data dictionary`} />
      {readOnly ? null : (
        <View style={styles.actions}>
          <Button
            label="Add field"
            tone="secondary"
            onPress={() => {
              setSaved(false);
              setRowsByResource((all) => ({ ...all, [resource]: [...rows, blankRow()] }));
            }}
          />
          <Button label="Save dictionary" busy={save.isPending} disabled={!dirty} onPress={onSave} />
          {saved ? (
            <Text role="status" style={{ color: colors.fieldDark }}>
              Dictionary saved.
            </Text>
          ) : null}
        </View>
      )}
      {otherIssues.map(([k, m]) => (
        <FieldError key={k} message={k ? `${k}: ${m}` : m} />
      ))}
      {issueCount > 0 ? (
        <FieldError message={`The dictionary was not saved: ${issueCount} problem${issueCount === 1 ? "" : "s"} to correct.`} />
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  input: {
    minHeight: minTap,
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.sm,
    paddingHorizontal: space.sm,
    backgroundColor: colors.card,
    color: colors.ink,
    fontFamily: fonts.regular,
    fontSize: 14,
  },
  inputError: { borderColor: colors.danger, borderWidth: 2 },
  error: { color: colors.danger },
  readOnly: { fontSize: 14 },
  check: { minHeight: minTap, minWidth: minTap, justifyContent: "center" },
  checkMark: { fontFamily: fonts.semibold, color: colors.fieldDark },
  actions: { flexDirection: "row", flexWrap: "wrap", gap: space.md, alignItems: "center" },
});

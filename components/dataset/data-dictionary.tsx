import { StyleSheet, View } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import type { TableSchemaDescriptor, TableSchemaField } from "@/schemas/table-schema";
import { Disclosure } from "@/components/evidence/disclosure";
import { resourceTitles, type ResourceName } from "@/constants/vocabulary";

function constraintsOf(f: TableSchemaField): string {
  const c = f.constraints ?? {};
  const parts: string[] = [];
  if (c.required) parts.push("required");
  if (c.unique) parts.push("unique");
  if (c.minimum !== undefined) parts.push(`≥ ${c.minimum}`);
  if (c.maximum !== undefined) parts.push(`≤ ${c.maximum}`);
  if (c.enum) parts.push(`one of ${c.enum.join(", ")}`);
  if (f.categories) parts.push(`one of ${f.categories.map((x) => `${x.value} (${x.label})`).join(", ")}`);
  return parts.join(" · ");
}

/** The version's Table Schema as a readable dictionary: one section per resource, one entry per field. */
export function DataDictionary({ schema }: { schema: TableSchemaDescriptor }) {
  const entries = Object.entries(schema.resources);
  if (!entries.length) return <Text variant="caption">This version has no data dictionary.</Text>;
  return (
    <View style={styles.stack} testID="data-dictionary">
      {entries.map(([name, resource]) => (
        <Disclosure
          key={name}
          title={resourceTitles[name as ResourceName] ?? name}
          hint={`${resource!.fields.length} fields${resource!.primaryKey ? ` · key ${resource!.primaryKey.join(", ")}` : ""}`}
          testID={`dictionary-${name}`}
        >
          <View style={styles.fields}>
            {resource!.fields.map((f) => (
              <View key={f.name} style={styles.field}>
                <Text variant="subheading">
                  {f.title ?? f.name} <Text variant="mono">{f.name}</Text>
                </Text>
                <Text variant="caption">
                  {f.type}
                  {f.unit ? ` · ${f.unit}` : ""}
                  {constraintsOf(f) ? ` · ${constraintsOf(f)}` : ""}
                </Text>
                {f.description ? <Text>{f.description}</Text> : null}
              </View>
            ))}
            {resource!.missingValues?.length ? (
              <Text variant="caption">Missing values: {resource!.missingValues.map((m) => `"${m.value}" = ${m.label}`).join("; ")}</Text>
            ) : null}
          </View>
        </Disclosure>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.sm },
  fields: { gap: space.md },
  field: { gap: 2, borderLeftWidth: 3, borderLeftColor: colors.fieldTint, paddingLeft: space.sm },
});

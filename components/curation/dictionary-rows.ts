import type { FieldRename } from "@/schemas/curation";
import type { ResourceName, TableSchemaDescriptor, TableSchemaField } from "@/schemas/table-schema";

/** One data-dictionary field as the editor holds it: numbers and enum lists as typed text until saved. */
export interface DictionaryRow {
  name: string;
  type: string;
  unit: string;
  description: string;
  required: boolean;
  minimum: string;
  maximum: string;
  enumText: string;
  /** The stored field, so properties the grid does not show (title, pattern, categories…) survive a save. */
  original: TableSchemaField | null;
}

export function rowsOf(fields: readonly TableSchemaField[]): DictionaryRow[] {
  return fields.map((f) => ({
    name: f.name,
    type: f.type,
    unit: f.unit ?? "",
    description: f.description ?? "",
    required: !!f.constraints?.required,
    minimum: f.constraints?.minimum === undefined ? "" : String(f.constraints.minimum),
    maximum: f.constraints?.maximum === undefined ? "" : String(f.constraints.maximum),
    enumText: f.constraints?.enum?.join(", ") ?? "",
    original: f,
  }));
}

export const blankRow = (): DictionaryRow => ({
  name: "",
  type: "string",
  unit: "",
  description: "",
  required: false,
  minimum: "",
  maximum: "",
  enumText: "",
  original: null,
});

/** A number typed in a cell; text that is not one is passed through so the shared schema names the cell. */
function numberOrText(text: string): number | string | undefined {
  const t = text.trim();
  if (t === "") return undefined;
  const n = Number(t);
  return Number.isFinite(n) ? n : t;
}

/** Editor rows → a Table Schema field, dropping empty optionals and keeping what the grid does not edit. */
export function fieldOf(row: DictionaryRow): TableSchemaField {
  const { required: _r, minimum: _min, maximum: _max, enum: _enum, ...keptConstraints } = row.original?.constraints ?? {};
  const enumValues = row.enumText
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean);
  const constraints = {
    ...keptConstraints,
    ...(row.required ? { required: true } : {}),
    ...(numberOrText(row.minimum) !== undefined ? { minimum: numberOrText(row.minimum) } : {}),
    ...(numberOrText(row.maximum) !== undefined ? { maximum: numberOrText(row.maximum) } : {}),
    ...(enumValues.length ? { enum: enumValues } : {}),
  };
  const kept: Partial<TableSchemaField> = { ...row.original };
  delete kept.unit;
  delete kept.description;
  delete kept.constraints;
  // Categories describe enum values; ones whose value left the enum would contradict it.
  const categories = kept.categories?.filter((c) => enumValues.includes(c.value));
  delete kept.categories;
  return {
    ...kept,
    ...(categories && categories.length ? { categories } : {}),
    name: row.name.trim(),
    type: row.type.trim() as TableSchemaField["type"],
    ...(row.unit.trim() ? { unit: row.unit.trim() } : {}),
    ...(row.description.trim() ? { description: row.description.trim() } : {}),
    ...(Object.keys(constraints).length ? { constraints: constraints as TableSchemaField["constraints"] } : {}),
  };
}

/**
 * The whole descriptor with one resource's fields replaced; the rest of it (other resources, the version's own
 * measures and soil-test schemes) stays as it is.
 */
export function withResourceFields(
  descriptor: TableSchemaDescriptor,
  resource: ResourceName,
  rows: readonly DictionaryRow[],
): TableSchemaDescriptor {
  const current = descriptor.resources[resource];
  const fields = rows.map(fieldOf);
  return { ...descriptor, resources: { ...descriptor.resources, [resource]: { ...(current ?? {}), fields } } };
}

/** A stored field whose name was changed in the grid, with the row it sits in (for showing the server's answer there). */
export interface RowRename extends FieldRename {
  row: number;
}

/** The renames a save sends, so the values stored under a field's old name follow it to the new one. */
export function renamesOf(resource: ResourceName, rows: readonly DictionaryRow[]): RowRename[] {
  return rows.flatMap((r, row) => {
    const to = r.name.trim();
    return r.original && to && to !== r.original.name ? [{ resource, from: r.original.name, to, row }] : [];
  });
}

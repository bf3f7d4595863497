import type { Db } from "@/db/client";
import type { FieldRename } from "@/schemas/curation";
import type { ResourceName, TableSchemaDescriptor, TableSchemaField } from "@/schemas/table-schema";
import { badRequest, notFound } from "@/server/errors";
import { versionById, type User } from "./access";
import { putTableSchema } from "./versions";

/**
 * Field-at-a-time edits of a draft's data dictionary. Each builds the whole new dictionary and goes through
 * `putTableSchema`, so one set of rules (and one place that moves or drops stored values) governs every edit.
 */

function withFields(schema: TableSchemaDescriptor, resource: ResourceName, fields: TableSchemaField[]): TableSchemaDescriptor {
  const current = schema.resources[resource];
  if (!current) throw notFound(`The data dictionary has no ${resource} resource.`);
  return { ...schema, resources: { ...schema.resources, [resource]: { ...current, fields } } };
}

function fieldsOf(schema: TableSchemaDescriptor, resource: ResourceName): TableSchemaField[] {
  const current = schema.resources[resource];
  if (!current) throw notFound(`The data dictionary has no ${resource} resource.`);
  return current.fields;
}

export async function addField(db: Db, user: User, versionId: string, resource: ResourceName, field: TableSchemaField) {
  const { version } = await versionById(db, versionId);
  const fields = fieldsOf(version.tableSchema, resource);
  if (fields.some((f) => f.name === field.name))
    throw badRequest(`The ${resource} dictionary already has a field ${field.name}.`, [{ field: "body.field.name", message: "taken" }]);
  await putTableSchema(db, user, versionId, withFields(version.tableSchema, resource, [...fields, field]));
}

export async function changeField(
  db: Db,
  user: User,
  versionId: string,
  resource: ResourceName,
  name: string,
  change: { name?: string; field?: Partial<TableSchemaField> },
) {
  const { version } = await versionById(db, versionId);
  const fields = fieldsOf(version.tableSchema, resource);
  const at = fields.findIndex((f) => f.name === name);
  if (at < 0) throw notFound(`The ${resource} dictionary has no field ${name}.`);
  const to = change.name ?? name;
  const next = { ...fields[at]!, ...change.field, name: to };
  const renames: FieldRename[] = to !== name ? [{ resource, from: name, to }] : [];
  const edited = fields.map((f, i) => (i === at ? next : f));
  await putTableSchema(db, user, versionId, { ...withFields(version.tableSchema, resource, edited), renames });
}

export async function removeField(db: Db, user: User, versionId: string, resource: ResourceName, name: string) {
  const { version } = await versionById(db, versionId);
  const fields = fieldsOf(version.tableSchema, resource);
  if (!fields.some((f) => f.name === name)) throw notFound(`The ${resource} dictionary has no field ${name}.`);
  await putTableSchema(
    db,
    user,
    versionId,
    withFields(
      version.tableSchema,
      resource,
      fields.filter((f) => f.name !== name),
    ),
  );
}

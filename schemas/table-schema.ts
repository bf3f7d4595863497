import { z } from "zod";

/**
 * Frictionless Table Schema (v2) as Plotbank stores it: each version carries one descriptor per resource, and the
 * same descriptors drive upload validation, the data-dictionary page and the OpenAPI row schemas.
 */
export const tableSchemaFieldType = z.enum(["string", "number", "integer", "boolean", "date", "year"]);

export const tableSchemaField = z
  .object({
    name: z.string().min(1).max(64).regex(/^[a-z][a-zA-Z0-9_]*$/, "lower camelCase or snake_case, starting with a letter"),
    title: z.string().max(200).optional(),
    description: z.string().max(2000).optional(),
    type: tableSchemaFieldType,
    /** Unit of measure, e.g. "bu/ac", "kg/ha", "%", "ppm", "in". */
    unit: z.string().max(40).optional(),
    constraints: z
      .object({
        required: z.boolean().optional(),
        unique: z.boolean().optional(),
        minimum: z.number().optional(),
        maximum: z.number().optional(),
        minLength: z.number().int().optional(),
        maxLength: z.number().int().optional(),
        pattern: z.string().optional(),
        enum: z.array(z.string()).optional(),
      })
      .optional(),
    /** Enum categories with labels, as Table Schema v2's `categories`. */
    categories: z.array(z.object({ value: z.string(), label: z.string() })).optional(),
  })
  .meta({ id: "TableSchemaField" });

/**
 * The resources of a version. These names are the one home of a resource's name: the upload path, the Data Package
 * resource and its file, the foreign keys that point at it and the keys of the /schema answer all use them as they are.
 */
export const resourceName = z.enum(["sites", "site_years", "soil_tests", "treatments", "plots", "summaries"]);

export const tableSchemaResource = z
  .object({
    fields: z.array(tableSchemaField).min(1),
    primaryKey: z.array(z.string()).optional(),
    foreignKeys: z
      .array(
        z.object({
          fields: z.array(z.string()),
          reference: z.object({ resource: resourceName, fields: z.array(z.string()) }),
        }),
      )
      .optional(),
    /** Missing-value codes with their labels, e.g. { value: "NA", label: "not measured" }. */
    missingValues: z.array(z.object({ value: z.string(), label: z.string() })).optional(),
  })
  .meta({ id: "TableSchema" });

export const tableSchemaDescriptor = z
  .object({
    resources: z.record(resourceName, tableSchemaResource),
  })
  .meta({ id: "VersionTableSchemas" });

export type TableSchemaField = z.infer<typeof tableSchemaField>;
export type TableSchemaResource = z.infer<typeof tableSchemaResource>;
export type TableSchemaDescriptor = z.infer<typeof tableSchemaDescriptor>;
export type ResourceName = z.infer<typeof resourceName>;

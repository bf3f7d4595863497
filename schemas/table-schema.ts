import { z } from "zod";
import { resourceNames } from "@/constants/vocabulary";
import { betterDirections } from "@/constants/measures";
import { line, paragraph } from "./safe-text";
import { soilTestScheme } from "./soil-test-schemes";

/**
 * Frictionless Table Schema (v2) as Plotbank stores it: each version carries one descriptor per resource, and the
 * same descriptors drive upload validation, the data-dictionary page and the OpenAPI row schemas.
 */
export const tableSchemaFieldType = z.enum(["string", "number", "integer", "boolean", "date", "year"]);

export const tableSchemaField = z
  .object({
    name: line()
      .min(1)
      .max(64)
      .regex(/^[a-z][a-zA-Z0-9_]*$/, "lower camelCase or snake_case, starting with a letter"),
    title: line().max(200).optional(),
    description: paragraph().max(2000).optional(),
    type: tableSchemaFieldType,
    /** Unit of measure, e.g. "bu/ac", "kg/ha", "%", "ppm", "in". */
    unit: line().max(40).optional(),
    constraints: z
      .object({
        required: z.boolean().optional(),
        unique: z.boolean().optional(),
        minimum: z.number().optional(),
        maximum: z.number().optional(),
        minLength: z.number().int().optional(),
        maxLength: z.number().int().optional(),
        pattern: line().optional(),
        enum: z.array(line()).optional(),
      })
      .optional(),
    /** Enum categories with labels, as Table Schema v2's `categories`. */
    categories: z.array(z.object({ value: line(), label: line() })).optional(),
  })
  .meta({ id: "TableSchemaField" });

/**
 * The resources of a version. These names are the one home of a resource's name: the upload path, the Data Package
 * resource and its file, the foreign keys that point at it and the keys of the /schema answer all use them as they are.
 */
export const resourceName = z.enum(resourceNames);

const tableSchemaResource = z
  .object({
    fields: z.array(tableSchemaField).min(1),
    primaryKey: z.array(line()).optional(),
    foreignKeys: z
      .array(
        z.object({
          fields: z.array(line()),
          reference: z.object({ resource: resourceName, fields: z.array(line()) }),
        }),
      )
      .optional(),
    /** Missing-value codes with their labels, e.g. { value: "NA", label: "not measured" }. */
    missingValues: z.array(z.object({ value: line(), label: line() })).optional(),
  })
  .meta({ id: "TableSchema" });

/**
 * A measure a curator adds to a version: its values are the plots field of the same name (a number field the plots
 * resource lists), and its responses are computed per site-year like yield's, in its unit.
 */
const dictionaryMeasure = z
  .object({
    name: line()
      .min(1)
      .max(64)
      .regex(/^[a-z][a-z0-9_]*$/, "snake_case, starting with a letter; the plots field of the same name holds its values"),
    title: line().min(1).max(120),
    unit: line().min(1).max(40).describe('Unit of the values, e.g. "cm", "score", "g/plant"'),
    better: z.enum(betterDirections).describe("Which direction is better"),
    rating: z.boolean().describe("A rating (a score on a scale) rather than a quantity"),
    scale: line().max(120).optional().describe('A rating\'s scale in words, e.g. "1 (poor) to 5 (excellent)"'),
    description: paragraph().max(2000).optional(),
  })
  .meta({ id: "DictionaryMeasure" });
export type DictionaryMeasure = z.infer<typeof dictionaryMeasure>;

export const tableSchemaDescriptor = z
  .object({
    resources: z.record(resourceName, tableSchemaResource),
    measures: z
      .array(dictionaryMeasure)
      .max(20)
      .optional()
      .describe(
        "Measures of this version beside the built-in ones (yield, stand, vigour, test-weight, moisture); each names a plots field",
      ),
    soilTestSchemes: z
      .array(soilTestScheme)
      .max(50)
      .optional()
      .describe("Soil-test interpretation schemes of this version, beside the built-in ones; soil_tests rows name one in `interpretation`"),
  })
  .meta({ id: "VersionTableSchemas" });

export type TableSchemaField = z.infer<typeof tableSchemaField>;
export type TableSchemaResource = z.infer<typeof tableSchemaResource>;
export type TableSchemaDescriptor = z.infer<typeof tableSchemaDescriptor>;
export type ResourceName = z.infer<typeof resourceName>;

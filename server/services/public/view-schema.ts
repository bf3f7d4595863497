import { z } from "zod";
import type { TableSchemaField } from "@/schemas/table-schema";
import type { ViewTableSchema } from "@/schemas/public";
import type { RowResource } from "./row-resource";
import { observationResource } from "./observations";
import { responseResource } from "./responses";
import { siteResource } from "./sites";
import { siteYearResource } from "./site-years";
import { treatmentResource } from "./treatments";

/** What a view's Table Schema is derived from: the row contract and the CSV columns. */
type ViewSource = Pick<RowResource<{ id: number }, unknown>, "row" | "csvFields"> & { csvColumns: readonly { name: string }[] };

/** The row views the API serves as CSV, by the name in their paths (…/site-years, /api/v1/observations …). */
const rowViews = {
  sites: siteResource,
  "site-years": siteYearResource,
  treatments: treatmentResource,
  observations: observationResource,
  responses: responseResource,
} as const satisfies Record<string, ViewSource>;
export type RowViewName = keyof typeof rowViews;
export const rowViewNames = Object.keys(rowViews) as [RowViewName, ...RowViewName[]];

export const viewSchemaPath = (view: string) => `/api/v1/schemas/${view}`;

interface JsonProperty {
  type?: string | string[];
  anyOf?: JsonProperty[];
  enum?: unknown[];
  description?: string;
}

const tableType = (t: string | undefined): TableSchemaField["type"] =>
  t === "integer" || t === "number" || t === "boolean" ? t : "string";

/**
 * The Table Schema of a view's CSV, derived from the row's zod contract and the CSV columns it is written with, so
 * it names exactly the columns the CSV has, in their order. Lists become one cell joined by ";".
 */
export function viewTableSchema(name: RowViewName): ViewTableSchema {
  const resource: ViewSource = rowViews[name];
  const json = z.toJSONSchema(resource.row, { io: "output", unrepresentable: "any" }) as {
    properties?: Record<string, JsonProperty>;
    required?: string[];
  };
  const required = new Set(json.required ?? []);
  const fields = resource.csvColumns.map((column): TableSchemaField => {
    const extra = resource.csvFields?.[column.name];
    if (extra) return { name: column.name, type: extra.type, description: extra.description };
    const prop = json.properties?.[column.name] ?? {};
    const variants = prop.anyOf ?? [prop];
    const nullable = variants.some((v) => v.type === "null");
    const main = variants.find((v) => v.type !== "null") ?? {};
    const jsonType = Array.isArray(main.type) ? main.type.find((t) => t !== "null") : main.type;
    const list = jsonType === "array" || jsonType === "object";
    const description = [
      prop.description ?? main.description,
      list ? (column.name === "applications" ? "applications separated by ' | '" : "values separated by ';'") : undefined,
    ]
      .filter(Boolean)
      .join("; ");
    const constraints: NonNullable<TableSchemaField["constraints"]> = {};
    if (required.has(column.name) && !nullable && !list) constraints.required = true;
    if (main.enum?.every((e) => typeof e === "string")) constraints.enum = main.enum as string[];
    return {
      name: column.name,
      type: list ? "string" : tableType(jsonType),
      ...(description ? { description } : {}),
      ...(Object.keys(constraints).length ? { constraints } : {}),
    };
  });
  return {
    $schema: "https://datapackage.org/profiles/2.0/tableschema.json",
    name,
    title: `The ${name} CSV view`,
    description: `Columns of the CSV that ${name} endpoints send (format=csv or Accept: text/csv), in order. An empty cell is a missing value.`,
    fields,
    missingValues: [""],
  };
}

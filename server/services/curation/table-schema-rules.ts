import { defaultTableSchema } from "@/datasets/default-table-schema";
import type { ResourceName, TableSchemaDescriptor } from "@/schemas/table-schema";
import type { ProblemLocation } from "@/server/errors";
import { builtInSchemeNames } from "@/server/services/soil-test-schemes";
import type { FieldRename } from "@/schemas/curation";
import { customFieldName, isStoredField } from "@/server/services/ingest/custom-fields";
import { builtInMeasureDefinitions, isBuiltInMeasure, standUnits } from "@/constants/measures";
import { resourceOrder, resourceQueries } from "./resource-csv";

/**
 * JSON with object keys sorted: a dictionary read back from a jsonb column has its keys in jsonb's order (shorter
 * keys first), so the same keys must compare equal whatever order they arrive in.
 */
function canonical(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonical).join(",")}]`;
  if (value && typeof value === "object")
    return `{${Object.keys(value)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonical((value as Record<string, unknown>)[k])}`)
      .join(",")}}`;
  return JSON.stringify(value ?? null);
}

/** Fields the tables cannot do without: keys, references and NOT NULL columns. */
const essential: Record<ResourceName, string[]> = {
  sites: ["site", "location"],
  site_years: ["site_year", "site", "crop", "year", "blocks"],
  soil_tests: ["site_year", "analyte", "value"],
  treatments: ["treatment", "name", "is_check", "application"],
  plots: ["site_year", "plot", "block", "treatment"],
  summaries: ["site_year", "treatment", "mean_kg_ha", "replicates", "mse", "df_error"],
};

/**
 * What a curator may change in a draft's data dictionary: titles, descriptions, units shown, constraints, categories
 * and missing-value codes; optional fields may be dropped (and added back), and fields of the curator's own added,
 * renamed and removed. Types, keys and the fields the tables need stay as they are, because the stored columns do.
 */
export function checkTableSchemaEdit(next: TableSchemaDescriptor): ProblemLocation[] {
  const base = defaultTableSchema();
  const problems: ProblemLocation[] = [];
  for (const resource of resourceOrder) {
    const r = next.resources[resource];
    const where = `body.resources.${resource}`;
    if (!r) {
      problems.push({ field: where, message: `resource ${resource} is missing` });
      continue;
    }
    const b = base.resources[resource]!;
    const baseTypes = new Map(b.fields.map((f) => [f.name, f.type]));
    const names = new Set<string>();
    const measureFields = new Set(resource === "plots" ? (next.measures ?? []).map((m) => m.name) : []);
    r.fields.forEach((f, i) => {
      if (names.has(f.name)) problems.push({ field: `${where}.fields.${i}.name`, message: `field ${f.name} appears twice` });
      names.add(f.name);
      if (measureFields.has(f.name) && !(f.name in resourceQueries[resource].columns)) {
        if (f.type !== "number")
          problems.push({ field: `${where}.fields.${i}.type`, message: `field ${f.name} holds a measure, so its type is number` });
      } else if (!(f.name in resourceQueries[resource].columns)) {
        // A field of the curator's own: its values are kept beside the row (custom_values), under a plain name.
        if (!customFieldName.test(f.name))
          problems.push({
            field: `${where}.fields.${i}.name`,
            message: `field name "${f.name}" must start with a lower-case letter and hold only letters, digits and underscores (for example seed_lot)`,
          });
      } else if (baseTypes.get(f.name) !== f.type) {
        problems.push({
          field: `${where}.fields.${i}.type`,
          message: `field ${f.name} is stored as ${baseTypes.get(f.name)}; its type cannot change`,
        });
      }
      const c = f.constraints;
      if (c?.minimum !== undefined && c.maximum !== undefined && c.minimum > c.maximum) {
        problems.push({ field: `${where}.fields.${i}.constraints`, message: `minimum ${c.minimum} is above maximum ${c.maximum}` });
      }
      if (c?.pattern) {
        try {
          new RegExp(c.pattern);
        } catch {
          problems.push({ field: `${where}.fields.${i}.constraints.pattern`, message: "not a valid regular expression" });
        }
      }
    });
    for (const name of essential[resource])
      if (!names.has(name))
        problems.push({ field: `${where}.fields`, message: `field ${name} cannot be removed: the ${resource} table needs it` });
    if (canonical(r.primaryKey ?? null) !== canonical(b.primaryKey ?? null)) {
      problems.push({
        field: `${where}.primaryKey`,
        message: `the primary key of ${resource} is ${JSON.stringify(b.primaryKey)} and cannot change`,
      });
    }
    if (canonical(r.foreignKeys ?? null) !== canonical(b.foreignKeys ?? null)) {
      problems.push({ field: `${where}.foreignKeys`, message: `the foreign keys of ${resource} cannot change` });
    }
  }
  problems.push(...checkSoilTestSchemes(next), ...checkMeasures(next));
  return problems;
}

/**
 * The measures a version adds: one per name, under names neither the built-in measures nor the stored plots columns
 * use, each with its number field in plots. The stand count's unit is one Plotbank can convert to plants/ac.
 */
function checkMeasures(next: TableSchemaDescriptor): ProblemLocation[] {
  const problems: ProblemLocation[] = [];
  const plotFields = new Map((next.resources.plots?.fields ?? []).map((f) => [f.name, f]));
  const stand = plotFields.get(builtInMeasureDefinitions.stand.field);
  if (stand?.unit !== undefined && !(standUnits as readonly string[]).includes(stand.unit))
    problems.push({
      field: "body.resources.plots.fields.stand_count.unit",
      message: `stand counts are given in ${standUnits.join(" or ")}; "${stand.unit}" cannot be converted`,
    });
  const seen = new Set<string>();
  (next.measures ?? []).forEach((m, i) => {
    const where = `body.measures.${i}.name`;
    if (isBuiltInMeasure(m.name) || m.name in resourceQueries.plots.columns)
      problems.push({
        field: where,
        message: `"${m.name}" is a built-in measure or a stored plots column; give the measure a name of its own`,
      });
    else if (!plotFields.has(m.name))
      problems.push({
        field: where,
        message: `measure ${m.name} needs a number field named ${m.name} in resources.plots, which holds its values`,
      });
    if (seen.has(m.name)) problems.push({ field: where, message: `measure ${m.name} appears twice` });
    seen.add(m.name);
  });
  return problems;
}

/** A version's own schemes: one per name, analyte and extractant, under names the built-in schemes do not use. */
function checkSoilTestSchemes(next: TableSchemaDescriptor): ProblemLocation[] {
  const problems: ProblemLocation[] = [];
  const seen = new Set<string>();
  (next.soilTestSchemes ?? []).forEach((scheme, i) => {
    const where = `body.soilTestSchemes.${i}`;
    if (builtInSchemeNames.has(scheme.name))
      problems.push({
        field: `${where}.name`,
        message: `"${scheme.name}" is a built-in scheme; name it in the interpretation column as it is, or give this one a name of its own`,
      });
    const key = `${scheme.name}\u0000${scheme.analyte}\u0000${scheme.extractant ?? ""}`;
    if (seen.has(key))
      problems.push({
        field: `${where}.name`,
        message: `scheme "${scheme.name}" for ${scheme.analyte}${scheme.extractant ? ` by ${scheme.extractant}` : ""} appears twice`,
      });
    seen.add(key);
  });
  return problems;
}

/**
 * Renames in a dictionary edit: each names a field of the curator's own that the draft had and the edit no longer
 * has, and a new name the edit has. Plotbank's own fields keep their names, which the API and the analyses read.
 */
export function checkRenames(
  before: TableSchemaDescriptor,
  next: TableSchemaDescriptor,
  renames: readonly FieldRename[],
): ProblemLocation[] {
  const problems: ProblemLocation[] = [];
  const names = (d: TableSchemaDescriptor, r: ResourceName) => new Set((d.resources[r]?.fields ?? []).map((f) => f.name));
  renames.forEach((r, i) => {
    const where = `body.renames.${i}`;
    if (isStoredField(r.resource, r.from)) {
      problems.push({
        field: `${where}.from`,
        message: `${r.from} is a field Plotbank stores and reads under this name; change its title or description instead`,
      });
    } else if (!names(before, r.resource).has(r.from)) {
      problems.push({ field: `${where}.from`, message: `the ${r.resource} dictionary has no field ${r.from} to rename` });
    } else if (names(next, r.resource).has(r.from)) {
      problems.push({ field: `${where}.from`, message: `field ${r.from} is renamed but still in the ${r.resource} dictionary` });
    }
    if (!names(next, r.resource).has(r.to))
      problems.push({ field: `${where}.to`, message: `the new name ${r.to} is not a field of the ${r.resource} dictionary` });
    else if (isStoredField(r.resource, r.to) || names(before, r.resource).has(r.to))
      problems.push({ field: `${where}.to`, message: `the ${r.resource} dictionary already has a field ${r.to}` });
  });
  return problems;
}

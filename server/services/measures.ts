import { inArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { versions } from "@/db/schema";
import { builtInMeasureDefinitions, builtInMeasures, isBuiltInMeasure, type MeasureDefinition } from "@/constants/measures";
import { badRequest } from "@/server/errors";

/**
 * The definition of the measure a request names: a built-in one, or the first of the read versions' data dictionaries
 * that adds it. Anything else is a 400 naming `query.measure`, with the measures that could have been meant.
 */
export async function resolveMeasure(db: Db, name: string, versionIds: string[]): Promise<MeasureDefinition> {
  if (isBuiltInMeasure(name)) return builtInMeasureDefinitions[name];
  const rows = versionIds.length
    ? await db.select({ id: versions.id, tableSchema: versions.tableSchema }).from(versions).where(inArray(versions.id, versionIds))
    : [];
  const added = rows.flatMap((r) => r.tableSchema.measures ?? []).sort((a, b) => a.name.localeCompare(b.name));
  const found = added.find((m) => m.name === name);
  if (found)
    return {
      name: found.name,
      title: found.title,
      field: found.name,
      unit: found.unit,
      better: found.better,
      rating: found.rating,
      ...(found.scale ? { scale: found.scale } : {}),
      description: found.description ?? found.title,
    };
  const known = [...builtInMeasures, ...new Set(added.map((m) => m.name))].join(", ");
  throw badRequest(`Unknown measure "${name}".`, [
    { field: "query.measure", value: name, message: `"${name}" is not a measure of the data read; known measures: ${known}` },
  ]);
}

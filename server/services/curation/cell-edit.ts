import { Readable } from "node:stream";
import { eq } from "drizzle-orm";
import { versions } from "@/db/schema";
import type { CellEdit, CellEditResult } from "@/schemas/curation";
import type { ResourceName } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { conflict, HttpProblem, notFound } from "@/server/errors";
import { recordContentEdit } from "@/server/services/curation/access";
import { fieldsOf, resourceRowsByKey } from "@/server/services/curation/resource-csv";
import { ingestUpload } from "@/server/services/ingest/ingest-upload";

/**
 * The fields that pick the rows a merge replaces together (see uploadOptions.mode): a treatment's applications go in
 * as one, so editing one of them sends all of them; elsewhere the key is the resource's primary key.
 */
const mergeKey: Record<ResourceName, string[]> = {
  sites: ["site"],
  site_years: ["site_year"],
  soil_tests: ["site_year", "analyte"],
  treatments: ["treatment"],
  plots: ["site_year", "plot"],
  summaries: ["site_year", "treatment"],
};
/** Fields that name a row: changing one would make another row, so they are not edited in place. */
export const rowKey: Record<ResourceName, string[]> = { ...mergeKey, treatments: ["treatment", "application"] };

const fieldProblem = (status: number, message: string, field = "body.key") =>
  new HttpProblem(status, status === 404 ? "Not found" : "Unprocessable content", message, { errors: [{ field, message }] });

/**
 * One cell changed by hand. The edited row (with the rows its merge key keeps together) goes through the same checks
 * and write as a merge upload, in the stored units, so the merged version is validated, responses are recomputed and
 * a refused edit changes nothing. An accepted edit adds a line with its reason to the version's changelog and counts
 * its author among the version's content authors (four eyes).
 */
export async function editCell(ctx: AppContext, versionId: string, userId: string, edit: CellEdit): Promise<CellEditResult> {
  const { db } = ctx;
  const [version] = await db.select().from(versions).where(eq(versions.id, versionId));
  if (!version) throw notFound("No such version.");
  if (version.state !== "draft") throw conflict(`Version ${version.semver} is ${version.state}; only drafts are edited.`);
  const fields = fieldsOf(version.tableSchema, edit.resource);
  if (!fields.includes(edit.field))
    throw fieldProblem(422, `${edit.field} is not a field of ${edit.resource} in this version's data dictionary.`, "body.field");
  const keyFields = rowKey[edit.resource];
  if (keyFields.includes(edit.field))
    throw fieldProblem(
      422,
      `${edit.field} names the row, so it is not edited in place; upload the row under its new ${edit.field} and remove the old one with a replace upload.`,
      "body.field",
    );
  const missing = keyFields.filter((k) => edit.key[k] === undefined);
  if (missing.length) throw fieldProblem(422, `The key needs ${missing.join(" and ")} to name one ${edit.resource} row.`);

  const together = Object.fromEntries(mergeKey[edit.resource].map((k) => [k, edit.key[k]!]));
  const rows = await resourceRowsByKey(db, versionId, version.tableSchema, fields, edit.resource, together);
  const at = fields.indexOf(edit.field);
  const target = rows.findIndex((row) => keyFields.every((k) => row[fields.indexOf(k)] === edit.key[k]));
  const where = keyFields.map((k) => `${k} ${edit.key[k]}`).join(", ");
  if (target < 0) throw fieldProblem(404, `No ${edit.resource} row of this draft has ${where}.`);
  const from = rows[target]![at] ?? null;
  const to = edit.value.trim() === "" ? null : edit.value.trim();
  rows[target]![at] = to;

  const line = `Edited ${edit.resource} ${where}: ${edit.field} ${from ?? "(empty)"} → ${to ?? "(empty)"}. Reason: ${edit.reason.replace(/\s+/g, " ")}`;
  const changelog = version.changelog.trim() ? `${version.changelog.trimEnd()}\n${line}` : line;
  // Stored values go back as stored: canonical units, read by the upload's own checks.
  const result = await ingestUpload(ctx, {
    versionId,
    resource: edit.resource,
    filename: `cell edit ${edit.resource} ${Object.values(together).join(" ")} ${edit.field}.csv`.slice(0, 200),
    source: Readable.from([Buffer.from(rowsAsInput(fields, rows), "utf8")]),
    options: { mapping: {}, units: { yield: "kg/ha", yieldMoisture: "standard", soilTest: "ppm", gradeBasis: "oxide" }, mode: "merge" },
    userId,
    // In the upload's transaction: the changelog line and the data change together or not at all.
    afterWrite: async (tx) => {
      await tx.update(versions).set({ changelog }).where(eq(versions.id, versionId));
    },
  });
  if (!result.accepted) {
    const errors = result.problems
      .filter((p) => p.severity === "error")
      .map((p) => ({ field: p.column === edit.field ? "body.value" : `body.${p.column ?? "value"}`, message: p.message }));
    throw new HttpProblem(422, "Unprocessable content", `The edit was not applied: ${errors[0]?.message ?? "the row is not valid"}`, {
      errors,
      reportId: result.reportId,
    });
  }
  await recordContentEdit(db, versionId, userId);
  return { resource: edit.resource, key: edit.key, field: edit.field, from, to, reason: edit.reason, changelog, upload: result };
}

/** The rows as an upload reads them: every cell as text, quoted where CSV needs it, no formula guard. */
function rowsAsInput(fields: string[], rows: (string | null)[][]): string {
  const cell = (v: string | null) => (v === null ? "" : /[",\r\n]/.test(v) || /^\s|\s$/.test(v) ? `"${v.replaceAll('"', '""')}"` : v);
  return [fields.join(","), ...rows.map((r) => r.map(cell).join(","))].join("\r\n") + "\r\n";
}

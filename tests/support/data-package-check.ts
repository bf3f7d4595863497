import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import path from "node:path";
import Ajv from "ajv";
import addFormats from "ajv-formats";
import Papa from "papaparse";

/**
 * Frictionless validation of a Data Package as a data user's tools would run it, offline:
 * 1. the descriptor against the published Data Package 2.0 and 1.0 JSON Schema profiles (vendored under
 *    tests/fixtures/frictionless with their URL and version), with ajv;
 * 2. each resource's bytes against its `bytes` and `hash`;
 * 3. each resource's CSV against its Table Schema: header = fields, types, constraints, missing values, primary key;
 * 4. every foreign key: the referenced resource exists in the package and holds every referencing value.
 * No maintained JavaScript validator reads Data Package v2, so steps 2–4 are ours, written from the Table Schema
 * specification (https://datapackage.org/standard/table-schema/).
 */

const profileDir = path.join(__dirname, "../fixtures/frictionless");
const loadProfile = (version: "1.0" | "2.0") =>
  JSON.parse(readFileSync(path.join(profileDir, version, "datapackage.json"), "utf8")) as object;

let validators: Record<"1.0" | "2.0" | "tableschema-2.0", ReturnType<Ajv["compile"]>> | undefined;
function profileValidators() {
  if (!validators) {
    // The profiles carry documentation keywords (propertyOrder, context, examples as strings) that strict mode rejects.
    const ajv = new Ajv({ strict: false, allErrors: true });
    addFormats(ajv);
    const tableSchema = JSON.parse(readFileSync(path.join(profileDir, "2.0", "tableschema.json"), "utf8")) as object;
    validators = {
      "1.0": ajv.compile(loadProfile("1.0")),
      "2.0": ajv.compile(loadProfile("2.0")),
      "tableschema-2.0": ajv.compile(tableSchema),
    };
  }
  return validators;
}

/**
 * A CSV answer against a Table Schema served on its own: the schema against the published Table Schema 2.0 profile,
 * then the table (header, types, constraints, missing values) as checkDataPackage checks each resource.
 */
export function checkCsvAgainstTableSchema(name: string, schema: unknown, csv: string): string[] {
  const problems: string[] = [];
  const validate = profileValidators()["tableschema-2.0"];
  if (!validate(schema))
    for (const e of validate.errors ?? []) problems.push(`Table Schema 2.0 profile: ${e.instancePath || "/"} ${e.message ?? ""}`);
  const resource = { name, path: "", bytes: 0, hash: "", schema: schema as PackageResource["schema"] };
  problems.push(...checkTable(resource, csv).problems);
  return problems;
}

interface PackageField {
  name: string;
  type: string;
  constraints?: {
    required?: boolean;
    unique?: boolean;
    minimum?: number;
    maximum?: number;
    minLength?: number;
    maxLength?: number;
    pattern?: string;
    enum?: string[];
  };
}
interface PackageResource {
  name: string;
  path: string;
  bytes: number;
  hash: string;
  schema: {
    fields: PackageField[];
    primaryKey?: string[];
    foreignKeys?: { fields: string[]; reference: { resource: string; fields: string[] } }[];
    missingValues?: (string | { value: string })[];
  };
}
interface PackageDescriptor {
  resources: PackageResource[];
}

/** Every problem found, as "where: what"; an empty list means the package is valid. */
export async function checkDataPackage(descriptor: unknown, readPath: (resourcePath: string) => Promise<Buffer>): Promise<string[]> {
  const problems: string[] = [];
  const { "1.0": v1, "2.0": v2 } = profileValidators();
  for (const [version, validate] of Object.entries({ "1.0": v1, "2.0": v2 })) {
    if (!validate(descriptor)) {
      for (const e of validate.errors ?? [])
        problems.push(`profile ${version}: ${e.instancePath || "/"} ${e.message ?? ""} ${JSON.stringify(e.params)}`);
    }
  }
  const dp = descriptor as PackageDescriptor;
  const tables = new Map<string, Record<string, string | null>[]>();
  for (const r of dp.resources ?? []) {
    const bytes = await readPath(r.path);
    if (bytes.length !== r.bytes) problems.push(`${r.name}: bytes ${r.bytes} declared, ${bytes.length} read from ${r.path}`);
    const sha = `sha256:${createHash("sha256").update(bytes).digest("hex")}`;
    if (sha !== r.hash) problems.push(`${r.name}: hash ${r.hash} declared, ${sha} read from ${r.path}`);
    const { rows, problems: tableProblems } = checkTable(r, bytes.toString("utf8"));
    problems.push(...tableProblems);
    tables.set(r.name, rows);
  }
  for (const r of dp.resources ?? []) {
    for (const fk of r.schema.foreignKeys ?? []) {
      const target = tables.get(fk.reference.resource);
      if (!target) {
        problems.push(
          `${r.name}: foreign key ${fk.fields.join("+")} names resource "${fk.reference.resource}", which the package does not have`,
        );
        continue;
      }
      const key = (row: Record<string, string | null>, fields: string[]) => JSON.stringify(fields.map((f) => row[f]));
      const known = new Set(target.map((row) => key(row, fk.reference.fields)));
      (tables.get(r.name) ?? []).forEach((row, i) => {
        if (fk.fields.some((f) => row[f] === null)) return;
        if (!known.has(key(row, fk.fields)))
          problems.push(
            `${r.name} row ${i + 2}: ${fk.fields.join("+")} ${key(row, fk.fields)} is not in ${fk.reference.resource}.${fk.reference.fields.join("+")}`,
          );
      });
    }
  }
  return problems;
}

const datePattern = /^\d{4}-\d{2}-\d{2}$/;

/** One cell against its field: null for a missing value, else the problem. */
function cellProblem(field: PackageField, value: string): string | null {
  const c = field.constraints ?? {};
  switch (field.type) {
    case "integer":
    case "year":
      if (!/^-?\d+$/.test(value)) return `"${value}" is not an ${field.type}`;
      break;
    case "number":
      if (!/^-?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?$/.test(value)) return `"${value}" is not a number`;
      break;
    case "boolean":
      if (!["true", "false"].includes(value)) return `"${value}" is not true or false`;
      break;
    case "date":
      if (!datePattern.test(value) || Number.isNaN(Date.parse(value))) return `"${value}" is not a date (YYYY-MM-DD)`;
      break;
  }
  const n = Number(value);
  if (c.minimum !== undefined && n < c.minimum) return `${value} is below the minimum ${c.minimum}`;
  if (c.maximum !== undefined && n > c.maximum) return `${value} is above the maximum ${c.maximum}`;
  if (c.minLength !== undefined && value.length < c.minLength) return `"${value}" is shorter than ${c.minLength}`;
  if (c.maxLength !== undefined && value.length > c.maxLength) return `"${value}" is longer than ${c.maxLength}`;
  if (c.pattern !== undefined && !new RegExp(`^(?:${c.pattern})$`).test(value)) return `"${value}" does not match ${c.pattern}`;
  if (c.enum && !c.enum.includes(value)) return `"${value}" is not one of ${c.enum.join(", ")}`;
  return null;
}

function checkTable(r: PackageResource, text: string): { rows: Record<string, string | null>[]; problems: string[] } {
  const problems: string[] = [];
  const parsed = Papa.parse<string[]>(text, { skipEmptyLines: true });
  for (const e of parsed.errors) problems.push(`${r.name} row ${(e.row ?? 0) + 1}: ${e.message}`);
  const [header = [], ...body] = parsed.data;
  const names = r.schema.fields.map((f) => f.name);
  if (JSON.stringify(header) !== JSON.stringify(names))
    problems.push(`${r.name}: header ${header.join(",")} is not the schema's fields ${names.join(",")}`);
  const missing = new Set((r.schema.missingValues ?? [""]).map((m) => (typeof m === "string" ? m : m.value)));
  const rows: Record<string, string | null>[] = [];
  const unique = new Map<string, Set<string>>();
  const primary = new Set<string>();
  body.forEach((cells, i) => {
    const row: Record<string, string | null> = {};
    const where = `${r.name} row ${i + 2}`;
    if (cells.length !== names.length) problems.push(`${where}: ${cells.length} cells, ${names.length} fields`);
    r.schema.fields.forEach((field, j) => {
      const raw = cells[j] ?? "";
      const value = missing.has(raw) ? null : raw;
      row[field.name] = value;
      if (value === null) {
        if (field.constraints?.required) problems.push(`${where}, ${field.name}: required but missing`);
        return;
      }
      const problem = cellProblem(field, value);
      if (problem) problems.push(`${where}, ${field.name}: ${problem}`);
      if (field.constraints?.unique) {
        const seen = unique.get(field.name) ?? new Set<string>();
        if (seen.has(value)) problems.push(`${where}, ${field.name}: "${value}" is not unique`);
        seen.add(value);
        unique.set(field.name, seen);
      }
    });
    if (r.schema.primaryKey?.length) {
      const key = JSON.stringify(r.schema.primaryKey.map((f) => row[f]));
      if (primary.has(key)) problems.push(`${where}: primary key ${r.schema.primaryKey.join("+")} ${key} repeats`);
      primary.add(key);
    }
    rows.push(row);
  });
  return { rows, problems };
}

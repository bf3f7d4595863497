import ExcelJS from "exceljs";
import { resourceTitles } from "@/constants/vocabulary";
import type { ResourceName, TableSchemaDescriptor, TableSchemaField } from "@/schemas/table-schema";
import { CsvWriter, type CsvValue } from "@/server/csv";
import { fieldsOf, resourceOrder } from "./resource-csv";

/**
 * Upload templates, generated from a version's data dictionary so the curator's own fields are in them: per resource
 * a CSV of the header and two example rows (which uploads as it is), and a workbook with one sheet per resource and
 * a README sheet saying what each column means, its unit and its allowed values. The notes are kept out of the CSV
 * so that a filled-in template uploads without editing; README.txt carries them for CSV users.
 */

/** Two rows per resource from the invented Tallgrass Basin demo, consistent across resources (they upload together). */
const examples: Record<ResourceName, Record<string, CsvValue>[]> = {
  sites: [
    { site: "TB-03", location: "Wren County", soil_series: "Harlan", soil_texture: "silt loam" },
    { site: "TB-04", location: "Osage Bend County", soil_series: "Marrow", soil_texture: "loam" },
  ],
  site_years: [
    {
      site_year: "TB-03-2024",
      site: "TB-03",
      crop: "soybean",
      year: 2024,
      design: "RCBD",
      blocks: 1,
      tillage: "no-till",
      previous_crop: "corn",
      planting_date: "2024-05-14",
      row_spacing_in: 30,
      variety: "Basin 27X",
      maturity_group: "2.7",
    },
    {
      site_year: "TB-04-2024",
      site: "TB-04",
      crop: "soybean",
      year: 2024,
      design: "RCBD",
      blocks: 1,
      tillage: "conventional",
      previous_crop: "corn",
      planting_date: "2024-05-21",
      row_spacing_in: 30,
      variety: "Basin 27X",
      maturity_group: "2.7",
    },
  ],
  soil_tests: [
    { site_year: "TB-03-2024", analyte: "P", value: 7, unit: "ppm", extractant: "Bray-P1", depth_in: 6 },
    { site_year: "TB-04-2024", analyte: "P", value: 24, unit: "ppm", extractant: "Bray-P1", depth_in: 6 },
  ],
  treatments: [
    { treatment: "CHK", name: "Untreated check", is_check: "true", application: 1 },
    {
      treatment: "BAND",
      name: "2x2 band MAP",
      is_check: "false",
      application: 1,
      product: "MAP",
      grade: "11-52-0",
      product_rate: 100,
      rate_unit: "lb/ac",
      placement: "2x2-band",
      timing: "at-planting",
    },
  ],
  plots: [
    { site_year: "TB-03-2024", plot: "101", block: 1, treatment: "CHK", yield_kg_ha: 3610, harvest_moisture_pct: 13.2 },
    { site_year: "TB-03-2024", plot: "102", block: 1, treatment: "BAND", yield_kg_ha: 3905, harvest_moisture_pct: 13.4 },
  ],
  summaries: [
    { site_year: "TB-04-2024", treatment: "CHK", mean_kg_ha: 4120, replicates: 4, mse: 21000, df_error: 3 },
    { site_year: "TB-04-2024", treatment: "BAND", mean_kg_ha: 4135, replicates: 4, mse: 21000, df_error: 3 },
  ],
};

const allowedOf = (f: TableSchemaField): string[] => f.constraints?.enum ?? f.categories?.map((c) => c.value) ?? [];

/** An example for a field of the curator's own: blank, unless the field is required (then a value it accepts). */
function customExample(f: TableSchemaField): CsvValue {
  if (!f.constraints?.required) return null;
  const allowed = allowedOf(f);
  if (allowed.length) return allowed[0]!;
  switch (f.type) {
    case "number":
    case "integer":
      return f.constraints.minimum ?? 0;
    case "year":
      return 2024;
    case "boolean":
      return "false";
    case "date":
      return "2024-05-14";
    default:
      return "example";
  }
}

function fieldList(schema: TableSchemaDescriptor, resource: ResourceName): TableSchemaField[] {
  const byName = new Map((schema.resources[resource]?.fields ?? []).map((f) => [f.name, f]));
  return fieldsOf(schema, resource).map((name) => byName.get(name)!);
}

/** The example rows of a resource under the version's dictionary: its fields, in its order. */
function exampleRows(schema: TableSchemaDescriptor, resource: ResourceName): CsvValue[][] {
  const fields = fieldList(schema, resource);
  return examples[resource].map((row) => fields.map((f) => (f.name in row ? (row[f.name] ?? null) : customExample(f))));
}

/** The CSV template of one resource: the header and two example rows, nothing else, so it uploads as it is. */
export function csvTemplate(schema: TableSchemaDescriptor, resource: ResourceName): string {
  const fields = fieldsOf(schema, resource);
  const writer = new CsvWriter(fields);
  return writer.headerLine() + writer.rows(exampleRows(schema, resource));
}

interface ColumnNote {
  sheet: ResourceName;
  column: string;
  required: string;
  type: string;
  unit: string;
  allowed: string;
  meaning: string;
}

function columnNotes(schema: TableSchemaDescriptor): ColumnNote[] {
  const missing = (r: ResourceName) => (schema.resources[r]?.missingValues ?? []).map((m) => (m.value === "" ? "blank" : m.value));
  return resourceOrder.flatMap((resource) =>
    fieldList(schema, resource).map((f) => {
      const c = f.constraints ?? {};
      const range = [c.minimum !== undefined ? `from ${c.minimum}` : "", c.maximum !== undefined ? `to ${c.maximum}` : ""]
        .filter(Boolean)
        .join(" ");
      const labels = f.categories?.length ? f.categories.map((cat) => `${cat.value} (${cat.label})`) : allowedOf(f);
      return {
        sheet: resource,
        column: f.name,
        required: c.required ? "yes" : `no (missing: ${missing(resource).join(", ") || "blank"})`,
        type: f.type === "date" ? "date (YYYY-MM-DD)" : f.type,
        unit: f.unit ?? "",
        allowed: [labels.join(", "), range, c.pattern ? `pattern ${c.pattern}` : ""].filter(Boolean).join("; "),
        meaning: [f.title, f.description].filter(Boolean).join(": "),
      };
    }),
  );
}

const noteHeader = ["sheet", "column", "required", "type", "unit", "allowed values", "meaning"];

/** README.txt for CSV users: every column of every resource, as the workbook's README sheet lists them. */
export function templateReadme(schema: TableSchemaDescriptor, label: string): string {
  const lines = [
    `Upload templates for ${label}`,
    "",
    "Each <resource>.csv holds the header and two example rows from the invented Tallgrass Basin demo. Replace the",
    "example rows with your own and upload each file to its resource (or fill the workbook, one sheet per resource).",
    "Upload in this order, since later files refer to earlier ones: " + resourceOrder.join(", ") + ".",
    "Yields are kg/ha at the crop's standard moisture unless the upload's units say otherwise.",
    "",
  ];
  for (const resource of resourceOrder) {
    lines.push(`${resource}.csv (${resourceTitles[resource]})`);
    for (const n of columnNotes(schema).filter((c) => c.sheet === resource)) {
      const parts = [n.type, n.unit && `unit ${n.unit}`, `required: ${n.required}`, n.allowed && `allowed: ${n.allowed}`].filter(Boolean);
      lines.push(`  ${n.column}: ${parts.join("; ")}${n.meaning ? ` - ${n.meaning}` : ""}`);
    }
    lines.push("");
  }
  return lines.join("\r\n");
}

/** Excel cell values of an example row: numbers as numbers, dates as dates (so the sheet shows them as such). */
function cellValue(value: CsvValue, field: TableSchemaField): ExcelJS.CellValue {
  if (value === null || value === undefined || value === "") return null;
  if (field.type === "date" && typeof value === "string") return new Date(`${value}T00:00:00Z`);
  if (field.type === "boolean") return value === true || value === "true";
  if ((field.type === "number" || field.type === "integer" || field.type === "year") && typeof value !== "boolean") return Number(value);
  return typeof value === "boolean" ? value : String(value);
}

/** The workbook template: a README sheet, then one sheet per resource with the header and two example rows. */
export async function workbookTemplate(schema: TableSchemaDescriptor, label: string): Promise<Buffer> {
  const workbook = new ExcelJS.Workbook();
  workbook.creator = "Plotbank";
  const readme = workbook.addWorksheet("README");
  readme.addRow([`Upload template for ${label}. One sheet per resource, named after it; replace the example rows with your own.`]);
  readme.addRow(["Dates as dates or YYYY-MM-DD; formulas are read as their last calculated values and reported as warnings."]);
  readme.addRow([]);
  const head = readme.addRow(noteHeader);
  head.font = { bold: true };
  for (const n of columnNotes(schema)) readme.addRow([n.sheet, n.column, n.required, n.type, n.unit, n.allowed, n.meaning]);
  readme.columns.forEach((column, i) => (column.width = [12, 22, 24, 18, 10, 40, 60][i] ?? 12));

  for (const resource of resourceOrder) {
    const fields = fieldList(schema, resource);
    const sheet = workbook.addWorksheet(resource, { views: [{ state: "frozen", ySplit: 1 }] });
    const header = sheet.addRow(fields.map((f) => f.name));
    header.font = { bold: true };
    for (const row of exampleRows(schema, resource)) sheet.addRow(row.map((v, i) => cellValue(v, fields[i]!)));
    fields.forEach((f, i) => {
      const column = sheet.getColumn(i + 1);
      column.width = Math.max(12, f.name.length + 2);
      if (f.type === "date") column.numFmt = "yyyy-mm-dd";
      // Codes like plot 101 stay text, so a spreadsheet does not turn them into numbers.
      if (f.type === "string") column.numFmt = "@";
    });
  }
  return Buffer.from(await workbook.xlsx.writeBuffer());
}

import { cellMessages as say, missingValueWords } from "@/schemas/messages";
import type { TableSchemaField, TableSchemaResource } from "@/schemas/table-schema";

export type Cell = string | number | boolean | null;

export interface CompiledField {
  field: TableSchemaField;
  required: boolean;
  /** Parses one raw cell: the typed value (null when missing), or the message of what is wrong. */
  parse(raw: string): { ok: true; value: Cell } | { ok: false; message: string };
}

const trueValues = new Set(["true", "True", "TRUE", "1", "yes", "Yes", "YES", "y", "Y"]);
const falseValues = new Set(["false", "False", "FALSE", "0", "no", "No", "NO", "n", "N"]);
const isoDate = /^(\d{4})-(\d{2})-(\d{2})$/;

/**
 * Turns a Table Schema field into a cell parser: missing-value codes, type, then constraints (required, enum,
 * minimum/maximum, length, pattern). `decimalComma` accepts 4,5 for 4.5 in semicolon-delimited files.
 */
function compileField(field: TableSchemaField, missingValues: ReadonlySet<string>, decimalComma: boolean): CompiledField {
  const c = field.constraints ?? {};
  const required = c.required === true;
  const allowed = c.enum ?? field.categories?.map((cat) => cat.value);
  const allowedSet = allowed ? new Set(allowed) : undefined;
  const pattern = c.pattern ? new RegExp(`^(?:${c.pattern})$`) : undefined;
  const f = { name: field.name, title: field.title, unit: field.unit, required };
  const range = (n: number): string | null => {
    if (c.minimum !== undefined && n < c.minimum) return say.belowMinimum(f, n, c.minimum);
    if (c.maximum !== undefined && n > c.maximum) return say.aboveMaximum(f, n, c.maximum);
    return null;
  };
  const parseNumber = (s: string): number | null => {
    let t = s;
    if (decimalComma && t.includes(",") && !t.includes(".")) t = t.replace(",", ".");
    if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) return null;
    const n = Number(t);
    return Number.isFinite(n) ? n : null;
  };

  return {
    field,
    required,
    parse(raw) {
      const s = raw.trim();
      if (missingValues.has(s) || (s === "" && missingValues.has(raw))) {
        return required ? { ok: false, message: say.missing(f) } : { ok: true, value: null };
      }
      let value: Cell;
      switch (field.type) {
        case "number":
        case "integer":
        case "year": {
          const n = parseNumber(s);
          if (n === null || (field.type !== "number" && !Number.isInteger(n)))
            return { ok: false, message: say.notNumber(f, raw, field.type !== "number", missingValueWords[field.name]) };
          if (field.type === "year" && (n < 1000 || n > 9999)) return { ok: false, message: say.notYear(f, raw) };
          const bad = range(n);
          if (bad) return { ok: false, message: bad };
          value = n;
          break;
        }
        case "boolean":
          if (trueValues.has(s)) value = true;
          else if (falseValues.has(s)) value = false;
          else return { ok: false, message: say.notBoolean(f, raw) };
          break;
        case "date": {
          const m = isoDate.exec(s);
          const d = m ? new Date(`${s}T00:00:00Z`) : null;
          if (!m || !d || Number.isNaN(d.getTime()) || d.toISOString().slice(0, 10) !== s) {
            return { ok: false, message: say.notDate(f, raw) };
          }
          value = s;
          break;
        }
        default:
          if (c.minLength !== undefined && s.length < c.minLength) return { ok: false, message: say.tooShort(f, raw, c.minLength) };
          if (c.maxLength !== undefined && s.length > c.maxLength) return { ok: false, message: say.tooLong(f, raw, c.maxLength) };
          if (pattern && !pattern.test(s)) return { ok: false, message: say.noPattern(f, raw, c.pattern!) };
          value = s;
      }
      if (allowedSet && !allowedSet.has(String(value))) return { ok: false, message: say.notAllowed(f, raw, allowed!) };
      return { ok: true, value };
    },
  };
}

export function compileResource(resource: TableSchemaResource, decimalComma: boolean): Map<string, CompiledField> {
  const missing = new Set((resource.missingValues ?? [{ value: "", label: "blank" }]).map((m) => m.value));
  return new Map(resource.fields.map((f) => [f.name, compileField(f, missing, decimalComma)]));
}

import { z } from "zod";

/**
 * Messages for people. Every problem a curator or a developer reads says what was expected, in the trade's words,
 * what was found, and how to fix it. This module is their one home: zod's own wording ("Too small: expected string
 * to have >=3 characters") never reaches a screen, because every zod issue without a message of its schema's own is
 * worded here (installed below as zod's error map, on the server and in the app alike), and the upload checks build
 * their cell messages with the functions at the end.
 */

type RawIssue = z.core.$ZodRawIssue;

/** A value as the message quotes it: text in quotes, cut at 40 characters; nothing as "nothing". */
function quoted(value: unknown): string {
  if (value === undefined || value === null || value === "") return "nothing";
  if (typeof value === "string") return `"${value.length > 40 ? `${value.slice(0, 40)}…` : value}"`;
  if (typeof value === "number" || typeof value === "boolean") return String(value);
  if (Array.isArray(value)) return `a list of ${value.length}`;
  return "an object";
}

const kindWords: Record<string, string> = {
  string: "text",
  number: "a number",
  int: "a whole number",
  bigint: "a whole number",
  boolean: "true or false",
  array: "a list",
  object: "a set of named fields",
  date: "a date",
  null: "nothing",
};

/** A list of allowed values, the first dozen in full. */
function choiceList(values: readonly unknown[]): string {
  const shown = values.slice(0, 12).map((v) => (typeof v === "string" ? v : String(v)));
  return values.length > 12 ? `${shown.join(", ")} and ${values.length - 12} more` : shown.join(", ");
}

const formatWords: Record<string, { expected: string; fix: string }> = {
  email: { expected: "an e-mail address", fix: "write it as name@example.org" },
  uuid: { expected: "an identifier (a UUID)", fix: "copy the id from its page or from the API answer" },
  url: { expected: "a web address", fix: "write it with https://" },
  date: { expected: "a date", fix: "write it as YYYY-MM-DD, e.g. 2021-05-12" },
  datetime: { expected: "a date and time", fix: "write it as YYYY-MM-DDTHH:MM:SSZ" },
};

/** The message for one zod issue, or undefined for an issue whose schema already words it. */
function issueMessage(issue: RawIssue): string | undefined {
  const found = quoted(issue.input);
  switch (issue.code) {
    case "invalid_type": {
      if (issue.input === undefined) return "is required but missing; fill it in";
      const expected = kindWords[issue.expected] ?? issue.expected;
      return `expected ${expected}, found ${found}; give ${expected} here`;
    }
    case "too_small": {
      const min = Number(issue.minimum);
      if (issue.origin === "string") {
        const length = typeof issue.input === "string" ? issue.input.length : 0;
        if (min <= 1) return "is empty; fill it in";
        return `needs at least ${min} characters, found ${length}; write a few more words`;
      }
      if (issue.origin === "array" || issue.origin === "set")
        return `needs at least ${min} ${min === 1 ? "entry" : "entries"}, found ${Array.isArray(issue.input) ? issue.input.length : 0}; add ${min === 1 ? "one" : "more"}`;
      return `must be ${issue.inclusive === false ? "more than" : "at least"} ${min}, found ${found}; give a larger value`;
    }
    case "too_big": {
      const max = Number(issue.maximum);
      if (issue.origin === "string") {
        const length = typeof issue.input === "string" ? issue.input.length : 0;
        return `is limited to ${max} characters, found ${length}; shorten it`;
      }
      if (issue.origin === "array" || issue.origin === "set")
        return `takes at most ${max} entries, found ${Array.isArray(issue.input) ? issue.input.length : 0}; remove some`;
      return `must be ${issue.inclusive === false ? "less than" : "at most"} ${max}, found ${found}; give a smaller value`;
    }
    case "invalid_value":
      return `must be one of ${choiceList(issue.values)}, found ${found}; pick one of these`;
    case "invalid_format": {
      const words = formatWords[issue.format];
      if (words) return `expected ${words.expected}, found ${found}; ${words.fix}`;
      return `found ${found}, which is not in the expected form; check it against the field's description`;
    }
    case "not_multiple_of":
      return `must be a multiple of ${String(issue.divisor)}, found ${found}`;
    case "unrecognized_keys":
      return `${issue.keys.map((k) => `"${k}"`).join(", ")} ${issue.keys.length === 1 ? "is" : "are"} not known here; remove ${issue.keys.length === 1 ? "it" : "them"} or check the spelling`;
    case "invalid_union":
      return `found ${found}, which matches none of the accepted forms; check it against the field's description`;
    case "invalid_key":
    case "invalid_element":
      return `holds an entry that is not valid (found ${found})`;
    default:
      return undefined;
  }
}

// zod asks this map only for issues whose schema gave no message of its own (schemas/safe-text.ts gives its own).
z.config({ customError: issueMessage });

/* ---------- Cell messages of uploads: "Plot 203: yield "n/a" is not a number; leave the cell empty …" ---------- */

/** The field as a curator knows it: its title in lower case, with the column name when they differ. */
function fieldWords(field: { name: string; title?: string }): string {
  if (!field.title) return field.name;
  const title = field.title.charAt(0).toLowerCase() + field.title.slice(1);
  // "Blocks (replicates)" already names blocks; "Row spacing" does not name row_spacing_in.
  return title
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "_")
    .startsWith(field.name)
    ? title
    : `${title} (${field.name})`;
}

interface CellField {
  name: string;
  title?: string;
  unit?: string;
  required: boolean;
}

const emptyHint = (f: CellField, what = "a missing value") =>
  f.required ? "this column is required, so every row needs a value" : `leave the cell empty for ${what}`;

/** How the trade names a value left out, per field ("leave the cell empty for a missing plot"). */
export const missingValueWords: Record<string, string> = {
  yield_kg_ha: "a missing plot",
  harvest_moisture_pct: "a plot whose moisture was not measured",
  stand_count: "a plot whose stand was not counted",
};

/** The fixes a cell check can ask for, each in one place. `what` names a missing value the way the trade does. */
export const cellMessages = {
  missing: (f: CellField) => `${fieldWords(f)} is required but the cell is empty; fill it in`,
  notNumber: (f: CellField, raw: string, whole: boolean, what?: string) =>
    `${fieldWords(f)} ${quoted(raw)} is not ${whole ? "a whole number" : "a number"}${f.unit ? ` of ${f.unit}` : ""}; write digits only (e.g. ${whole ? "4" : "3650.5"}), or ${emptyHint(f, what)}`,
  notYear: (f: CellField, raw: string) => `${fieldWords(f)} ${quoted(raw)} is not a four-digit year; write it as e.g. 2021`,
  belowMinimum: (f: CellField, value: number, minimum: number) =>
    `${fieldWords(f)} ${value}${f.unit ? ` ${f.unit}` : ""} is below the lowest accepted value, ${minimum}${f.unit ? ` ${f.unit}` : ""}; check the value and its unit`,
  aboveMaximum: (f: CellField, value: number, maximum: number) =>
    `${fieldWords(f)} ${value}${f.unit ? ` ${f.unit}` : ""} is above the highest accepted value, ${maximum}${f.unit ? ` ${f.unit}` : ""}; check the value and its unit`,
  notBoolean: (f: CellField, raw: string) => `${fieldWords(f)} ${quoted(raw)} is not yes or no; write true or false (yes/no, 1/0 also do)`,
  notDate: (f: CellField, raw: string) => `${fieldWords(f)} ${quoted(raw)} is not a date; write it as YYYY-MM-DD, e.g. 2021-05-12`,
  tooShort: (f: CellField, raw: string, min: number) =>
    `${fieldWords(f)} ${quoted(raw)} is too short: at least ${min} characters are needed; write it out in full`,
  tooLong: (f: CellField, raw: string, max: number) =>
    `${fieldWords(f)} ${quoted(raw)} is too long: at most ${max} characters fit; shorten it`,
  noPattern: (f: CellField, raw: string, pattern: string) =>
    `${fieldWords(f)} ${quoted(raw)} is not in the form this column uses (pattern ${pattern}); see the data dictionary`,
  notAllowed: (f: CellField, raw: string, allowed: readonly string[]) =>
    `${fieldWords(f)} ${quoted(raw)} is not one of the values this column takes: ${choiceList(allowed)}; use one of them as written`,
  wrongUnit: (what: string, expected: string, found: string) =>
    `${what} is measured in ${expected}, but the unit given is ${quoted(found)}; give the value in ${expected}, or say the file's unit in the upload options`,
};

/** The name of a row in a message, from its key cells: "Plot 203 of TB-01-2021", "Site-year TB-01-2021" … */
export function rowName(resource: string, values: Record<string, unknown>): string | null {
  const s = (k: string) => (values[k] === null || values[k] === undefined || values[k] === "" ? null : String(values[k]));
  switch (resource) {
    case "plots":
      return s("plot") ? `Plot ${s("plot")}${s("site_year") ? ` of ${s("site_year")}` : ""}` : null;
    case "site_years":
      return s("site_year") ? `Site-year ${s("site_year")}` : null;
    case "sites":
      return s("site") ? `Site ${s("site")}` : null;
    case "soil_tests":
      return s("site_year") && s("analyte") ? `${s("analyte")} test of ${s("site_year")}` : null;
    case "treatments":
      return s("treatment") ? `Treatment ${s("treatment")}` : null;
    case "summaries":
      return s("site_year") && s("treatment") ? `Mean of ${s("treatment")} at ${s("site_year")}` : null;
    default:
      return null;
  }
}

/* ---------- Repeated problems, grouped: "No responses yet at 72 site-years: TB-01-2021, … and 69 more" ---------- */

/** How many places a group names before "and N more". */
export const GROUP_PLACES = 3;

/** "TB-01-2021, TB-02-2021, TB-03-2021 and 69 more". */
export function placeList(places: readonly string[], count: number): string {
  const shown = places.slice(0, GROUP_PLACES);
  if (count <= shown.length) return shown.length > 1 ? `${shown.slice(0, -1).join(", ")} and ${shown.at(-1)}` : (shown[0] ?? "");
  return `${shown.join(", ")} and ${count - shown.length} more`;
}

/** One sentence for `count` problems of one kind ("base:detail"); a single problem keeps its own message. */
export function groupMessage(kind: string, count: number, places: readonly string[], first: string): string {
  if (count === 1) return first;
  const cut = kind.indexOf(":");
  const base = cut < 0 ? kind : kind.slice(0, cut);
  const detail = cut < 0 ? "" : kind.slice(cut + 1);
  const list = placeList(places, count);
  switch (base) {
    case "no-responses":
      return `No responses yet at ${count} site-years${detail ? ` (${detail})` : ""}: ${list}`;
    case "unbalanced":
      return `${count} site-years are unbalanced, so their responses use the least-squares fit and are stored as unbalanced (balanced = false): ${list}; add the missing plots to balance them`;
    case "unused-blocks":
      return `${count} site-years declare blocks that no plot with a yield is in: ${list}; each is analysed with the blocks that have yields`;
    case "outlier":
      return `${count} yields are far outside their site-year's range: ${list}; check them`;
    case "caution":
      return `${count} treatments trip caution ${detail}: ${list}; see each warning below for how`;
    default:
      return `${first} (${count} like this: ${list})`;
  }
}

import { Cite } from "@citation-js/core";
import "@citation-js/plugin-bibtex";
import "@citation-js/plugin-csl";
import "@citation-js/plugin-ris";
import type { CslItem } from "./csl-item";

export const citationFormats = ["text", "bibtex", "ris", "csl-json"] as const;
export type CitationFormat = (typeof citationFormats)[number];

export const citationMediaTypes: Record<CitationFormat, string> = {
  text: "text/plain",
  bibtex: "application/x-bibtex",
  ris: "application/x-research-info-systems",
  "csl-json": "application/vnd.citationstyles.csl+json",
};

// eslint-disable-next-line no-control-regex -- matching control characters is the point
const controlCharacters = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]+/g;

/** Every string of the item with its control characters (line breaks included) turned into one space. */
function oneLine<T>(value: T): T {
  if (typeof value === "string") return value.replace(controlCharacters, " ") as T;
  if (Array.isArray(value)) return value.map(oneLine) as T;
  if (value && typeof value === "object") return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, oneLine(v)])) as T;
  return value;
}

export const citationExtensions: Record<CitationFormat, string> = { text: "txt", bibtex: "bib", ris: "ris", "csl-json": "json" };

/**
 * Render one CSL-JSON item with citation-js. Plain text follows APA 7 (its dataset pattern: "(Version x) [Dataset]").
 * BibTeX is written as biblatex's `@dataset` entry (with `version` and a full `date`): BibTeX itself has no dataset
 * type, and parsers (citation-js, @retorquere/bibtex-parser) read `@dataset` back as a dataset where `@misc` comes
 * back as a generic document. Plain-BibTeX styles treat the unknown type as @misc.
 * The abstract stays in CSL-JSON only: a reference list does not carry it.
 */
export function renderCitation(original: CslItem, format: CitationFormat): string {
  // RIS and BibTeX are line- and brace-framed: a line break in a title would start a forged record. The contract
  // refuses control characters in one-line fields; metadata stored before that still reaches the writers as one line.
  const item = format === "csl-json" ? original : oneLine(original);
  switch (format) {
    case "csl-json":
      return `${JSON.stringify([item], null, 2)}\n`;
    case "text":
      return `${new Cite([item]).format("bibliography", { format: "text", template: "apa", lang: "en-US" }).trim()}\n`;
    case "bibtex": {
      const bib: CslItem & { "citation-key": string } = { ...item, "citation-key": bibtexKey(item) };
      delete bib.abstract;
      return `${new Cite([bib]).format("biblatex", { format: "text" }).trim()}\n`;
    }
    case "ris":
      return risText(item);
  }
}

/**
 * A cite key unique to the dataset and version (two versions, or two datasets, can share one .bib file). Letters,
 * digits and underscores only: citation-js replaces a key with other characters by an author-year-title label.
 */
function bibtexKey(item: Pick<CslItem, "id">): string {
  return item.id.replace(/[^A-Za-z0-9]+/g, "_");
}

/**
 * RIS: one "TAG  - value" line per value. citation-js's text output breaks values every 70 characters, which readers
 * do not join again (a URL came back with a space in it), so its tag objects are written out here whole.
 */
function risText(item: CslItem): string {
  const ris: CslItem = { ...item };
  // A reference needs no abstract, and a long one is what other RIS writers wrap.
  delete ris.abstract;
  const [entry] = new Cite([ris]).format("ris", { format: "object" }) as unknown as Record<string, string | string[]>[];
  const line = (tag: string, value: string) => `${tag}  - ${value.replace(/\s*[\r\n]+\s*/g, " ")}`;
  const lines = [line("TY", String(entry!.TY))];
  for (const [tag, value] of Object.entries(entry!)) {
    if (tag !== "TY") for (const v of [value].flat()) lines.push(line(tag, String(v)));
  }
  lines.push("ER  -");
  return `${lines.join("\n")}\n`;
}

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
 * BibTeX has no version or full-date fields for @misc, so it gets the version as a note and the year alone
 * (a day in `month` would not be valid BibTeX).
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
      const year = item.issued["date-parts"][0][0];
      const bib: CslItem = { ...item, issued: { "date-parts": [[year]] }, note: `Version ${item.version}` };
      delete bib.abstract;
      return `${new Cite([bib]).format("bibtex", { format: "text" }).trim()}\n`;
    }
    case "ris": {
      // RIS writers wrap a long abstract over lines many readers do not join again; a reference needs none.
      const ris: CslItem = { ...item };
      delete ris.abstract;
      return `${new Cite([ris]).format("ris", { format: "text" }).trim()}\n`;
    }
  }
}

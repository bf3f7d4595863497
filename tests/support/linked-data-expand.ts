import { readFileSync } from "node:fs";
import path from "node:path";
import jsonld from "jsonld";

/**
 * Offline JSON-LD expansion with the `jsonld` library: the only remote context the pages use is schema.org's, served
 * here from a stored subset of it (tests/fixtures/schema-org-context.jsonld) under each name a page may give it. Any
 * other fetch fails the test.
 */
const schemaOrgContext = JSON.parse(readFileSync(path.resolve(__dirname, "../fixtures/schema-org-context.jsonld"), "utf8")) as object;
const documentLoader = async (url: string) => {
  if (["https://schema.org", "https://schema.org/", "http://schema.org", "http://schema.org/"].includes(url)) {
    return { contextUrl: null, documentUrl: url, document: schemaOrgContext };
  }
  throw new Error(`the JSON-LD processor tried to fetch ${url}`);
};
export const expand = (doc: unknown) => jsonld.expand(doc as object, { documentLoader });

export const DCAT = "http://www.w3.org/ns/dcat#";
export const DCT = "http://purl.org/dc/terms/";
export const SPDX = "http://spdx.org/rdf/terms#";
export const VCARD = "http://www.w3.org/2006/vcard/ns#";
// The schema.org context maps its terms onto the http: vocabulary, whichever scheme the page names it by.
export const SDO = "http://schema.org/";

export type Expanded = Record<string, unknown>;
export const values = (node: Expanded, iri: string) => (node[iri] ?? []) as { "@value"?: unknown; "@id"?: string; "@type"?: string }[];
export const value = (node: Expanded, iri: string) => values(node, iri)[0]?.["@value"];
export const id = (node: Expanded, iri: string) => values(node, iri)[0]?.["@id"];
export const nodes = (node: Expanded, iri: string) => (node[iri] ?? []) as Expanded[];

/** The JSON-LD script of a served HTML page. */
export function jsonLdOfPage(html: string): Record<string, unknown> {
  const m = /<script type="application\/ld\+json">([\s\S]*?)<\/script>/.exec(html);
  if (!m) throw new Error("the page carries no JSON-LD script");
  return JSON.parse(m[1]!) as Record<string, unknown>;
}

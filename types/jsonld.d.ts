/** The part of jsonld 9 the linked-data tests use (the package ships no types). */
declare module "jsonld" {
  interface RemoteDocument {
    contextUrl: string | null;
    documentUrl: string;
    document: unknown;
  }
  interface Options {
    documentLoader?: (url: string) => Promise<RemoteDocument>;
    base?: string;
  }
  const jsonld: {
    expand(input: unknown, options?: Options): Promise<Record<string, unknown>[]>;
    toRDF(input: unknown, options?: Options & { format?: "application/n-quads" }): Promise<string>;
  };
  export default jsonld;
}

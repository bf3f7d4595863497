/** The part of citation-js 0.8 that Plotbank uses (the package ships no types). */
declare module "@citation-js/core" {
  export class Cite {
    constructor(data: unknown, options?: Record<string, unknown>);
    data: Record<string, unknown>[];
    format(format: string, options?: Record<string, unknown>): string;
  }
  export const plugins: { config: { get(name: string): unknown } };
}
declare module "@citation-js/plugin-bibtex";
declare module "@citation-js/plugin-csl";
declare module "@citation-js/plugin-ris";

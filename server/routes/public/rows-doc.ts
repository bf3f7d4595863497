import type { RouteConfig } from "@asteasolutions/zod-to-openapi";
import { z } from "zod";
import { problemResponses } from "@/server/openapi/registry";

export const datasetPathParams = z.object({ slug: z.string().min(1).max(120).describe("Dataset slug") });
export const versionPathParams = datasetPathParams.extend({
  semver: z
    .string()
    .regex(/^(latest|\d+\.\d+\.\d+)$/, "a semantic version such as 1.2.0, or latest")
    .describe("Semantic version, or `latest` for the newest published version"),
});

const cachingHeaders = {
  ETag: { description: "Strong validator; send it back as If-None-Match for a 304", schema: { type: "string" as const } },
  "Cache-Control": {
    description: "`public, max-age=31536000, immutable` on version-pinned URLs; `public, max-age=60` on `latest` and cross-dataset reads",
    schema: { type: "string" as const },
  },
};

/** A withdrawn version's rows: the problem carries `withdrawnReason`. */
export const goneResponse = {
  410: { description: "The version was withdrawn; its metadata stays, its rows are not served", content: problemResponses(410)[410]!.content },
};

/** 304 and the rate-limit answers every public read can give. */
export const readResponses = {
  304: { description: "Not modified: the copy named by If-None-Match is current" },
  ...problemResponses(400, 404, 429),
};

/** The OpenAPI description of a rows endpoint: a JSON page (cursor paging) or the whole CSV stream. */
export function rowsRoute(o: { path: string; summary: string; description?: string; tag: string; query: z.ZodObject; params?: z.ZodObject; page: z.ZodType; gone?: boolean }): RouteConfig {
  return {
    method: "get",
    path: o.path,
    tags: [o.tag],
    summary: o.summary,
    description:
      (o.description ? `${o.description}\n\n` : "") +
      "JSON pages of `limit` rows (cursor paging: follow `nextPageToken` or the Link rel=next header). " +
      "CSV (`format=csv` or `Accept: text/csv`) streams every matching row in one answer, with " +
      '`Link: </api/v1/schemas/{view}>; rel="describedby"` (the Table Schema of the CSV\'s columns); text cells that start with = + - @ are prefixed with \' so spreadsheets read them as text.',
    request: { query: o.query, ...(o.params ? { params: o.params } : {}) },
    responses: {
      200: {
        description: "One page of rows (JSON) or all rows (CSV)",
        headers: { ...cachingHeaders, Link: { description: 'rel="next" (JSON) or rel="describedby" (CSV)', schema: { type: "string" } } },
        content: { "application/json": { schema: o.page }, "text/csv": { schema: z.string() } },
      },
      ...readResponses,
      ...(o.gone ? goneResponse : {}),
    },
  };
}

/** The headers of a cacheable JSON metadata answer. */
export const metadataHeaders = cachingHeaders;

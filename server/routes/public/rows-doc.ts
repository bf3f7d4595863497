import { z } from "zod";
import type { Responses } from "@/server/openapi/define-route";
import { problemResponse, problemResponses } from "@/server/openapi/registry";

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
const goneResponse = problemResponse(410, "The version was withdrawn; its metadata stays, its rows are not served");

/** 304 and the rate-limit answers every public read can give. */
export const readResponses = {
  304: { description: "Not modified: the copy named by If-None-Match is current" },
  ...problemResponses(400, 404, 429),
};

/** The definition of a rows endpoint (for defineRoute): a JSON page (cursor paging) or the whole CSV stream. */
export function rowsRoute<Q extends z.ZodObject, P extends z.ZodObject | undefined = undefined>(o: {
  path: `/api/v1/${string}`;
  operationId: string;
  summary: string;
  description?: string;
  tag: string;
  query: Q;
  params?: P;
  page: z.ZodType;
  gone?: boolean;
}) {
  return {
    method: "get" as const,
    path: o.path,
    operationId: o.operationId,
    tags: [o.tag],
    summary: o.summary,
    description:
      (o.description ? `${o.description}\n\n` : "") +
      "JSON pages of `limit` rows (cursor paging: follow `nextPageToken` or the Link rel=next header). " +
      "CSV (`format=csv` or `Accept: text/csv`) streams every matching row in one answer, with " +
      '`Link: </api/v1/schemas/{view}>; rel="describedby"` (the Table Schema of the CSV\'s columns) and `rel="related"` links to the data ' +
      "dictionaries of the versions read; CRLF, UTF-8 without BOM, and text cells that start with = + - @, a tab or a CR are prefixed with ' so " +
      "spreadsheets read them as text.",
    query: o.query,
    params: o.params,
    responses: <Responses>{
      200: {
        description: "One page of rows (JSON) or all rows (CSV)",
        headers: {
          ...cachingHeaders,
          Link: { description: 'rel="next" (JSON) or rel="describedby" (CSV)', schema: { type: "string" as const } },
        },
        content: { "application/json": { schema: o.page }, "text/csv": { schema: z.string() } },
      },
      ...readResponses,
      ...(o.gone ? goneResponse : {}),
    },
  };
}

/** The headers of a cacheable JSON metadata answer. */
export const metadataHeaders = cachingHeaders;

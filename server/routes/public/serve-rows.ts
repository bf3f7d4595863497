import type { Request, Response } from "express";
import type { Db } from "@/db/client";
import { filtersToQuery, type TrialFilters } from "@/schemas/filters";
import type { YieldUnit } from "@/schemas/public";
import { cacheable, strongEtag, type Freshness } from "@/server/caching";
import { streamCsv } from "@/server/csv";
import { decodePageToken, encodePageToken, nextPageUrl, queryHash } from "@/server/paging";
import type { RowResource, RowScope } from "@/server/services/public/row-resource";
import { viewSchemaPath } from "@/server/services/public/view-schema";
import { versionPath } from "@/server/services/public/versions";
import type { ResolvedVersion } from "@/server/services/trial-filter";

/** Rows read per database round trip while streaming CSV: large enough to be fast, small enough to stay flat in memory. */
const csvBatchSize = 2000;

interface PagingQuery {
  format?: "json" | "csv";
  limit: number;
  pageToken?: string;
  units?: YieldUnit;
}

export interface ServeRows<Row extends { id: number }, F> {
  db: Db;
  resource: RowResource<Row, F>;
  versions: ResolvedVersion[];
  /** The parsed query: filters plus format, limit, pageToken and (for yields) units. */
  query: F & PagingQuery;
  freshness: Freshness;
}

function wantsCsv(req: Request, format: PagingQuery["format"]): boolean {
  if (format) return format === "csv";
  return req.accepts(["application/json", "text/csv"]) === "text/csv";
}

async function* batchesOf<Row extends { id: number }>(read: (afterId: number, limit: number) => Promise<Row[]>) {
  let after = 0;
  for (;;) {
    const rows = await read(after, csvBatchSize);
    if (rows.length) yield rows;
    if (rows.length < csvBatchSize) return;
    after = rows[rows.length - 1]!.id;
  }
}

/**
 * Answer a rows request: 304 when the client's copy is current; CSV streamed in full; or one JSON page with
 * `nextPageToken` and a Link rel=next. The ETag and the page token both come from the versions read and the
 * normalised query, so they are known before any row is read.
 */
export async function serveRows<Row extends { id: number }, F>(req: Request, res: Response, o: ServeRows<Row, F>): Promise<void> {
  const { format: _format, limit, pageToken, units, ...filters } = o.query;
  const csv = wantsCsv(req, o.query.format);
  const versionIds = o.versions.map((v) => v.versionId).sort();
  // filtersToQuery sorts keys and list values, so equivalent queries share an ETag and a page token.
  const canonical = (extra: object) => filtersToQuery({ ...filters, ...extra } as Partial<TrialFilters>);
  const hash = queryHash([o.resource.name, versionIds, canonical({ units })]);
  const afterId = csv ? 0 : decodePageToken(pageToken, hash);
  const etag = strongEtag([o.resource.name, versionIds, canonical({ units, limit, pageToken }), csv ? "csv" : "json"]);
  if (cacheable(req, res, etag, o.freshness)) return;

  const scope: RowScope<F> = { versions: o.versions, filters: filters as unknown as F, units: units ?? "bu/ac" };
  const read = (after: number, n: number) => o.resource.readBatch(o.db, scope, after, n);
  const versions = o.versions.map((v) => ({ dataset: v.datasetSlug, version: v.semver, licence: v.licence }));

  if (csv) {
    res.setHeader("Content-Type", "text/csv; charset=utf-8; header=present");
    res.setHeader("Content-Disposition", `inline; filename="${o.resource.name}.csv"`);
    // The CSV's own columns are described by its view's Table Schema, not by the versions' resource schemas; the data
    // dictionaries of the versions read are linked as related.
    const links = [`<${viewSchemaPath(o.resource.name)}>; rel="describedby"; type="application/json"`];
    for (const v of o.versions) links.push(`<${versionPath(v.datasetSlug, v.semver)}/schema>; rel="related"; title="data dictionary"`);
    res.setHeader("Link", links.join(", "));
    try {
      await streamCsv(res, o.resource.csvColumns, batchesOf(read));
    } catch (error) {
      // Headers are gone; all that is left is to cut the stream so the client sees it incomplete.
      res.destroy(error as Error);
    }
    return;
  }

  const head = (nextPageToken: string | null) => {
    if (nextPageToken) {
      const base = req.originalUrl.split("?")[0]!;
      res.setHeader("Link", `<${nextPageUrl(base, req.query as Record<string, unknown>, nextPageToken)}>; rel="next"`);
    }
    return { nextPageToken, versions, ...(units ? { units } : {}) };
  };
  if (o.resource.readJsonPage) {
    // The items come from the database as JSON text; only the page's own fields are encoded here.
    const page = await o.resource.readJsonPage(o.db, scope, afterId, limit);
    const nextPageToken = page.read > limit && page.lastId !== null ? encodePageToken(page.lastId, hash) : null;
    res.type("application/json").send(`{"items":${page.itemsJson},${JSON.stringify(head(nextPageToken)).slice(1)}`);
    return;
  }
  const rows = await read(afterId, limit + 1);
  const items = rows.slice(0, limit);
  const last = items[items.length - 1];
  res.json({ items, ...head(rows.length > limit && last ? encodePageToken(last.id, hash) : null) });
}

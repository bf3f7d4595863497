import { and, gt, inArray } from "drizzle-orm";
import { sites } from "@/db/schema";
import { siteRow, type SiteRow } from "@/schemas/public";
import { columnsFromFields, provenanceLookup, versionIdsOf, type RowResource } from "./row-resource";

export const siteResource: RowResource<SiteRow, object> = {
  name: "sites",
  row: siteRow,
  async readBatch(db, scope, afterId, limit) {
    const from = provenanceLookup(scope);
    const rows = await db
      .select()
      .from(sites)
      .where(and(inArray(sites.versionId, versionIdsOf(scope)), gt(sites.id, afterId)))
      .orderBy(sites.id)
      .limit(limit);
    return rows.map((r) => ({
      id: r.id,
      ...from(r.versionId),
      code: r.code,
      location: r.location,
      soilSeries: r.soilSeries,
      soilTexture: r.soilTexture,
    }));
  },
  csvColumns: columnsFromFields<SiteRow>(Object.keys(siteRow.shape) as (keyof SiteRow)[]),
};

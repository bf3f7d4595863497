import { inArray, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { siteYears } from "@/db/schema";

export interface YearSpan {
  from: number;
  to: number;
}

/** The growing seasons each version covers (first and last site-year), for temporal coverage. */
export async function seasonsByVersion(db: Db, versionIds: string[]): Promise<Map<string, YearSpan>> {
  if (versionIds.length === 0) return new Map();
  const rows = await db
    .select({
      versionId: siteYears.versionId,
      from: sql<number>`min(${siteYears.year})`.mapWith(Number),
      to: sql<number>`max(${siteYears.year})`.mapWith(Number),
    })
    .from(siteYears)
    .where(inArray(siteYears.versionId, versionIds))
    .groupBy(siteYears.versionId);
  return new Map(rows.map((r) => [r.versionId, { from: r.from, to: r.to }]));
}

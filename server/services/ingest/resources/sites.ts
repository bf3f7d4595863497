import { and, eq, inArray } from "drizzle-orm";
import { sites } from "@/db/schema";
import { str, type IngestContext, type ResourceIngest } from "../resource-ingest";
import { insertRows } from "../write-rows";

interface SiteRow {
  code: string;
  location: string;
  soilSeries: string | null;
  soilTexture: string | null;
}

export function sitesIngest({ state, options, report, versionId }: IngestContext): ResourceIngest {
  const rows = new Map<string, SiteRow>();
  return {
    resource: "sites",
    row(v, row) {
      const code = str(v.site);
      if (code === null) return;
      if (rows.has(code)) return report.error(row, "site", code, `site "${code}" appears twice in the file (site is the primary key)`);
      rows.set(code, { code, location: str(v.location) ?? "", soilSeries: str(v.soil_series), soilTexture: str(v.soil_texture) });
    },
    finish() {
      if (options.mode !== "replace") return;
      for (const [code, site] of state.sites) {
        if (!rows.has(code) && site.used)
          report.error(
            null,
            "site",
            code,
            `site "${code}" is missing from the file but its site-years are still in the draft; remove them first`,
          );
      }
    },
    count: () => rows.size,
    async write(database, tx) {
      const fresh: SiteRow[] = [];
      for (const r of rows.values()) {
        if (state.sites.has(r.code)) {
          await tx
            .update(sites)
            .set({ location: r.location, soilSeries: r.soilSeries, soilTexture: r.soilTexture })
            .where(and(eq(sites.versionId, versionId), eq(sites.code, r.code)));
        } else fresh.push(r);
      }
      await insertRows(
        database,
        tx,
        sites,
        ["versionId", "code", "location", "soilSeries", "soilTexture"],
        fresh.map((r) => [versionId, r.code, r.location, r.soilSeries, r.soilTexture]),
      );
      if (options.mode === "replace") {
        const gone = [...state.sites.keys()].filter((c) => !rows.has(c));
        if (gone.length) await tx.delete(sites).where(and(eq(sites.versionId, versionId), inArray(sites.code, gone)));
      }
      return { siteYearCodes: [] };
    },
  };
}

import { and, eq, inArray } from "drizzle-orm";
import { siteYears } from "@/db/schema";
import { num, str, type IngestContext, type ResourceIngest } from "../resource-ingest";
import { insertRows } from "../write-rows";

interface SiteYearRow {
  code: string;
  siteCode: string;
  crop: string;
  year: number;
  design: string;
  blocks: number;
  tillage: string | null;
  previousCrop: string | null;
  plantingDate: string | null;
  rowSpacingIn: number | null;
  variety: string | null;
  maturityGroup: string | null;
}

export function siteYearsIngest({ state, options, report, versionId }: IngestContext): ResourceIngest {
  const rows = new Map<string, SiteYearRow>();
  return {
    resource: "site_years",
    row(v, row) {
      const code = str(v.site_year);
      const siteCode = str(v.site);
      if (code === null || siteCode === null || v.crop === null || v.year === null || v.blocks === null) return;
      if (rows.has(code))
        return report.error(row, "site_year", code, `site-year "${code}" appears twice in the file (site_year is the primary key)`);
      if (!state.sites.has(siteCode))
        return report.error(row, "site", siteCode, `site "${siteCode}" is not in this version; upload it in sites first`);
      const year = num(v.year)!;
      const plantingDate = str(v.planting_date);
      if (plantingDate && Math.abs(Number(plantingDate.slice(0, 4)) - year) > 1) {
        report.warn(row, "planting_date", plantingDate, `planting date is not in the harvest year ${year}`);
      }
      const existing = state.siteYears.get(code);
      const blocks = num(v.blocks)!;
      if (existing && (existing.hasPlots || existing.hasSummaries) && existing.crop !== v.crop) {
        report.warn(
          row,
          "crop",
          String(v.crop),
          `site-year "${code}" changes crop from ${existing.crop}; its yields were converted for ${existing.crop}`,
        );
      }
      rows.set(code, {
        code,
        siteCode,
        crop: String(v.crop),
        year,
        design: str(v.design) ?? "RCBD",
        blocks,
        tillage: str(v.tillage),
        previousCrop: str(v.previous_crop),
        plantingDate,
        rowSpacingIn: num(v.row_spacing_in),
        variety: str(v.variety),
        maturityGroup: str(v.maturity_group),
      });
    },
    finish() {
      if (options.mode !== "replace") return;
      for (const [code, sy] of state.siteYears) {
        if (!rows.has(code) && (sy.hasPlots || sy.hasSummaries || sy.hasSoilTests)) {
          report.error(
            null,
            "site_year",
            code,
            `site-year "${code}" is missing from the file but still has plots, summaries or soil tests in the draft; remove those first`,
          );
        }
      }
    },
    count: () => rows.size,
    async write(database, tx) {
      const fresh: SiteYearRow[] = [];
      for (const r of rows.values()) {
        const values = {
          siteId: state.sites.get(r.siteCode)!.id,
          crop: r.crop,
          year: r.year,
          design: r.design,
          blocks: r.blocks,
          tillage: r.tillage,
          previousCrop: r.previousCrop,
          plantingDate: r.plantingDate,
          rowSpacingIn: r.rowSpacingIn,
          variety: r.variety,
          maturityGroup: r.maturityGroup,
        };
        if (state.siteYears.has(r.code)) {
          await tx
            .update(siteYears)
            .set(values)
            .where(and(eq(siteYears.versionId, versionId), eq(siteYears.code, r.code)));
        } else fresh.push(r);
      }
      await insertRows(
        database,
        tx,
        siteYears,
        [
          "versionId",
          "siteId",
          "code",
          "crop",
          "year",
          "design",
          "blocks",
          "tillage",
          "previousCrop",
          "plantingDate",
          "rowSpacingIn",
          "variety",
          "maturityGroup",
        ],
        fresh.map((r) => [
          versionId,
          state.sites.get(r.siteCode)!.id,
          r.code,
          r.crop,
          r.year,
          r.design,
          r.blocks,
          r.tillage,
          r.previousCrop,
          r.plantingDate,
          r.rowSpacingIn,
          r.variety,
          r.maturityGroup,
        ]),
      );
      if (options.mode === "replace") {
        const gone = [...state.siteYears.keys()].filter((c) => !rows.has(c));
        if (gone.length) await tx.delete(siteYears).where(and(eq(siteYears.versionId, versionId), inArray(siteYears.code, gone)));
      }
      return { siteYearCodes: [...rows.keys()] };
    },
  };
}

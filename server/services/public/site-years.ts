import { and, eq, gt, inArray } from "drizzle-orm";
import { sites, siteYears, soilTests } from "@/db/schema";
import type { TrialFilters } from "@/schemas/filters";
import { siteYearRow, type SiteYearRow } from "@/schemas/public";
import type { CsvColumn } from "@/server/csv";
import { siteYearConditions } from "@/server/services/trial-filter";
import { columnsFromFields, provenanceLookup, versionIdsOf, type RowResource } from "./row-resource";

type SoilTest = SiteYearRow["soilTests"][number];

/** In CSV, the nutrient soil tests become columns of their own: value, unit, extractant, class, reported class and scheme for P, K and S. */
const soilColumns: CsvColumn<SiteYearRow>[] = (["P", "K", "S"] as const).flatMap((analyte) => {
  const test = (row: SiteYearRow) => row.soilTests.find((t) => t.analyte === analyte);
  const column = (suffix: string, pick: (t: SoilTest) => string | number | null) => ({
    name: `soil${analyte}${suffix}`,
    value: (row: SiteYearRow) => {
      const t = test(row);
      return t ? pick(t) : null;
    },
  });
  return [
    column("Value", (t) => t.value),
    column("Unit", (t) => t.unit),
    column("Extractant", (t) => t.extractant),
    column("Class", (t) => t.class),
    column("ReportedClass", (t) => t.reportedClass),
    column("Scheme", (t) => t.interpretation),
  ];
});

const soilFieldFacts = (["P", "K", "S"] as const).flatMap((analyte) => [
  [`soil${analyte}Value`, { type: "number" as const, description: `Soil-test ${analyte} value, in soil${analyte}Unit` }],
  [`soil${analyte}Unit`, { type: "string" as const, description: `Unit of the soil-test ${analyte} value` }],
  [`soil${analyte}Extractant`, { type: "string" as const, description: `Extractant of the soil-test ${analyte} value` }],
  [`soil${analyte}Class`, { type: "string" as const, description: `Soil-test ${analyte} class (very_low … very_high)` }],
]);

export const siteYearResource: RowResource<SiteYearRow, Partial<TrialFilters>> = {
  name: "site-years",
  row: siteYearRow,
  async readBatch(db, scope, afterId, limit) {
    const from = provenanceLookup(scope);
    const rows = await db
      .select({ siteYear: siteYears, siteCode: sites.code, location: sites.location, soilTexture: sites.soilTexture })
      .from(siteYears)
      .innerJoin(sites, eq(sites.id, siteYears.siteId))
      .where(and(siteYearConditions(scope.filters, versionIdsOf(scope)), gt(siteYears.id, afterId)))
      .orderBy(siteYears.id)
      .limit(limit);
    const ids = rows.map((r) => r.siteYear.id);
    const tests = ids.length ? await db.select().from(soilTests).where(inArray(soilTests.siteYearId, ids)).orderBy(soilTests.analyte) : [];
    const testsBySiteYear = new Map<number, SoilTest[]>();
    for (const t of tests) {
      const list = testsBySiteYear.get(t.siteYearId) ?? [];
      list.push({
        analyte: t.analyte,
        value: t.value,
        unit: t.unit,
        extractant: t.extractant,
        depthIn: t.depthIn,
        class: t.class,
        reportedClass: t.reportedClass,
        interpretation: t.interpretation,
      });
      testsBySiteYear.set(t.siteYearId, list);
    }
    return rows.map(({ siteYear: sy, siteCode, location, soilTexture }) => ({
      id: sy.id,
      ...from(sy.versionId),
      code: sy.code,
      siteCode,
      location,
      soilTexture,
      crop: sy.crop,
      year: sy.year,
      design: sy.design,
      blocks: sy.blocks,
      tillage: sy.tillage,
      previousCrop: sy.previousCrop,
      plantingDate: sy.plantingDate,
      rowSpacingIn: sy.rowSpacingIn,
      variety: sy.variety,
      maturityGroup: sy.maturityGroup,
      soilTests: testsBySiteYear.get(sy.id) ?? [],
    }));
  },
  csvColumns: columnsFromFields<SiteYearRow>(Object.keys(siteYearRow.shape) as (keyof SiteYearRow)[], { soilTests: soilColumns }),
  csvFields: Object.fromEntries(soilFieldFacts),
};

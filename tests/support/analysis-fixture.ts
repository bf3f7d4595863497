import { eq } from "drizzle-orm";
import type { TableSchemaDescriptor } from "@/schemas/table-schema";
import { datasets, responses, siteYears, sites, soilTests, treatments, versions } from "@/db/schema";
import type { AppContext } from "@/server/context";
import { makeUser } from "./test-app";

/** One treatment-vs-check response to insert; everything but the effect has a plausible default. */
export interface FixtureResponse {
  siteYear: string;
  year?: number;
  crop?: string;
  treatment: string;
  nutrients?: string[];
  placements?: string[];
  /** Mean difference and its SE, kg/ha. */
  md: number;
  se: number;
  df?: number;
  replicates?: number;
  checkMean?: number;
  soilPClass?: string | null;
  soilPValue?: number | null;
  soilKClass?: string | null;
  soilKValue?: number | null;
  tillage?: string | null;
  rowSpacingIn?: number | null;
  plantingDate?: string | null;
  /** P2O5 of the treatment, lb/ac (default 40). */
  p2o5LbAc?: number;
}

export interface FixtureDataset {
  slug: string;
  semver?: string;
  licence?: string;
  state?: "published" | "withdrawn" | "draft";
  responses: FixtureResponse[];
  /** Also record each site-year's P soil test (ppm) with this extractant, as an upload would. */
  soilPExtractant?: string;
}

/**
 * Inserts a dataset with one version and its responses directly (dataset, draft version, sites, site-years,
 * treatments, responses), then publishes it, the way the immutability triggers allow.
 */
export async function insertAnalysisFixture(ctx: AppContext, input: FixtureDataset) {
  const db = ctx.db;
  const owner = await makeUser(ctx, "curator");
  const [existing] = await db.select().from(datasets).where(eq(datasets.slug, input.slug));
  const dataset =
    existing ??
    (
      await db
        .insert(datasets)
        .values({
          slug: input.slug,
          title: `Fixture ${input.slug}`,
          crops: ["soybean"],
          region: "Tallgrass Basin",
          description: "Test fixture",
          licence: input.licence ?? "CC-BY-4.0",
          ownerId: owner.id,
        })
        .returning()
    )[0]!;
  const [version] = await db
    .insert(versions)
    .values({
      datasetId: dataset.id,
      semver: input.semver ?? "1.0.0",
      tableSchema: { resources: {} } as TableSchemaDescriptor,
      createdBy: owner.id,
    })
    .returning();
  const versionId = version!.id;
  const siteIds = new Map<string, number>();
  const siteYearIds = new Map<string, number>();
  const treatmentIds = new Map<string, number>();
  const treatmentId = async (code: string, isCheck = false) => {
    if (!treatmentIds.has(code)) {
      const [t] = await db.insert(treatments).values({ versionId, code, name: code, isCheck }).returning({ id: treatments.id });
      treatmentIds.set(code, t!.id);
    }
    return treatmentIds.get(code)!;
  };
  const checkId = await treatmentId("CK", true);
  const inserted: (typeof responses.$inferSelect)[] = [];
  for (const r of input.responses) {
    const siteCode = r.siteYear.split("-").slice(0, 2).join("-");
    if (!siteIds.has(siteCode)) {
      const [s] = await db.insert(sites).values({ versionId, code: siteCode, location: "Tallgrass County" }).returning({ id: sites.id });
      siteIds.set(siteCode, s!.id);
    }
    const year = r.year ?? 2021;
    const crop = r.crop ?? "soybean";
    if (!siteYearIds.has(r.siteYear)) {
      const [sy] = await db
        .insert(siteYears)
        .values({
          versionId,
          siteId: siteIds.get(siteCode)!,
          code: r.siteYear,
          crop,
          year,
          blocks: r.replicates ?? 4,
          tillage: r.tillage ?? null,
          rowSpacingIn: r.rowSpacingIn ?? null,
          plantingDate: r.plantingDate ?? null,
        })
        .returning({ id: siteYears.id });
      siteYearIds.set(r.siteYear, sy!.id);
      if (input.soilPExtractant && r.soilPValue !== null && r.soilPValue !== undefined)
        await db
          .insert(soilTests)
          .values({ versionId, siteYearId: sy!.id, analyte: "P", value: r.soilPValue, unit: "ppm", extractant: input.soilPExtractant });
    }
    const replicates = r.replicates ?? 4;
    const checkMean = r.checkMean ?? 3500;
    const treated = checkMean + r.md;
    const semSquared = (r.se * r.se) / 2;
    const [row] = await db
      .insert(responses)
      .values({
        versionId,
        siteYearId: siteYearIds.get(r.siteYear)!,
        treatmentId: await treatmentId(r.treatment),
        checkTreatmentId: checkId,
        siteCode,
        siteYearCode: r.siteYear,
        treatmentCode: r.treatment,
        crop,
        year,
        tillage: r.tillage ?? null,
        rowSpacingIn: r.rowSpacingIn ?? null,
        plantingDate: r.plantingDate ?? null,
        nutrients: r.nutrients ?? ["P"],
        placements: r.placements ?? ["2x2-band"],
        nLbAc: 0,
        p2o5LbAc: r.p2o5LbAc ?? 40,
        k2oLbAc: 0,
        sLbAc: 0,
        soilPClass: r.soilPClass === undefined ? "low" : r.soilPClass,
        soilPValue: r.soilPValue === undefined ? 8 : r.soilPValue,
        soilKClass: r.soilKClass ?? null,
        soilKValue: r.soilKValue ?? null,
        checkMeanKgHa: checkMean,
        treatedMeanKgHa: treated,
        mdKgHa: r.md,
        seKgHa: r.se,
        dfError: r.df ?? 9,
        lnrr: treated > 0 && checkMean > 0 ? Math.log(treated / checkMean) : null,
        lnrrVar: treated > 0 && checkMean > 0 ? semSquared * (1 / treated ** 2 + 1 / checkMean ** 2) : null,
        replicates,
        balanced: true,
      })
      .returning();
    inserted.push(row!);
  }
  await db
    .update(versions)
    .set({ state: input.state ?? "published", publishedAt: new Date() })
    .where(eq(versions.id, versionId));
  return { dataset, versionId, responses: inserted };
}

/**
 * A small Tallgrass Basin P-starter set for screens when no demo data are loaded: 24 site-years over six seasons,
 * three placements against one check, responses larger on low-testing soils. Deterministic (no randomness).
 */
export function tallgrassStarterResponses(): FixtureResponse[] {
  const classes = [
    { soilPClass: "very_low", soilPValue: 4, base: 420 },
    { soilPClass: "low", soilPValue: 9, base: 260 },
    { soilPClass: "optimum", soilPValue: 18, base: 90 },
    { soilPClass: "high", soilPValue: 30, base: 10 },
  ];
  const placements = [
    { treatment: "IF", placements: ["in-furrow"], factor: 0.8 },
    { treatment: "BAND", placements: ["2x2-band"], factor: 1 },
    { treatment: "BC", placements: ["broadcast"], factor: 0.6 },
  ];
  const out: FixtureResponse[] = [];
  for (let i = 0; i < 24; i++) {
    const c = classes[i % 4]!;
    const year = 2019 + (i % 6);
    const wobble = ((i * 37) % 11) - 5;
    for (const p of placements) {
      out.push({
        siteYear: `TB-${String(i + 1).padStart(2, "0")}-${year}`,
        year,
        treatment: p.treatment,
        placements: p.placements,
        md: c.base * p.factor + wobble * 30,
        se: 70 + ((i * 13) % 5) * 10,
        soilPClass: c.soilPClass,
        soilPValue: c.soilPValue + (i % 3),
        tillage: i % 2 ? "no-till" : "conventional",
        rowSpacingIn: i % 3 ? 30 : 15,
      });
    }
  }
  return out;
}

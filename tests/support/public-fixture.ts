import { eq } from "drizzle-orm";
import { applications, datasets, plots, responses, sites, siteYears, soilTests, treatments, versions } from "@/db/schema";
import type { TableSchemaDescriptor } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { rcbdAnova } from "@/stats";
import { makeUser } from "./test-app";

/**
 * A small invented Tallgrass Basin catalogue for the public API tests, inserted row by row with drizzle while each
 * version is a draft, then published (the immutability triggers allow nothing else):
 * - tb-soy-starter-p: 0.9.0 withdrawn, 1.0.0 published (2 sites), 1.1.0 published (3 sites);
 *   soybean, check / in-furrow / 2x2 band / broadcast P, 4 blocks, 2020–2022, soil-test P classes varying by site.
 * - tb-corn-nk: 1.0.0 published; corn, check / 2x2 N+K low / high rate, 2021–2022.
 * Responses come from each site-year's RCBD ANOVA (the stats engine), as the ingest computes them.
 * Some text cells start with = + - @ or hold quotes and commas, to exercise CSV quoting and formula neutralising.
 */

interface SiteSpec {
  code: string;
  location: string;
  soilSeries?: string;
  pClass: "very_low" | "low" | "optimum" | "high" | "very_high";
  pPpm: number;
  kClass: "low" | "optimum" | "high";
  tillage: "no-till" | "strip-till" | "conventional";
  rowSpacingIn: number;
}

interface TreatmentSpec {
  code: string;
  name: string;
  isCheck?: boolean;
  nutrients: string[];
  placements: string[];
  n: number;
  p2o5: number;
  k2o: number;
  /** True response on a very-low soil, kg/ha; it shrinks as the soil-test class rises. */
  gain: number;
  apps: { product: string; grade: string; productRate: number; rateUnit: string; placement: string; timing: string }[];
}

interface VersionSpec {
  slug: string;
  semver: string;
  crop: "soybean" | "corn";
  years: number[];
  sites: SiteSpec[];
  treatments: TreatmentSpec[];
  baseKgHa: number;
  withdraw?: string;
  seed: number;
}

const classFactor: Record<string, number> = { very_low: 1, low: 0.7, optimum: 0.25, high: 0.05, very_high: 0 };

/** mulberry32: a tiny seeded generator, so the fixture is the same on every run. */
function random(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const soySites: SiteSpec[] = [
  {
    code: "TB-01",
    location: "=Prairie County",
    soilSeries: 'Tallgrass "A", silt loam',
    pClass: "very_low",
    pPpm: 6,
    kClass: "optimum",
    tillage: "no-till",
    rowSpacingIn: 30,
  },
  {
    code: "TB-02",
    location: "Bluestem County",
    soilSeries: "Bluestem",
    pClass: "optimum",
    pPpm: 18,
    kClass: "high",
    tillage: "conventional",
    rowSpacingIn: 15,
  },
  {
    code: "TB-03",
    location: "+Cedar grid 14",
    soilSeries: "Cedar",
    pClass: "high",
    pPpm: 30,
    kClass: "low",
    tillage: "strip-till",
    rowSpacingIn: 30,
  },
];

const soyTreatments: TreatmentSpec[] = [
  { code: "CHK", name: "Untreated check", isCheck: true, nutrients: [], placements: [], n: 0, p2o5: 0, k2o: 0, gain: 0, apps: [] },
  {
    code: "IF",
    name: "@In-furrow 10-34-0",
    nutrients: ["N", "P"],
    placements: ["in-furrow"],
    n: 5.7,
    p2o5: 19.4,
    k2o: 0,
    gain: 250,
    apps: [{ product: "APP", grade: "10-34-0", productRate: 5, rateUnit: "gal/ac", placement: "in-furrow", timing: "planting" }],
  },
  {
    code: "2X2",
    name: "2x2 band MAP",
    nutrients: ["N", "P"],
    placements: ["2x2-band"],
    n: 11,
    p2o5: 52,
    k2o: 0,
    gain: 450,
    apps: [{ product: "MAP", grade: "11-52-0", productRate: 100, rateUnit: "lb/ac", placement: "2x2-band", timing: "planting" }],
  },
  {
    code: "BC",
    name: "-Broadcast MAP",
    nutrients: ["N", "P"],
    placements: ["broadcast"],
    n: 16.5,
    p2o5: 78,
    k2o: 0,
    gain: 350,
    apps: [{ product: "MAP", grade: "11-52-0", productRate: 150, rateUnit: "lb/ac", placement: "broadcast", timing: "pre-plant" }],
  },
];

const cornTreatments: TreatmentSpec[] = [
  { code: "CHK", name: "Untreated check", isCheck: true, nutrients: [], placements: [], n: 0, p2o5: 0, k2o: 0, gain: 0, apps: [] },
  {
    code: "NK-LO",
    name: "2x2 N+K low",
    nutrients: ["N", "K"],
    placements: ["2x2-band"],
    n: 20,
    p2o5: 0,
    k2o: 20,
    gain: 400,
    apps: [{ product: "UAN + potash", grade: "14-0-14", productRate: 143, rateUnit: "lb/ac", placement: "2x2-band", timing: "planting" }],
  },
  {
    code: "NK-HI",
    name: "2x2 N+K high",
    nutrients: ["N", "K"],
    placements: ["2x2-band"],
    n: 40,
    p2o5: 0,
    k2o: 40,
    gain: 700,
    apps: [{ product: "UAN + potash", grade: "14-0-14", productRate: 286, rateUnit: "lb/ac", placement: "2x2-band", timing: "planting" }],
  },
];

const fixtureVersions: VersionSpec[] = [
  {
    slug: "tb-soy-starter-p",
    semver: "0.9.0",
    crop: "soybean",
    years: [2020],
    sites: soySites.slice(0, 1),
    treatments: soyTreatments,
    baseKgHa: 3800,
    withdraw: "A plot key error swapped two blocks at TB-01.",
    seed: 9,
  },
  {
    slug: "tb-soy-starter-p",
    semver: "1.0.0",
    crop: "soybean",
    years: [2020, 2021, 2022],
    sites: soySites.slice(0, 2),
    treatments: soyTreatments,
    baseKgHa: 3800,
    seed: 10,
  },
  {
    slug: "tb-soy-starter-p",
    semver: "1.1.0",
    crop: "soybean",
    years: [2020, 2021, 2022],
    sites: soySites,
    treatments: soyTreatments,
    baseKgHa: 3800,
    seed: 11,
  },
  {
    slug: "tb-corn-nk",
    semver: "1.0.0",
    crop: "corn",
    years: [2021, 2022],
    sites: soySites.slice(1, 3),
    treatments: cornTreatments,
    baseKgHa: 11000,
    seed: 20,
  },
];

export const blocks = [1, 2, 3, 4];

/** Planting dates spread over May, so the planting-window filters have something to cut. */
function plantingDateOf(site: SiteSpec, year: number): string {
  return `${year}-05-${String(1 + ((year + Number(site.code.slice(3)) * 7 + site.rowSpacingIn) % 25)).padStart(2, "0")}`;
}

const codeField = (name: string) => ({ name, type: "string" as const, constraints: { required: true } });
/** A small data dictionary; the real default lives with the curation tools. */
const fixtureTableSchema: TableSchemaDescriptor = {
  resources: {
    sites: { fields: [codeField("site"), { name: "location", type: "string" }], primaryKey: ["site"] },
    site_years: { fields: [codeField("siteYear"), codeField("site"), { name: "year", type: "year" }], primaryKey: ["siteYear"] },
    soil_tests: { fields: [codeField("siteYear"), codeField("analyte"), { name: "value", type: "number", unit: "ppm" }] },
    treatments: { fields: [codeField("treatment"), { name: "isCheck", type: "boolean" }], primaryKey: ["treatment"] },
    plots: {
      fields: [
        codeField("siteYear"),
        codeField("plot"),
        { name: "yield", type: "number", unit: "kg/ha", description: "At the crop's standard moisture" },
      ],
      missingValues: [{ value: "NA", label: "not harvested" }],
    },
    summaries: { fields: [codeField("siteYear"), codeField("treatment"), { name: "mean", type: "number", unit: "kg/ha" }] },
  },
};

async function insertVersion(ctx: AppContext, ownerId: string, spec: VersionSpec) {
  const db = ctx.db;
  const [existing] = await db.select().from(datasets).where(eq(datasets.slug, spec.slug));
  const dataset =
    existing ??
    (
      await db
        .insert(datasets)
        .values({
          slug: spec.slug,
          title: spec.crop === "soybean" ? "Tallgrass Basin soybean starter P placement" : "Tallgrass Basin corn 2x2 N+K starter",
          crops: [spec.crop],
          region: "Tallgrass Basin",
          description: "Invented trials of the Tallgrass Basin Agronomy Network, for tests.",
          ownerId,
        })
        .returning()
    )[0]!;
  const [version] = await db
    .insert(versions)
    .values({
      datasetId: dataset.id,
      semver: spec.semver,
      tableSchema: fixtureTableSchema,
      createdBy: ownerId,
      changelog: `Release ${spec.semver}`,
    })
    .returning();
  const versionId = version!.id;
  const rand = random(spec.seed);

  const treatmentRows = await db
    .insert(treatments)
    .values(
      spec.treatments.map((t) => ({
        versionId,
        code: t.code,
        name: t.name,
        isCheck: !!t.isCheck,
        nLbAc: t.n,
        p2o5LbAc: t.p2o5,
        k2oLbAc: t.k2o,
        nutrients: t.nutrients,
        placements: t.placements,
      })),
    )
    .returning();
  const treatmentId = new Map(treatmentRows.map((t) => [t.code, t.id]));
  const appRows = spec.treatments.flatMap((t) =>
    t.apps.map((a) => ({ versionId, treatmentId: treatmentId.get(t.code)!, ...a, nLbAc: t.n, p2o5LbAc: t.p2o5, k2oLbAc: t.k2o, sLbAc: 0 })),
  );
  if (appRows.length) await db.insert(applications).values(appRows);

  for (const site of spec.sites) {
    const [siteRow] = await db
      .insert(sites)
      .values({ versionId, code: site.code, location: site.location, soilSeries: site.soilSeries ?? null, soilTexture: "silt loam" })
      .returning();
    for (const year of spec.years) {
      const code = `${site.code}-${year}`;
      const plantingDate = plantingDateOf(site, year);
      const [sy] = await db
        .insert(siteYears)
        .values({
          versionId,
          siteId: siteRow!.id,
          code,
          crop: spec.crop,
          year,
          blocks: blocks.length,
          tillage: site.tillage,
          previousCrop: spec.crop === "soybean" ? "corn" : "soybean",
          plantingDate,
          rowSpacingIn: site.rowSpacingIn,
          variety: year === 2021 ? "-MG 2.4 line" : "TB 24X",
          maturityGroup: "2.4",
        })
        .returning();
      await db.insert(soilTests).values([
        {
          versionId,
          siteYearId: sy!.id,
          analyte: "P",
          value: site.pPpm,
          unit: "ppm",
          extractant: "Bray-P1",
          depthIn: 6,
          class: site.pClass,
          interpretation: "tallgrass-basin-2024",
        },
        {
          versionId,
          siteYearId: sy!.id,
          analyte: "K",
          value: 120,
          unit: "ppm",
          extractant: "ammonium acetate",
          depthIn: 6,
          class: site.kClass,
          interpretation: "tallgrass-basin-2024",
        },
      ]);
      const factor = spec.crop === "soybean" ? classFactor[site.pClass]! : classFactor[site.kClass]!;
      const plotRows = spec.treatments.flatMap((t, ti) =>
        blocks.map((b) => {
          const noise = (rand() + rand() + rand() - 1.5) * 0.1 * spec.baseKgHa;
          return {
            versionId,
            siteYearId: sy!.id,
            treatmentId: treatmentId.get(t.code)!,
            plot: `${b}${String(ti + 1).padStart(2, "0")}`,
            block: b,
            yieldKgHa: Math.round(spec.baseKgHa + t.gain * factor + (b - 2.5) * 60 + noise),
            harvestMoisturePct: 13 + Math.round(rand() * 40) / 10,
            standCount: Math.round(130 + rand() * 20),
          };
        }),
      );
      await db.insert(plots).values(plotRows);
      await insertResponses(ctx, {
        versionId,
        siteYearId: sy!.id,
        siteCode: site.code,
        code,
        crop: spec.crop,
        year,
        site,
        plantingDate,
        spec,
        treatmentId,
        plotRows,
      });
    }
  }
  await db
    .update(versions)
    .set({ state: "published", publishedAt: new Date(), checksum: `fixture-${spec.slug}-${spec.semver}` })
    .where(eq(versions.id, versionId));
  if (spec.withdraw) {
    await db
      .update(versions)
      .set({ state: "withdrawn", withdrawnAt: new Date(), withdrawnReason: spec.withdraw })
      .where(eq(versions.id, versionId));
  }
  return { datasetId: dataset.id, versionId };
}

async function insertResponses(
  ctx: AppContext,
  o: {
    versionId: string;
    siteYearId: number;
    siteCode: string;
    code: string;
    crop: string;
    year: number;
    site: SiteSpec;
    plantingDate: string;
    spec: VersionSpec;
    treatmentId: Map<string, number>;
    plotRows: { treatmentId: number; block: number; yieldKgHa: number }[];
  },
) {
  const anova = rcbdAnova(o.plotRows.map((p) => ({ block: String(p.block), treatment: String(p.treatmentId), y: p.yieldKgHa })));
  const sep = anova.meanSeparation!;
  const meanOf = (id: number) => anova.treatmentMeans.find((m) => m.treatment === String(id))!.mean;
  const check = o.spec.treatments.find((t) => t.isCheck)!;
  const checkId = o.treatmentId.get(check.code)!;
  const checkMean = meanOf(checkId);
  const rows = o.spec.treatments
    .filter((t) => !t.isCheck)
    .map((t) => {
      const treatedMean = meanOf(o.treatmentId.get(t.code)!);
      return {
        versionId: o.versionId,
        siteYearId: o.siteYearId,
        treatmentId: o.treatmentId.get(t.code)!,
        checkTreatmentId: checkId,
        siteCode: o.siteCode,
        siteYearCode: o.code,
        treatmentCode: t.code,
        crop: o.crop,
        year: o.year,
        tillage: o.site.tillage,
        rowSpacingIn: o.site.rowSpacingIn,
        plantingDate: o.plantingDate,
        nutrients: t.nutrients,
        placements: t.placements,
        nLbAc: t.n,
        p2o5LbAc: t.p2o5,
        k2oLbAc: t.k2o,
        sLbAc: 0,
        soilPClass: o.site.pClass,
        soilPValue: o.site.pPpm,
        soilKClass: o.site.kClass,
        soilKValue: 120,
        checkMeanKgHa: checkMean,
        treatedMeanKgHa: treatedMean,
        mdKgHa: treatedMean - checkMean,
        seKgHa: sep.sed,
        dfError: sep.dfError,
        lnrr: Math.log(treatedMean / checkMean),
        lnrrVar: sep.mse / blocks.length / treatedMean ** 2 + sep.mse / blocks.length / checkMean ** 2,
        pValue: anova.treatment.pValue,
        lsd05KgHa: sep.lsd.alpha05,
        cvPct: anova.cvPercent,
        replicates: blocks.length,
        balanced: anova.balanced,
      };
    });
  await ctx.db.insert(responses).values(rows);
}

export interface PublicFixture {
  /** Version ids by "slug@semver". */
  versionIds: Map<string, string>;
}

export async function insertPublicFixture(ctx: AppContext): Promise<PublicFixture> {
  const owner = await makeUser(ctx, "curator");
  const versionIds = new Map<string, string>();
  for (const spec of fixtureVersions) {
    const { versionId } = await insertVersion(ctx, owner.id, spec);
    versionIds.set(`${spec.slug}@${spec.semver}`, versionId);
  }
  return { versionIds };
}

/** One site-year × treatment of a version as the fixture made it: what a filter test predicts from. */
export interface ModelCell {
  dataset: string;
  version: string;
  siteCode: string;
  siteYearCode: string;
  crop: string;
  year: number;
  tillage: string;
  rowSpacingIn: number;
  plantingDate: string;
  treatment: string;
  isCheck: boolean;
  nutrients: string[];
  placements: string[];
  n: number;
  p2o5: number;
  k2o: number;
  s: number;
  soilClass: { P: string; K: string; S: null };
}

/** Every site-year × treatment (checks included) of the named versions. */
export function modelCells(which: (spec: VersionSpec) => boolean): ModelCell[] {
  return fixtureVersions.filter(which).flatMap((spec) =>
    spec.sites.flatMap((site) =>
      spec.years.flatMap((year) =>
        spec.treatments.map((t) => ({
          dataset: spec.slug,
          version: spec.semver,
          siteCode: site.code,
          siteYearCode: `${site.code}-${year}`,
          crop: spec.crop,
          year,
          tillage: site.tillage,
          rowSpacingIn: site.rowSpacingIn,
          plantingDate: plantingDateOf(site, year),
          treatment: t.code,
          isCheck: !!t.isCheck,
          nutrients: t.nutrients,
          placements: t.placements,
          n: t.n,
          p2o5: t.p2o5,
          k2o: t.k2o,
          s: 0,
          soilClass: { P: site.pClass, K: site.kClass, S: null },
        })),
      ),
    ),
  );
}

/** The versions a cross-dataset read uses by default: the latest published of each dataset. */
export const isLatestPublished = (spec: VersionSpec) =>
  !spec.withdraw && !fixtureVersions.some((o) => o.slug === spec.slug && !o.withdraw && o.semver > spec.semver);

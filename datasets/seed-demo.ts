import { count } from "drizzle-orm";
import { datasets } from "@/db/schema";
import type { DatasetCreate, UploadOptions } from "@/schemas/curation";
import { tableSchemaDescriptor, type ResourceName } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { datasetBySlug } from "@/server/services/curation/access";
import { createDataset } from "@/server/services/curation/datasets";
import { approveVersion, submitVersion } from "@/server/services/curation/review";
import { createVersion, putTableSchema } from "@/server/services/curation/versions";
import { textStream } from "@/server/services/ingest/csv-stream";
import { ingestUpload } from "@/server/services/ingest/ingest-upload";
import { createUser, findUserByEmail } from "@/server/services/users";
import type { Role } from "@/schemas/account";
import {
  cornStarterTrial,
  nitrogenSulfurTrial,
  plotsCsv,
  siteYearsCsv,
  sitesCsv,
  soilTestsCsv,
  starterTrial,
  treatmentsCsv,
  type DemoTrial,
} from "./tallgrass-trials";

/** The one password of every demo account (documented in the README; demo only). */
export const demoPassword = "tallgrass-demo-2026";

export const demoAccounts: { email: string; displayName: string; role: Role }[] = [
  { email: "curator@plotbank.test", displayName: "Demo Curator", role: "curator" },
  { email: "reviewer@plotbank.test", displayName: "Demo Reviewer", role: "reviewer" },
  { email: "admin@plotbank.test", displayName: "Demo Admin", role: "admin" },
  { email: "member@plotbank.test", displayName: "Demo Member", role: "member" },
];

const options: UploadOptions = {
  mapping: {},
  units: { yield: "kg/ha", yieldMoisture: "standard", soilTest: "ppm", gradeBasis: "oxide" },
  mode: "merge",
};

type Step = { resource: ResourceName; csv: string; filename: string };

interface Release {
  /** undefined: leave the version as a draft. */
  changelog?: string;
  /** Default: the next minor version. */
  semver?: string;
  steps: Step[];
}

interface DemoDataset {
  meta: DatasetCreate;
  trial: DemoTrial;
  releases: Release[];
}

function season(trial: DemoTrial, years: number[], opts: { withTypo?: boolean; withTreatments?: boolean } = {}): Step[] {
  const sys = years.flatMap((y) => trial.siteYears(y));
  const span = years.length > 1 ? `${years[0]}-${years.at(-1)}` : String(years[0]);
  return [
    { resource: "sites", csv: sitesCsv(sys.map((s) => s.site.code)), filename: `sites-${span}.csv` },
    { resource: "site_years", csv: siteYearsCsv(sys), filename: `site-years-${span}.csv` },
    { resource: "soil_tests", csv: soilTestsCsv(sys, trial.sulfurScheme), filename: `soil-tests-${span}.csv` },
    ...(opts.withTreatments ? [{ resource: "treatments" as const, csv: treatmentsCsv(trial), filename: "treatments.csv" }] : []),
    { resource: "plots", csv: plotsCsv(trial, sys, { withTypo: opts.withTypo }), filename: `plots-${span}.csv` },
  ];
}

const network = "Tallgrass Basin Agronomy Network (fictional)";
const contributors = [
  { name: network, role: "creator" as const },
  { name: "Demo Curator", role: "curator" as const, affiliation: network },
];
const cautions =
  "Invented demo data: no real trial, farm or result. Results summarise these trials only; a field can differ, seed-placed fertilizer can injure a stand, and local recommendations and licensed advisers have the last word.";

function demoDatasets(): DemoDataset[] {
  const typoSy = starterTrial.typo!.plot.split("/")[0]!;
  return [
    {
      trial: starterTrial,
      meta: {
        slug: "soybean-starter-p-placement",
        title: "Soybean starter P placement × soil-test P",
        crops: ["soybean"],
        region: "Tallgrass Basin (fictional)",
        description: `Check, in-furrow 10-34-0, in-furrow MAP, 2x2 band MAP and broadcast MAP on soybean across the network, 2020-2025. ${cautions}`,
        keywords: ["soybean", "phosphorus", "starter", "in-furrow", "2x2 band", "broadcast"],
        contributors,
        funding: "Tallgrass Basin Growers' Fund (fictional)",
        methods:
          "RCBD with 4-6 blocks per site-year; plots harvested with a plot combine; yields at 13 % moisture; Bray-P1 and ammonium-acetate soil tests, 0-6 in, sampled each spring.",
      },
      releases: [
        {
          changelog: "First release: 2020-2022 seasons.",
          steps: season(starterTrial, [2020, 2021, 2022], { withTypo: true, withTreatments: true }),
        },
        { changelog: "Adds the 2023 and 2024 seasons.", steps: season(starterTrial, [2023, 2024]) },
        {
          semver: "1.1.1",
          changelog: `Correction: plot ${starterTrial.typo!.plot.split("/")[1]} of ${typoSy} had its yield keyed more than twice too high (a transcription error in the field book).`,
          steps: [
            {
              resource: "plots",
              csv: plotsCsv(
                starterTrial,
                starterTrial.siteYears(2021).filter((s) => s.code === typoSy),
              ),
              filename: `plots-${typoSy}-corrected.csv`,
            },
          ],
        },
        { steps: season(starterTrial, [2025]) },
      ],
    },
    {
      trial: nitrogenSulfurTrial,
      meta: {
        slug: "soybean-n-s-planting-date",
        title: "Soybean N and S at planting, early and normal planting dates",
        crops: ["soybean"],
        region: "Tallgrass Basin (fictional)",
        description: `Urea, ammonium sulfate (21-0-0-24S) and ammonium thiosulfate at planting on soybean planted early (April) and at the normal date (May); each planting date is its own site-year. ${cautions}`,
        keywords: ["soybean", "nitrogen", "sulfur", "planting date", "ATS", "ammonium sulfate"],
        contributors,
        methods: "RCBD with 4 blocks; early and normal plantings side by side at each site; yields at 13 % moisture.",
      },
      releases: [
        {
          changelog: "First release: 2021-2023 seasons.",
          steps: season(nitrogenSulfurTrial, [2021, 2022, 2023], { withTreatments: true }),
        },
        { changelog: "Adds the 2024 season.", steps: season(nitrogenSulfurTrial, [2024]) },
        {
          semver: "1.1.1",
          steps: [
            {
              resource: "site_years",
              csv: siteYearsCsv(
                nitrogenSulfurTrial
                  .siteYears(2024)
                  .filter((s) => s.code === "TB-05-2024-N")
                  .map((s) => ({ ...s, plantingDate: "2024-05-27" })),
              ),
              filename: "site-years-TB-05-2024-N-planting-date.csv",
            },
          ],
        },
      ],
    },
    {
      trial: cornStarterTrial,
      meta: {
        slug: "corn-2x2-nk-starter-rates",
        title: "Corn 2x2 N + K starter rates",
        crops: ["corn"],
        region: "Tallgrass Basin (fictional)",
        description: `UAN 28 with potash in a 2x2 band at 15, 30 and 45 lb/ac each of N and K2O on corn, against an untreated check. N + K2O stays at or under 90 lb/ac in the band. ${cautions}`,
        keywords: ["corn", "starter", "2x2 band", "potassium", "nitrogen"],
        contributors,
        methods: "RCBD with 5 blocks; yields at 15.5 % moisture; ammonium-acetate K, 0-6 in.",
      },
      releases: [
        { changelog: "First release: 2021-2023 seasons.", steps: season(cornStarterTrial, [2021, 2022, 2023], { withTreatments: true }) },
        { changelog: "Adds the 2024 season.", steps: season(cornStarterTrial, [2024]) },
        { steps: season(cornStarterTrial, [2025]) },
      ],
    },
  ];
}

async function account(ctx: AppContext, a: (typeof demoAccounts)[number]) {
  const existing = await findUserByEmail(ctx.db, a.email);
  const user = existing ?? (await createUser(ctx.db, { ...a, password: demoPassword, verified: true }));
  return { id: user.id, email: user.email, displayName: user.displayName, role: user.role } as Express.User;
}

/**
 * Loads the Tallgrass Basin demo through the same path as real uploads: CSV text → ingest → submit → approve.
 * Does nothing when any dataset exists. Returns what it made.
 */
export async function seedDemo(ctx: AppContext): Promise<{ seeded: boolean; datasets: number; versions: number }> {
  const [existing] = await ctx.db.select({ n: count() }).from(datasets);
  if ((existing?.n ?? 0) > 0) return { seeded: false, datasets: 0, versions: 0 };
  const [curator, reviewer] = await Promise.all(demoAccounts.slice(0, 2).map((a) => account(ctx, a)));
  for (const a of demoAccounts.slice(2)) await account(ctx, a);
  let versionCount = 0;
  const all = demoDatasets();
  for (const d of all) {
    await createDataset(ctx.db, curator!, d.meta);
    const dataset = await datasetBySlug(ctx.db, d.meta.slug);
    for (const release of d.releases) {
      const version = await createVersion(ctx, curator!, dataset, release.semver);
      versionCount += 1;
      // The trial's own soil-test scheme goes into the first version's dictionary; later versions copy it.
      if (d.trial.sulfurScheme && !version.tableSchema.soilTestSchemes?.length) {
        // Parsed as the API would parse a curator's PUT (the stored JSON has its keys in another order).
        await putTableSchema(ctx.db, curator!, version.id, {
          ...tableSchemaDescriptor.parse(version.tableSchema),
          soilTestSchemes: [d.trial.sulfurScheme],
        });
      }
      for (const step of release.steps) {
        const result = await ingestUpload(ctx, {
          versionId: version.id,
          resource: step.resource,
          filename: step.filename,
          source: textStream(step.csv),
          options,
          userId: curator!.id,
        });
        if (!result.accepted) {
          throw new Error(
            `demo ${d.meta.slug} ${version.semver} ${step.filename} was refused: ${result.problems
              .filter((p) => p.severity === "error")
              .slice(0, 5)
              .map((p) => `row ${p.row} ${p.column}: ${p.message}`)
              .join("; ")}`,
          );
        }
      }
      if (!release.changelog) continue;
      await submitVersion(ctx, curator!, version.id, release.changelog);
      await approveVersion(ctx, reviewer!, version.id, "Checked against the field books.");
    }
  }
  return { seeded: true, datasets: all.length, versions: versionCount };
}

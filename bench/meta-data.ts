import { eq } from "drizzle-orm";
import { datasets, responses, siteYears, sites, treatments, users, versions } from "@/db/schema";
import type { TableSchemaDescriptor } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";

/** Park–Miller minimal standard generator: reproducible effects without a dependency. */
export function generator(seed: number) {
  let s = seed;
  return () => (s = (s * 48271) % 2147483647) / 2147483647;
}

/** 20,000 site-years of one published version, inserted in bulk (one 2x2-band contrast each). */
export async function bulkInsert(ctx: AppContext, count: number) {
  const db = ctx.db;
  const [owner] = await db.insert(users).values({ email: "bench@plotbank.test", displayName: "Bench", passwordHash: "x", role: "curator" }).returning();
  const [dataset] = await db.insert(datasets).values({ slug: "bench-large", title: "Bench: many site-years", crops: ["soybean"], region: "Tallgrass Basin", description: "Synthetic", ownerId: owner!.id }).returning();
  const [version] = await db.insert(versions).values({ datasetId: dataset!.id, semver: "1.0.0", tableSchema: { resources: {} } as TableSchemaDescriptor, createdBy: owner!.id }).returning();
  const versionId = version!.id;
  const [site] = await db.insert(sites).values({ versionId, code: "TB-99", location: "Tallgrass County" }).returning();
  const [check, band] = await db.insert(treatments).values([{ versionId, code: "CK", name: "Check", isCheck: true }, { versionId, code: "BAND", name: "2x2 band", nutrients: ["P"], placements: ["2x2-band"] }]).returning();
  const u = generator(99);
  const classes = ["very_low", "low", "optimum", "high", "very_high"];
  for (let start = 0; start < count; start += 1000) {
    const n = Math.min(1000, count - start);
    const sy = await db
      .insert(siteYears)
      .values(Array.from({ length: n }, (_, i) => ({ versionId, siteId: site!.id, code: `TB-99-${start + i}`, crop: "soybean", year: 2000 + ((start + i) % 25), blocks: 4 })))
      .returning({ id: siteYears.id, code: siteYears.code, year: siteYears.year });
    await db.insert(responses).values(
      sy.map((s, i) => {
        const cls = classes[(start + i) % 5]!;
        const md = 300 - 60 * classes.indexOf(cls) + 150 * (u() - 0.5);
        return {
          versionId, siteYearId: s.id, treatmentId: band!.id, checkTreatmentId: check!.id, siteCode: "TB-99", siteYearCode: s.code, treatmentCode: "BAND",
          crop: "soybean", year: s.year, nutrients: ["P"], placements: ["2x2-band"], nLbAc: 11, p2o5LbAc: 52, k2oLbAc: 0, sLbAc: 0,
          soilPClass: cls, soilPValue: 4 + 6 * classes.indexOf(cls), checkMeanKgHa: 3500, treatedMeanKgHa: 3500 + md, mdKgHa: md, seKgHa: 60 + 60 * u(),
          dfError: 9, replicates: 4, balanced: true,
        };
      }),
    );
  }
  await db.update(versions).set({ state: "published", publishedAt: new Date() }).where(eq(versions.id, versionId));
}


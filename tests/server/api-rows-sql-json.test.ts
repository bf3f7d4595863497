import { eq } from "drizzle-orm";
import fc from "fast-check";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { datasets, responses, sites, siteYears, treatments, versions } from "@/db/schema";
import { nutrients, placements, soilTestClasses, trialFilters, type TrialFilters } from "@/schemas/filters";
import { responseResource } from "@/server/services/public/responses";
import type { RowScope } from "@/server/services/public/row-resource";
import { resolveVersions, type ResolvedVersion } from "@/server/services/trial-filter";
import { kilogramsPerHectarePerBushelPerAcre } from "@/stats/units";
import { insertPublicFixture } from "@/tests/support/public-fixture";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

/**
 * JSON pages of responses (any measure) are encoded by the database (readJsonPage); CSV and the fallback build each row in
 * TypeScript (readBatch). Both must give the same rows: on the public fixture through HTTP, and on random rows (odd
 * doubles, nulls, crops without a bushel weight, stated nutrients out of order, values the rounding of converted values
 * must treat alike) with random filters, units and pages.
 */
let t: TestApp;
let randomVersion: ResolvedVersion;
beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000 });
  await insertPublicFixture(t.ctx);
  randomVersion = await insertRandomResponses(400);
}, 120_000);
afterAll(() => t.close());

const db = () => t.ctx.db;

/** A draft version holding random responses (drafts are writable; the read takes whatever versions it is given). */
async function insertRandomResponses(count: number): Promise<ResolvedVersion> {
  const owner = await makeUser(t.ctx, "curator");
  const [dataset] = await db()
    .insert(datasets)
    .values({
      slug: "tb-random-rows",
      title: "Random rows",
      crops: ["soybean"],
      region: "Tallgrass Basin",
      description: "x",
      ownerId: owner.id,
    })
    .returning();
  const [version] = await db()
    .insert(versions)
    .values({ datasetId: dataset!.id, semver: "0.1.0", tableSchema: { resources: {} } as never, createdBy: owner.id })
    .returning();
  const versionId = version!.id;
  const [site] = await db().insert(sites).values({ versionId, code: "R-1", location: "Grid 1" }).returning();
  const [check, treated] = await db()
    .insert(treatments)
    .values([
      { versionId, code: "CHK", name: "Check", isCheck: true },
      { versionId, code: "T1", name: "Treated" },
    ])
    .returning();
  // Doubles of every precision, but none so small that PostgreSQL's division would underflow (|x| < 1e-300: no
  // yield, difference or SE comes near that; PostgreSQL raises an error where JavaScript returns 0).
  const positive = fc.double({ min: 1e-200, max: 2e4, noNaN: true, noDefaultInfinity: true });
  // Values the rounding rule for converted values must treat alike in both encodings (stats/precision.ts): exact
  // ties at the 15th significant digit (to even: …0.0004882812 and …0.0014648438) and soybean yields given in bu/ac.
  const roundingCases = fc.constantFrom(
    12345.00048828125,
    12345.00146484375,
    ...[63, 47.5, 58.25].map((buAc) => buAc * kilogramsPerHectarePerBushelPerAcre(60)),
  );
  const yieldLike = fc.oneof(positive, roundingCases);
  const double = fc.oneof(
    fc.constant(0),
    yieldLike,
    yieldLike.map((x) => -x),
  );
  const maybe = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: null });
  const rate = fc.oneof(fc.constant(0), fc.constantFrom(5, 11, 26, 52), positive);
  const rows = fc.sample(
    fc.record({
      crop: fc.constantFrom("soybean", "corn", "wheat", "sorghum"),
      measure: fc.constantFrom("yield", "yield", "stand", "vigour"),
      year: fc.integer({ min: 1990, max: 2026 }),
      tillage: maybe(fc.constantFrom("no-till", "strip-till", "conventional")),
      rowSpacingIn: maybe(fc.constantFrom(7.5, 15, 20, 30, 22.3)),
      plantingDate: maybe(fc.date({ min: new Date("1990-01-01"), max: new Date("2026-12-31"), noInvalidDate: true })),
      nutrients: fc.subarray([...nutrients]),
      placements: fc.subarray([...placements], { minLength: 1 }),
      stated: fc.option(fc.array(fc.constantFrom(...nutrients), { minLength: 1, maxLength: 5 }), { nil: null, freq: 3 }),
      nLbAc: rate,
      p2o5LbAc: rate,
      k2oLbAc: rate,
      sLbAc: rate,
      soil: fc.array(fc.tuple(maybe(fc.constantFrom(...soilTestClasses)), maybe(positive)), { minLength: 3, maxLength: 3 }),
      checkMeanKgHa: yieldLike,
      treatedMeanKgHa: yieldLike,
      mdKgHa: double,
      seKgHa: yieldLike,
      dfError: fc.integer({ min: 1, max: 60 }),
      lnrr: maybe(double),
      lnrrVar: maybe(positive),
      pValue: maybe(fc.double({ min: 0, max: 1, noNaN: true })),
      lsd05KgHa: maybe(yieldLike),
      cvPct: maybe(positive),
      replicates: fc.integer({ min: 2, max: 8 }),
      balanced: fc.boolean(),
      fromSummary: fc.boolean(),
    }),
    { numRuns: count, seed: 20261203 },
  );
  for (const [i, r] of rows.entries()) {
    const [siteYear] = await db()
      .insert(siteYears)
      .values({ versionId, siteId: site!.id, code: `R-${i}`, crop: r.crop, year: r.year, blocks: r.replicates })
      .returning();
    const [[pClass, pValue], [kClass, kValue], [sClass, sValue]] = r.soil as [(typeof r.soil)[0], (typeof r.soil)[0], (typeof r.soil)[0]];
    await db()
      .insert(responses)
      .values({
        versionId,
        siteYearId: siteYear!.id,
        treatmentId: treated!.id,
        checkTreatmentId: check!.id,
        siteCode: "R-1",
        siteYearCode: `R-${i}`,
        treatmentCode: "T1",
        measure: r.measure,
        crop: r.crop,
        year: r.year,
        tillage: r.tillage,
        rowSpacingIn: r.rowSpacingIn,
        plantingDate: r.plantingDate ? r.plantingDate.toISOString().slice(0, 10) : null,
        nutrients: r.nutrients,
        placements: r.placements,
        testedNutrientsStated: r.stated,
        nLbAc: r.nLbAc,
        p2o5LbAc: r.p2o5LbAc,
        k2oLbAc: r.k2oLbAc,
        sLbAc: r.sLbAc,
        soilPClass: pClass,
        soilPValue: pValue,
        soilKClass: kClass,
        soilKValue: kValue,
        soilSClass: sClass,
        soilSValue: sValue,
        checkMeanKgHa: r.checkMeanKgHa,
        treatedMeanKgHa: r.treatedMeanKgHa,
        mdKgHa: r.mdKgHa,
        seKgHa: r.seKgHa,
        dfError: r.dfError,
        lnrr: r.lnrr,
        lnrrVar: r.lnrrVar,
        pValue: r.pValue,
        lsd05KgHa: r.lsd05KgHa,
        cvPct: r.cvPct,
        replicates: r.replicates,
        balanced: r.balanced,
        fromSummary: r.fromSummary,
      });
  }
  const [resolved] = await db().select({ slug: datasets.slug, title: datasets.title }).from(datasets).where(eq(datasets.id, dataset!.id));
  return {
    versionId,
    datasetId: dataset!.id,
    datasetSlug: resolved!.slug,
    datasetTitle: resolved!.title,
    semver: "0.1.0",
    licence: "CC-BY-4.0",
    state: "draft",
  };
}

async function bothWays(scope: RowScope<TrialFilters>, afterId: number, limit: number) {
  const batch = await responseResource.readBatch(db(), scope, afterId, limit + 1);
  const page = await responseResource.readJsonPage!(db(), scope, afterId, limit);
  const items = batch.slice(0, limit);
  return {
    fromSql: { items: JSON.parse(page.itemsJson) as unknown[], read: page.read, lastId: page.lastId },
    fromRows: { items: JSON.parse(JSON.stringify(items)) as unknown[], read: batch.length, lastId: items.at(-1)?.id ?? null },
  };
}

const filterArb = fc.record(
  {
    nutrient: fc.subarray([...nutrients], { minLength: 1 }),
    nutrientSupplied: fc.subarray([...nutrients], { minLength: 1 }),
    soilTestClass: fc.subarray([...soilTestClasses], { minLength: 1 }),
    placement: fc.subarray([...placements], { minLength: 1 }),
  },
  { requiredKeys: [] },
);

describe("responses encoded by the database equal the rows built in TypeScript", () => {
  it("random rows, filters, units and pages", async () => {
    await fc.assert(
      fc.asyncProperty(
        filterArb,
        fc.constantFrom("bu/ac" as const, "kg/ha" as const),
        fc.integer({ min: 0, max: 300 }),
        fc.integer({ min: 1, max: 120 }),
        fc.constantFrom(undefined, "yield", "stand", "vigour"),
        async (raw, units, afterIndex, limit, measure) => {
          const parsed = trialFilters.parse(Object.fromEntries(Object.entries(raw).map(([k, v]) => [k, v.join(",")])));
          const filters = measure ? { ...parsed, measure } : parsed;
          const scope = { versions: [randomVersion], filters, units };
          const ids = (await responseResource.readBatch(db(), { ...scope, filters: trialFilters.parse({}) }, 0, 10_000)).map((r) => r.id);
          const afterId = afterIndex === 0 ? 0 : (ids[Math.min(afterIndex, ids.length) - 1] ?? 0);
          const { fromSql, fromRows } = await bothWays(scope, afterId, limit);
          expect(fromSql, JSON.stringify({ raw, units, afterId, limit, measure })).toEqual(fromRows);
        },
      ),
      { numRuns: 60 },
    );
  }, 120_000);

  it("the published fixture, every version at once", async () => {
    const versionsRead = [...(await resolveVersions(db(), {})), randomVersion];
    for (const units of ["bu/ac", "kg/ha"] as const) {
      const { fromSql, fromRows } = await bothWays({ versions: versionsRead, filters: trialFilters.parse({}), units }, 0, 5000);
      expect(fromSql.items.length).toBeGreaterThan(200);
      expect(fromSql).toEqual(fromRows);
    }
  });

  it("no versions: an empty page, not an SQL error", async () => {
    const page = await responseResource.readJsonPage!(db(), { versions: [], filters: trialFilters.parse({}), units: "bu/ac" }, 0, 10);
    expect(page).toEqual({ itemsJson: "[]", read: 0, lastId: null });
  });

  it("over HTTP the JSON pages chain to the same rows as the CSV", async () => {
    const agent = request(t.app);
    const csv = await agent.get("/api/v1/responses?nutrient=P&format=csv&units=kg/ha");
    expect(csv.status).toBe(200);
    const csvIds = csv.text
      .trim()
      .split("\r\n")
      .slice(1)
      .map((line) => Number(line.split(",")[0]));
    const pagedIds: number[] = [];
    let url: string | null = "/api/v1/responses?nutrient=P&units=kg/ha&limit=7";
    while (url) {
      const res = await agent.get(url);
      expect(res.status).toBe(200);
      expect(res.headers["content-type"]).toMatch(/^application\/json/);
      pagedIds.push(...(res.body.items as { id: number }[]).map((r) => r.id));
      const token = res.body.nextPageToken as string | null;
      url = token ? `/api/v1/responses?nutrient=P&units=kg/ha&limit=7&pageToken=${encodeURIComponent(token)}` : null;
      if (token) expect(res.headers.link).toContain('rel="next"');
    }
    expect(pagedIds.length).toBeGreaterThan(7);
    expect(pagedIds).toEqual(csvIds);
  });
});

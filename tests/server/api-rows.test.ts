import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { trialFilterShape } from "@/schemas/filters";
import { observationPage, responsePage, siteYearPage } from "@/schemas/public";
import { blocks, isLatestPublished, modelCells, type ModelCell } from "@/tests/support/public-fixture";
import { insertPublicFixture } from "@/tests/support/public-fixture";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { countedSoilTest, testedNutrients, type Nutrient } from "@/server/services/tested-nutrients";

/**
 * Every shared filter on the three cross-dataset reads, checked against what the fixture put in: the expected rows
 * are predicted from the fixture's own description, not from SQL.
 */
let t: TestApp;
beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000 });
  await insertPublicFixture(t.ctx);
});
afterAll(() => t.close());

type Query = Record<string, string>;
const list = (v: string | undefined) => (v ? v.split(",") : undefined);
const num = (v: string | undefined) => (v === undefined ? undefined : Number(v));

const siteYearKeys = [
  "crop",
  "yearFrom",
  "yearTo",
  "tillage",
  "rowSpacingMin",
  "rowSpacingMax",
  "plantedFrom",
  "plantedTo",
  "dataset",
  "version",
];

/** The filter semantics, written out plainly: a cell (site-year × treatment) matches a query. */
function siteYearMatches(q: Query, c: ModelCell): boolean {
  const mmdd = c.plantingDate.slice(5);
  return (
    (!q.crop || list(q.crop)!.includes(c.crop)) &&
    (!q.yearFrom || c.year >= Number(q.yearFrom)) &&
    (!q.yearTo || c.year <= Number(q.yearTo)) &&
    (!q.tillage || list(q.tillage)!.includes(c.tillage)) &&
    (q.rowSpacingMin === undefined || c.rowSpacingIn >= num(q.rowSpacingMin)!) &&
    (q.rowSpacingMax === undefined || c.rowSpacingIn <= num(q.rowSpacingMax)!) &&
    (!q.plantedFrom || mmdd >= q.plantedFrom) &&
    (!q.plantedTo || mmdd <= q.plantedTo)
  );
}

function treatmentMatches(q: Query, c: ModelCell): boolean {
  const ranges: [string, number][] = [
    ["nRate", c.n],
    ["p2o5Rate", c.p2o5],
    ["k2oRate", c.k2o],
    ["sRate", c.s],
  ];
  for (const [name, value] of ranges) {
    if (q[`${name}Min`] !== undefined && value < Number(q[`${name}Min`])) return false;
    if (q[`${name}Max`] !== undefined && value > Number(q[`${name}Max`])) return false;
  }
  // The tested nutrients and the soil test that counts come from the one rule (tested-nutrients.ts); its SQL twin is
  // what these reads run, and tests/server/tested-nutrients-sql.test.ts checks the two on random rows.
  const tested = testedNutrients({ nLbAc: c.n, p2o5LbAc: c.p2o5, k2oLbAc: c.k2o, sLbAc: c.s, testedNutrientsStated: null });
  if (q.nutrient && !list(q.nutrient)!.some((n) => tested.includes(n as Nutrient))) return false;
  if (q.nutrientSupplied && !list(q.nutrientSupplied)!.some((n) => c.nutrients.includes(n))) return false;
  if (q.placement && !list(q.placement)!.some((p) => c.placements.includes(p))) return false;
  if (q.soilTestClass) {
    const soil = { soilPClass: c.soilClass.P, soilKClass: c.soilClass.K, soilSClass: c.soilClass.S };
    const counted = countedSoilTest(tested, soil, [...(list(q.nutrient) ?? []), ...(list(q.nutrientSupplied) ?? [])]);
    if (!list(q.soilTestClass)!.includes(counted.class ?? "")) return false;
  }
  return true;
}

function cellsFor(q: Query): ModelCell[] {
  return modelCells((spec) =>
    q.dataset ? spec.slug === q.dataset && (q.version ? spec.semver === q.version : isLatestPublished(spec)) : isLatestPublished(spec),
  );
}

const treatmentFilterGiven = (q: Query) => Object.keys(q).some((k) => !siteYearKeys.includes(k));

const expected = {
  responses: (q: Query) =>
    cellsFor(q)
      .filter((c) => !c.isCheck && siteYearMatches(q, c) && treatmentMatches(q, c))
      .map((c) => `${c.dataset}@${c.version}/${c.siteYearCode}/${c.treatment}`),
  observations: (q: Query) =>
    cellsFor(q)
      .filter((c) => siteYearMatches(q, c) && treatmentMatches(q, c))
      .flatMap((c) => blocks.map((b) => `${c.dataset}@${c.version}/${c.siteYearCode}/${c.treatment}/${b}`)),
  "site-years": (q: Query) => {
    const cells = cellsFor(q).filter((c) => siteYearMatches(q, c));
    const keep = cells.filter((c) => !treatmentFilterGiven(q) || (!c.isCheck && treatmentMatches(q, c)));
    return [...new Set(keep.map((c) => `${c.dataset}@${c.version}/${c.siteYearCode}`))];
  },
};

type Endpoint = keyof typeof expected;

/** Read every page of a JSON read by following Link rel=next; returns the rows' keys. */
async function readAll(endpoint: Endpoint, q: Query, limit = 1000): Promise<string[]> {
  const keys: string[] = [];
  let url: string | null = `/api/v1/${endpoint}?${new URLSearchParams({ ...q, limit: String(limit) })}`;
  while (url) {
    const res: request.Response = await request(t.app).get(url).expect(200);
    if (endpoint === "responses")
      for (const r of responsePage.parse(res.body).items) keys.push(`${r.dataset}@${r.version}/${r.siteYearCode}/${r.treatmentCode}`);
    if (endpoint === "observations")
      for (const r of observationPage.parse(res.body).items)
        keys.push(`${r.dataset}@${r.version}/${r.siteYearCode}/${r.treatmentCode}/${r.block}`);
    if (endpoint === "site-years") for (const r of siteYearPage.parse(res.body).items) keys.push(`${r.dataset}@${r.version}/${r.code}`);
    const link = res.headers.link as string | undefined;
    url = link?.match(/<([^>]+)>; rel="next"/)?.[1] ?? null;
  }
  return keys;
}

/** One case per filter parameter (and a few combinations); each must narrow the result to exactly the predicted rows. */
const cases: [string, Query][] = [
  ["crop", { crop: "corn" }],
  ["nutrient", { nutrient: "K" }],
  ["nutrient N (tested, carriers left out)", { nutrient: "N" }],
  ["nutrientSupplied (carriers count)", { nutrientSupplied: "N", placement: "in-furrow" }],
  ["placement", { placement: "in-furrow,broadcast" }],
  ["soilTestClass", { soilTestClass: "low" }],
  ["soilTestClass with nutrient", { nutrient: "P", soilTestClass: "optimum,very_low" }],
  ["yearFrom", { yearFrom: "2021" }],
  ["yearTo", { yearTo: "2020" }],
  ["dataset", { dataset: "tb-corn-nk" }],
  ["version", { dataset: "tb-soy-starter-p", version: "1.0.0" }],
  ["tillage", { tillage: "no-till,strip-till" }],
  ["rowSpacingMin", { rowSpacingMin: "20" }],
  ["rowSpacingMax", { rowSpacingMax: "20" }],
  ["plantedFrom", { plantedFrom: "05-20" }],
  ["plantedTo", { plantedTo: "05-10" }],
  ["nRateMin", { nRateMin: "12" }],
  ["nRateMax", { nRateMax: "12" }],
  ["p2o5RateMin", { p2o5RateMin: "50" }],
  ["p2o5RateMax", { p2o5RateMax: "50" }],
  ["k2oRateMin", { k2oRateMin: "30" }],
  ["k2oRateMax", { k2oRateMax: "30" }],
  ["sRateMin", { sRateMin: "1" }],
  ["sRateMax", { sRateMax: "0", crop: "soybean" }],
  ["combined", { crop: "soybean", placement: "2x2-band", soilTestClass: "very_low,optimum", yearFrom: "2021" }],
];

describe("every filter narrows every cross-dataset read to exactly the predicted rows", () => {
  it("has a case for every shared filter parameter", () => {
    const covered = new Set(cases.flatMap(([, q]) => Object.keys(q)));
    for (const name of Object.keys(trialFilterShape)) expect(covered, name).toContain(name);
  });

  for (const endpoint of Object.keys(expected) as Endpoint[]) {
    it(`${endpoint}: unfiltered reads the latest version of each dataset`, async () => {
      const all = await readAll(endpoint, {});
      expect(all.sort()).toEqual(expected[endpoint]({}).sort());
      expect(all.length).toBeGreaterThan(0);
    });
    for (const [name, q] of cases) {
      it(`${endpoint}: ${name} ${new URLSearchParams(q)}`, async () => {
        const want = expected[endpoint](q).sort();
        const total = expected[endpoint]({}).length;
        const got = (await readAll(endpoint, q)).sort();
        expect(got).toEqual(want);
        // The case must actually filter rows (or, for the version case, read another version). Every site-year has
        // some treatment inside most rate ranges, so there equality with the predicted set is the whole check.
        if (name !== "version" && endpoint !== "site-years") expect(want.length).toBeLessThan(total);
      });
    }
  }

  it("sRateMin selects nothing: no fixture treatment supplies S", async () => {
    expect(await readAll("responses", { sRateMin: "1" })).toEqual([]);
  });
});

describe("version-scoped reads take the same filters", () => {
  it("responses of 1.0.0 filtered by placement match the cross-dataset read of that version", async () => {
    const scoped = await request(t.app)
      .get("/api/v1/datasets/tb-soy-starter-p/versions/1.0.0/responses?placement=2x2-band&limit=1000")
      .expect(200);
    const cross = await request(t.app)
      .get("/api/v1/responses?dataset=tb-soy-starter-p&version=1.0.0&placement=2x2-band&limit=1000")
      .expect(200);
    const ids = (b: unknown) => responsePage.parse(b).items.map((r) => r.id);
    expect(ids(scoped.body)).toEqual(ids(cross.body));
    expect(ids(scoped.body)).toHaveLength(
      expected.responses({ dataset: "tb-soy-starter-p", version: "1.0.0", placement: "2x2-band" }).length,
    );
  });
  it("refuses dataset and version parameters on a version path (the path names them)", async () => {
    const res = await request(t.app).get("/api/v1/datasets/tb-soy-starter-p/versions/1.0.0/responses?dataset=tb-corn-nk").expect(400);
    expect(res.body.errors.map((e: { field: string }) => e.field)).toEqual(["query.dataset"]);
  });
  it("names each unknown parameter as its own field, so a typo points at itself", async () => {
    const res = await request(t.app).get("/api/v1/responses?placment=2x2-band&nutrient=P&colour=red").expect(400);
    expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
    expect(res.body.errors).toEqual([
      { field: "query.placment", message: '"placment" is not a known parameter here' },
      { field: "query.colour", message: '"colour" is not a known parameter here' },
    ]);
  });
  it("filters treatments by nutrient and rate", async () => {
    const res = await request(t.app).get("/api/v1/datasets/tb-corn-nk/versions/1.0.0/treatments?k2oRateMin=30").expect(200);
    expect(res.body.items.map((x: { code: string }) => x.code)).toEqual(["NK-HI"]);
    expect(res.body.items[0].applications[0]).toMatchObject({ grade: "14-0-14", placement: "2x2-band" });
  });
});

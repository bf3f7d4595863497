import { sql } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seedDemo } from "@/datasets";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { signedInAgent } from "@/tests/support/sign-in";

let t: TestApp;
let result: Awaited<ReturnType<typeof seedDemo>>;
beforeAll(async () => {
  t = await testApp();
  result = await seedDemo(t.ctx);
}, 120_000);
afterAll(() => t.close());

const rows = async <T>(q: ReturnType<typeof sql>) => ((await t.ctx.db.execute(q)) as unknown as { rows: T[] }).rows;

describe("the Tallgrass Basin demo", () => {
  it("makes three datasets, each with at least two published versions and one draft", async () => {
    expect(result).toEqual({ seeded: true, datasets: 3, versions: 10 });
    const perDataset = await rows<{ slug: string; published: number | string; drafts: number | string }>(
      sql`select d.slug, count(*) filter (where v.state = 'published') as published, count(*) filter (where v.state = 'draft') as drafts
          from datasets d join versions v on v.dataset_id = d.id group by d.slug order by d.slug`,
    );
    expect(perDataset).toHaveLength(3);
    for (const d of perDataset) {
      expect(Number(d.published)).toBeGreaterThanOrEqual(2);
      expect(Number(d.drafts)).toBe(1);
    }
    const semvers = await rows<{ semver: string; state: string }>(
      sql`select v.semver, v.state from versions v join datasets d on d.id = v.dataset_id where d.slug = 'soybean-starter-p-placement' order by v.created_at`,
    );
    expect(semvers).toEqual([
      { semver: "1.0.0", state: "published" },
      { semver: "1.1.0", state: "published" },
      { semver: "1.1.1", state: "published" },
      { semver: "1.2.0", state: "draft" },
    ]);
  });

  it("has at least 60 site-years in the latest published versions, every one with responses", async () => {
    const [n] = await rows<{ n: number | string }>(sql`
      select count(*) as n from site_years sy where sy.version_id in (
        select distinct on (dataset_id) id from versions where state = 'published'
        order by dataset_id, string_to_array(semver, '.')::int[] desc)`);
    expect(Number(n!.n)).toBeGreaterThanOrEqual(60);
    const [missing] = await rows<{ n: number | string }>(sql`
      select count(*) as n from site_years sy join versions v on v.id = sy.version_id
      where v.state = 'published' and not exists (select 1 from responses r where r.site_year_id = sy.id)`);
    expect(Number(missing!.n)).toBe(0);
  });

  it("responses are larger on low-testing soils, near zero on high; plot CV is 5–10 %; some site-years are unbalanced", async () => {
    const byClass = await rows<{ soil_p_class: string; md: number; cv: number }>(sql`
      select soil_p_class, avg(md_kg_ha) as md, avg(cv_pct) as cv from responses r join versions v on v.id = r.version_id
      join datasets d on d.id = v.dataset_id where d.slug = 'soybean-starter-p-placement' and v.semver = '1.1.1' and r.treatment_code = 'BAND-MAP' and r.measure = 'yield'
      group by soil_p_class`);
    const md = Object.fromEntries(byClass.map((r) => [r.soil_p_class, Number(r.md)]));
    expect(md.low ?? md.very_low).toBeGreaterThan(150);
    expect(md.very_high ?? md.high).toBeLessThan(80);
    for (const r of byClass) {
      expect(Number(r.cv)).toBeGreaterThan(4);
      expect(Number(r.cv)).toBeLessThan(11);
    }
    const [unbalanced] = await rows<{ n: number | string }>(
      sql`select count(distinct site_year_code) as n from responses r join versions v on v.id = r.version_id where v.state = 'published' and not r.balanced`,
    );
    expect(Number(unbalanced!.n)).toBeGreaterThanOrEqual(2);
  });

  it("the correction release diffs as a PATCH, the season release as a MINOR", async () => {
    const v = await rows<{ id: string; semver: string }>(
      sql`select v.id, v.semver from versions v join datasets d on d.id = v.dataset_id where d.slug = 'soybean-starter-p-placement'`,
    );
    const id = (s: string) => v.find((x) => x.semver === s)!.id;
    const agent = await signedInAgent(t.app, "reviewer@plotbank.test", "tallgrass-demo-2026");
    const patch = await agent.get(`/api/v1/curation/diff?from=${id("1.1.0")}&to=${id("1.1.1")}`).expect(200);
    expect(patch.body.suggestedBump).toBe("patch");
    expect(patch.body.rows.plots.changed).toBe(1);
    const minor = await agent.get(`/api/v1/curation/diff?from=${id("1.0.0")}&to=${id("1.1.0")}`).expect(200);
    expect(minor.body.suggestedBump).toBe("minor");
    expect(minor.body.siteYears.added).toHaveLength(12);
  });

  it("nutrient=N keeps only treatments that test N: the P starters' carrier N (10-34-0, MAP) does not count", async () => {
    type Row = { treatmentCode: string; dataset: string; nutrients: string[]; testedNutrients: string[]; testedNutrientsStated: boolean };
    const read = async (q: string) => (await request(t.app).get(`/api/v1/responses?${q}&limit=1000`).expect(200)).body.items as Row[];
    // Soybean, N, in the furrow: the demo has no such trial, so nothing (36 P-starter site-years before this rule).
    expect(await read("crop=soybean&nutrient=N&placement=in-furrow")).toEqual([]);
    const meta = (await request(t.app).get("/api/v1/analyses/meta?crop=soybean&nutrient=N&placement=in-furrow").expect(200)).body;
    expect(meta.k).toBe(0);
    expect(meta.provenance.nutrientRule.mode).toBe("tested");
    expect(meta.provenance.nutrientRule.text).toMatch(/carrier/);
    // "Supplies any N" is still there, under its own name: exactly the in-furrow P starters, which test P.
    const supplied = await read("crop=soybean&nutrientSupplied=N&placement=in-furrow");
    expect(supplied.length).toBeGreaterThan(0);
    expect(new Set(supplied.map((r) => r.treatmentCode))).toEqual(new Set(["IF-APP", "IF-MAP"]));
    for (const r of supplied)
      expect(r).toMatchObject({ dataset: "soybean-starter-p-placement", testedNutrients: ["P"], testedNutrientsStated: true });
    expect(
      (await request(t.app).get("/api/v1/analyses/meta?crop=soybean&nutrientSupplied=N&placement=in-furrow").expect(200)).body.provenance
        .nutrientRule.mode,
    ).toBe("supplied");
    // Soybean N without a placement: urea (derived from its product) and the two sulfur sources the curator states as N;S.
    const n = await read("crop=soybean&nutrient=N");
    expect(new Set(n.map((r) => r.treatmentCode))).toEqual(new Set(["UREA", "AMS", "ATS"]));
    for (const r of n) expect(r.testedNutrients).toContain("N");
    expect(n.find((r) => r.treatmentCode === "UREA")).toMatchObject({ testedNutrients: ["N"], testedNutrientsStated: false });
  });

  it("the N and S dataset reports sulfate-S under its lab's own low/medium/high scheme, filtered on the ordinal scale", async () => {
    type Row = {
      siteYearCode: string;
      treatmentCode: string;
      soilTestAnalyte: string | null;
      soilTestClass: string | null;
      soilSClass: string | null;
      soilSReportedClass: string | null;
      soilSScheme: string | null;
    };
    const read = async (q: string) =>
      (await request(t.app).get(`/api/v1/responses?dataset=soybean-n-s-planting-date&${q}&limit=1000`).expect(200)).body.items as Row[];
    const optimum = await read("nutrient=S&soilTestClass=optimum");
    expect(optimum.length).toBeGreaterThan(0);
    for (const r of optimum)
      expect(r).toMatchObject({
        soilTestAnalyte: "S",
        soilTestClass: "optimum",
        soilSClass: "optimum",
        soilSReportedClass: "medium",
        soilSScheme: "tallgrass-lab-sulfate-s",
      });
    const all = await read("nutrient=S");
    expect(new Set(all.map((r) => r.soilSReportedClass))).toEqual(
      new Set(["low", "medium", "high"].filter((l) => all.some((r) => r.soilSReportedClass === l))),
    );
    expect(all.filter((r) => r.soilSClass === "optimum").length).toBe(optimum.length);
  });

  it("is idempotent", async () => {
    expect(await seedDemo(t.ctx)).toEqual({ seeded: false, datasets: 0, versions: 0 });
  });
});

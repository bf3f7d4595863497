import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { computeResponses } from "@/server/services/ingest/recompute-responses";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, upload, type Fixture } from "./curation-fixtures";

let t: TestApp;
let f: Fixture;
beforeAll(async () => {
  t = await testApp();
  f = await draftWithData(t.app, t.ctx, { plots: false });
});
afterAll(() => t.close());

const siteYearCount = 40;
const code = (i: number) => `TB-01-${String(1800 + i)}`;

/** Plots of many site-years; every seventh one unbalanced by a missing plot. */
function manyPlots(): string {
  const lines = ["site_year,plot,block,treatment,yield_kg_ha,harvest_moisture_pct"];
  for (let s = 0; s < siteYearCount; s++) {
    let plot = 0;
    for (let block = 1; block <= 4; block++) {
      for (const [k, trt] of ["CHK", "IF", "BAND", "BC"].entries()) {
        plot++;
        if (s % 7 === 3 && block === 2 && trt === "BAND") continue;
        const y = 3500 + s * 3 + k * 55 + (((s * 31 + plot * 17) % 23) - 11) * 9;
        lines.push(`${code(s)},${plot},${block},${trt},${y},13.5`);
      }
    }
  }
  return lines.join("\n") + "\n";
}

type Stored = {
  site_year_id: string | number;
  treatment_id: string | number;
  md_kg_ha: number;
  se_kg_ha: number;
  lnrr: number | null;
  p_value: number | null;
  balanced: boolean;
};

describe("responses computed from a large plots file", () => {
  it("equal the responses computed again from the stored plots", async () => {
    const siteYears =
      "site_year,site,crop,year,blocks\n" +
      Array.from({ length: siteYearCount }, (_, i) => `${code(i)},TB-01,soybean,${1950 + (i % 70)},4`).join("\n") +
      "\n";
    const sy = await upload(f.curatorAgent, f.versionId, "site_years", siteYears);
    expect(sy.status, JSON.stringify(sy.body).slice(0, 800)).toBe(201);
    const res = await upload(f.curatorAgent, f.versionId, "plots", manyPlots());
    expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(201);
    expect(res.body.responses.rows).toBe(siteYearCount * 3);

    const stored = (
      (await t.ctx.db.execute(
        sql`select site_year_id, treatment_id, md_kg_ha, se_kg_ha, lnrr, p_value, balanced from responses where version_id = ${f.versionId} and measure = 'yield' order by site_year_id, treatment_id`,
      )) as unknown as { rows: Stored[] }
    ).rows.map((r) => [Number(r.site_year_id), Number(r.treatment_id), r.md_kg_ha, r.se_kg_ha, r.lnrr, r.p_value, r.balanced]);
    expect(stored.filter((r) => r[6] === false)).toHaveLength(Math.ceil((siteYearCount - 3) / 7) * 3);

    // The read-back path: plots queried from the database and fitted on this thread.
    const again = await computeResponses(t.ctx.db, f.versionId, "all");
    const expected = again.rows
      .filter((r) => r.measure === "yield")
      .map((r) => [Number(r.siteYearId), Number(r.treatmentId), r.mdKgHa, r.seKgHa, r.lnrr, r.pValue, r.balanced])
      .sort((a, b) => (a[0] as number) - (b[0] as number) || (a[1] as number) - (b[1] as number));
    expect(stored).toEqual(expected);

    // Named site-years: by a code list, or (for long lists) by reading the version's site-years and keeping those named.
    const some = { siteYearCodes: [code(2), code(3), code(17), "TB-99-0000"] };
    const byList = await computeResponses(t.ctx.db, f.versionId, some);
    const byFilter = await computeResponses(t.ctx.db, f.versionId, some, undefined, 2);
    expect(byList.siteYearIds).toHaveLength(3);
    expect(byFilter).toEqual(byList);
    // Yield and harvest moisture, 3 treatments × 3 site-years each.
    expect(byList.rows.filter((r) => r.measure === "yield")).toHaveLength(9);
    expect(byList.rows).toHaveLength(18);
  });
});

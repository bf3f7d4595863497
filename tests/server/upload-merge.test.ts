import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { uploadResult } from "@/schemas/curation";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, upload, versionFingerprint, type Fixture } from "./curation-fixtures";

let t: TestApp;
let f: Fixture;
beforeAll(async () => {
  t = await testApp();
  f = await draftWithData(t.app, t.ctx);
});
afterAll(() => t.close());

const rows = async <T>(q: ReturnType<typeof sql>) => ((await t.ctx.db.execute(q)) as unknown as { rows: T[] }).rows;
const plotsHeader = "site_year,plot,block,treatment,yield_kg_ha,harvest_moisture_pct";

describe("merge mode checks the merged version", () => {
  it("a one-row correction of a plot yield is merged: the other plots stay and the responses follow", async () => {
    const before = await rows<{ plot: string; yield_kg_ha: number }>(
      sql`select p.plot, p.yield_kg_ha from plots p join site_years sy on sy.id = p.site_year_id
          where p.version_id = ${f.versionId} and sy.code = 'TB-01-2021' order by p.plot`,
    );
    expect(before).toHaveLength(16);
    const [oldCheck] = await rows<{ check_mean_kg_ha: number }>(
      sql`select check_mean_kg_ha from responses where version_id = ${f.versionId} and site_year_code = 'TB-01-2021' and measure = 'yield' limit 1`,
    );
    const res = await upload(f.curatorAgent, f.versionId, "plots", `${plotsHeader}\nTB-01-2021,101,1,CHK,3400,13.1\n`, { mode: "merge" });
    expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(201);
    const body = uploadResult.parse(res.body);
    expect(body.errors).toBe(0);
    // Judged with the draft's other 15 plots: neither a missing check nor missing plots.
    expect(body.problems.map((p) => p.message).join("\n")).not.toMatch(/unbalanced|untreated check/);
    const after = await rows<{ plot: string; yield_kg_ha: number }>(
      sql`select p.plot, p.yield_kg_ha from plots p join site_years sy on sy.id = p.site_year_id
          where p.version_id = ${f.versionId} and sy.code = 'TB-01-2021' order by p.plot`,
    );
    expect(after).toHaveLength(16);
    expect(after.find((p) => p.plot === "101")!.yield_kg_ha).toBe(3400);
    expect(after.filter((p) => p.plot !== "101")).toEqual(before.filter((p) => p.plot !== "101"));
    const [newCheck] = await rows<{ check_mean_kg_ha: number; balanced: boolean }>(
      sql`select check_mean_kg_ha, balanced from responses where version_id = ${f.versionId} and site_year_code = 'TB-01-2021' and measure = 'yield' limit 1`,
    );
    // The check's mean moves by the change in one of its four plots.
    const oldYield = before.find((p) => p.plot === "101")!.yield_kg_ha;
    expect(newCheck!.check_mean_kg_ha).toBeCloseTo(oldCheck!.check_mean_kg_ha + (3400 - oldYield) / 4, 6);
    expect(newCheck!.balanced).toBe(true);
  });

  it("a site-year added on its own keeps the others", async () => {
    const res = await upload(
      f.curatorAgent,
      f.versionId,
      "site_years",
      "site_year,site,crop,year,blocks\nTB-01-2022,TB-01,soybean,2022,4\n",
    );
    expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(201);
    const codes = await rows<{ code: string }>(sql`select code from site_years where version_id = ${f.versionId} order by code`);
    expect(codes.map((c) => c.code)).toEqual(["TB-01-2021", "TB-01-2022", "TB-02-2021"]);
    const n = await rows<{ n: number | string }>(sql`select count(*) as n from plots where version_id = ${f.versionId}`);
    expect(Number(n[0]!.n)).toBe(32);
  });

  it("a changed soil test keeps the site-year's other tests and the other site-years' tests", async () => {
    await upload(f.curatorAgent, f.versionId, "soil_tests", "site_year,analyte,value,unit\nTB-01-2021,K,140,ppm\n").expect(201);
    const res = await upload(
      f.curatorAgent,
      f.versionId,
      "soil_tests",
      "site_year,analyte,value,unit,extractant,depth_in,class,interpretation\nTB-01-2021,P,9,ppm,Bray-P1,6,low,tallgrass-illustrative\n",
    );
    expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(201);
    const tests = await rows<{ code: string; analyte: string; value: number }>(
      sql`select sy.code, st.analyte, st.value from soil_tests st join site_years sy on sy.id = st.site_year_id
          where st.version_id = ${f.versionId} order by sy.code, st.analyte`,
    );
    expect(tests).toEqual([
      { code: "TB-01-2021", analyte: "K", value: 140 },
      { code: "TB-01-2021", analyte: "P", value: 9 },
      { code: "TB-02-2021", analyte: "P", value: 24 },
    ]);
    const responses = await rows<{ soil_p_value: number; soil_k_value: number }>(
      sql`select soil_p_value, soil_k_value from responses where version_id = ${f.versionId} and site_year_code = 'TB-01-2021' and measure = 'yield'`,
    );
    expect(responses.length).toBe(3);
    expect(responses.every((r) => r.soil_p_value === 9 && r.soil_k_value === 140)).toBe(true);
  });

  it("a merge that would make the merged version invalid is refused, names the row and column, and changes nothing", async () => {
    const before = await versionFingerprint(t.ctx, f.versionId);
    // A new plot 117 for the check in block 1, where plot 101 already holds the check: two checks in one RCBD block.
    const res = await upload(f.curatorAgent, f.versionId, "plots", `${plotsHeader}\nTB-01-2021,117,1,CHK,3600,13\n`, { mode: "merge" });
    expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(422);
    expect(res.body.errors).toContainEqual(
      expect.objectContaining({
        row: 1,
        column: "block",
        value: "1",
        message: expect.stringMatching(/CHK is already in block 1 \(plot 101/),
      }),
    );
    expect(await versionFingerprint(t.ctx, f.versionId)).toBe(before);
  });
});

describe("the balance warning says what is stored", () => {
  it("a declared block without plots leaves the site-year balanced, and says so; a missing plot makes it unbalanced", async () => {
    const g = await draftWithData(t.app, t.ctx, { plots: false });
    await upload(g.curatorAgent, g.versionId, "site_years", "site_year,site,crop,year,blocks\nTB-01-2021,TB-01,soybean,2021,5\n").expect(
      201,
    );
    const four = ["CHK", "IF", "BAND", "BC"];
    const lines = [plotsHeader];
    for (let b = 1; b <= 4; b++) four.forEach((trt, i) => lines.push(`TB-01-2021,${b}0${i + 1},${b},${trt},${3600 + i * 100 + b * 7},13`));
    const res = await upload(g.curatorAgent, g.versionId, "plots", lines.join("\n") + "\n").expect(201);
    const messages = uploadResult
      .parse(res.body)
      .problems.map((p) => p.message)
      .join("\n");
    expect(messages).not.toMatch(/TB-01-2021 is unbalanced/);
    expect(messages).toMatch(/Site-year TB-01-2021 declares 5 blocks, but no plot with a yield is in block 5; .* stays balanced/);
    let stored = await rows<{ balanced: boolean }>(
      sql`select balanced from responses where version_id = ${g.versionId} and site_year_code = 'TB-01-2021' and measure = 'yield'`,
    );
    expect(stored.length).toBe(3);
    expect(stored.every((r) => r.balanced)).toBe(true);

    // One plot's yield left empty: now the report says unbalanced, and so does the stored flag.
    const gap = await upload(g.curatorAgent, g.versionId, "plots", `${plotsHeader}\nTB-01-2021,203,2,BAND,,13\n`).expect(201);
    expect(
      uploadResult
        .parse(gap.body)
        .problems.map((p) => p.message)
        .join("\n"),
    ).toMatch(/Site-year TB-01-2021 is unbalanced: 1 of 16 plots missing or without yield \(BAND in block 2\).*balanced = false/);
    stored = await rows<{ balanced: boolean }>(
      sql`select balanced from responses where version_id = ${g.versionId} and site_year_code = 'TB-01-2021' and measure = 'yield'`,
    );
    expect(stored.every((r) => r.balanced === false)).toBe(true);
  });
});

describe("repeated warnings are grouped", () => {
  it("one entry per kind with its count and first places, in the upload answer and in the stored report", async () => {
    const codes = ["TB-02-2031", "TB-02-2032", "TB-02-2033", "TB-02-2034", "TB-02-2035"];
    const res = await upload(
      f.curatorAgent,
      f.versionId,
      "site_years",
      `site_year,site,crop,year,blocks\n${codes.map((c) => `${c},TB-02,soybean,${c.slice(-4)},4`).join("\n")}\n`,
    ).expect(201);
    const body = uploadResult.parse(res.body);
    // Five site-years without plots, one entry (the upload recomputes the site-years it touches).
    const group = body.groups.find((g) => g.kind === "no-responses:no plots or summary means yet")!;
    expect(group).toEqual({
      severity: "warning",
      kind: "no-responses:no plots or summary means yet",
      count: 5,
      places: ["TB-02-2031", "TB-02-2032", "TB-02-2033"],
      message: "No responses yet at 5 site-years (no plots or summary means yet): TB-02-2031, TB-02-2032, TB-02-2033 and 2 more",
    });
    expect(body.groups.filter((g) => g.kind?.startsWith("no-responses"))).toHaveLength(1);
    // Every single warning stays in the report, each with its place.
    expect(body.problems.filter((p) => p.kind === group.kind).map((p) => p.place)).toEqual(codes);
    const stored = await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}/reports/${body.reportId}?severity=error`).expect(200);
    expect(stored.body.problems).toEqual([]);
    expect(stored.body.groups).toContainEqual(group);
  });
});

import { sql } from "drizzle-orm";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { uploadResult, validationReport } from "@/schemas/curation";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, plotsCsv, upload, versionFingerprint, type Fixture } from "./curation-fixtures";

let t: TestApp;
let f: Fixture;
const LIMIT = 40_000;
beforeAll(async () => {
  t = await testApp({ uploadLimitBytes: LIMIT });
  f = await draftWithData(t.app, t.ctx);
});
afterAll(() => t.close());

const rows = async <T>(q: ReturnType<typeof sql>) => ((await t.ctx.db.execute(q)) as unknown as { rows: T[] }).rows;

/** Upload that must be refused: 422 problem+json, the draft untouched, and the problem located as expected. */
async function rejected(resource: string, csv: string | Buffer, fields: Record<string, string> = {}) {
  const before = await versionFingerprint(t.ctx, f.versionId);
  const res = await upload(f.curatorAgent, f.versionId, resource, csv, fields);
  expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(422);
  expect(res.headers["content-type"]).toMatch(/application\/problem\+json/);
  expect(res.body.errorCount).toBeGreaterThan(0);
  expect(await versionFingerprint(t.ctx, f.versionId)).toBe(before);
  return res.body as {
    errors: { file: string; row?: number; column?: string; value?: string; message: string }[];
    reportId: string;
    problems: { severity: string; message: string }[];
  };
}

let token: string | undefined;
async function writeToken() {
  token ??= (await f.curatorAgent.post("/api/v1/tokens").send({ name: "uploads", scope: "write" }).expect(201)).body.secret as string;
  return token;
}

const plotsHeader = "site_year,plot,block,treatment,yield_kg_ha,harvest_moisture_pct";

describe("file format", () => {
  it("reads a UTF-8 BOM, semicolons, decimal commas and quoted fields with newlines", async () => {
    const csv = '\uFEFFsite;location;soil_series;soil_texture\nTB-03;"Wren County\nnorth half";"Harlan; eroded";silt loam\n';
    const res = await upload(f.curatorAgent, f.versionId, "sites", csv).expect(201);
    const body = uploadResult.parse(res.body);
    expect(body.delimiter).toBe(";");
    expect(body.rows).toBe(1);
    const [site] = await rows<{ location: string; soil_series: string }>(
      sql`select location, soil_series from sites where version_id = ${f.versionId} and code = 'TB-03'`,
    );
    expect(site).toEqual({ location: "Wren County\nnorth half", soil_series: "Harlan; eroded" });
    const sy = "site_year;site;crop;year;blocks;row_spacing_in\nTB-03-2021;TB-03;soybean;2021;4;7,5\n";
    await upload(f.curatorAgent, f.versionId, "site_years", sy).expect(201);
    const [s] = await rows<{ row_spacing_in: number }>(
      sql`select row_spacing_in from site_years where version_id = ${f.versionId} and code = 'TB-03-2021'`,
    );
    expect(s!.row_spacing_in).toBe(7.5);
  });

  it("keeps the raw file byte for byte with its SHA-256", async () => {
    const csv = '\uFEFFsite,location\r\nTB-04,"Osage Bend County, ""east"""\r\n';
    const res = await upload(f.curatorAgent, f.versionId, "sites", csv).expect(201);
    // Compared inside the database: a driver's text decoding may drop a leading BOM on the way out.
    const [u] = await rows<{ stored: string; sha256: string; byte_size: number | string }>(
      sql`select encode(sha256(convert_to(content, 'UTF8')), 'hex') as stored, sha256, byte_size from uploads where id = ${res.body.uploadId}`,
    );
    const { createHash } = await import("node:crypto");
    const expected = createHash("sha256").update(csv).digest("hex");
    expect(u!.sha256).toBe(expected);
    expect(u!.stored).toBe(expected);
    expect(Number(u!.byte_size)).toBe(Buffer.byteLength(csv));
  });

  it("an empty file is a clear 400", async () => {
    const res = await upload(f.curatorAgent, f.versionId, "plots", "").expect(400);
    expect(res.body.detail).toBe("The file is empty.");
  });

  it("a header without rows is refused", async () => {
    const body = await rejected("plots", `${plotsHeader}\n`);
    expect(body.errors[0]!.message).toMatch(/no data rows/);
  });

  it("an over-size file is 413 naming the limit, multipart or raw", async () => {
    const big = plotsHeader + "\n" + "TB-01-2021,999,1,CHK,3600,13\n".repeat(2000);
    const before = await versionFingerprint(t.ctx, f.versionId);
    const res = await upload(f.curatorAgent, f.versionId, "plots", big);
    expect(res.status).toBe(413);
    expect(res.body.limit).toBe(LIMIT);
    expect(res.body.detail).toContain(String(LIMIT));
    const raw = await supertest(t.app)
      .post(`/api/v1/curation/versions/${f.versionId}/uploads/plots`)
      .set("Authorization", `Bearer ${await writeToken()}`)
      .set("Content-Type", "text/csv")
      .send(big);
    expect(raw.status).toBe(413);
    expect(await versionFingerprint(t.ctx, f.versionId)).toBe(before);
  });

  it("takes a raw text/csv body with options in the query", async () => {
    // A raw CSV body is for API clients with a write token (browser sessions send multipart).
    const res = await supertest(t.app)
      .post(`/api/v1/curation/versions/${f.versionId}/uploads/sites?filename=more-sites.csv`)
      .set("Authorization", `Bearer ${await writeToken()}`)
      .set("Content-Type", "text/csv")
      .send("site,location\nTB-05,Kestrel County\n")
      .expect(201);
    expect(res.body.filename).toBe("more-sites.csv");
  });
});

describe("Table Schema rules, located by row and column", () => {
  it("a wrong type names the row (1-based data row) and column", async () => {
    const csv = plotsCsv().replace("TB-01-2021,102,1,IF,", "TB-01-2021,102,two,IF,");
    const body = await rejected("plots", csv);
    expect(body.errors).toContainEqual(
      expect.objectContaining({ file: "plots.csv", row: 2, column: "block", value: "two", message: expect.stringMatching(/whole/) }),
    );
  });

  it("a missing required column and a missing required value", async () => {
    let body = await rejected("site_years", "site_year,site,crop,year\nTB-01-2023,TB-01,soybean,2023\n");
    expect(body.errors).toContainEqual(
      expect.objectContaining({ column: "blocks", message: expect.stringMatching(/required field blocks has no column/) }),
    );
    body = await rejected("site_years", "site_year,site,crop,year,blocks\nTB-01-2023,TB-01,soybean,2023,\n");
    expect(body.errors).toContainEqual(
      expect.objectContaining({
        row: 1,
        column: "blocks",
        message: "Site-year TB-01-2023: blocks (replicates) is required but the cell is empty; fill it in",
      }),
    );
  });

  it("an enum, a range and a date", async () => {
    const body = await rejected(
      "site_years",
      "site_year,site,crop,year,blocks,row_spacing_in,planting_date\nTB-01-2023,TB-01,rice,2023,4,30,2023-05-10\nTB-01-2024,TB-01,soybean,2024,4,100,2024-05-10\nTB-01-2025,TB-01,soybean,2025,4,30,2025-02-30\n",
    );
    expect(body.errors).toContainEqual(
      expect.objectContaining({
        row: 1,
        column: "crop",
        value: "rice",
        message: expect.stringMatching(
          /^Site-year TB-01-2023: crop "rice" is not one of the values this column takes: .*; use one of them as written$/,
        ),
      }),
    );
    expect(body.errors).toContainEqual(
      expect.objectContaining({
        row: 2,
        column: "row_spacing_in",
        message: expect.stringMatching(/row spacing \(row_spacing_in\) 100 in is above the highest accepted value, 60 in/),
      }),
    );
    expect(body.errors).toContainEqual(
      expect.objectContaining({ row: 3, column: "planting_date", message: expect.stringMatching(/YYYY-MM-DD/) }),
    );
  });

  it("a duplicate primary key", async () => {
    const csv = plotsCsv() + "TB-01-2021,101,1,CHK,3600,13\n";
    const body = await rejected("plots", csv);
    expect(body.errors).toContainEqual(
      expect.objectContaining({ row: 33, column: "plot", value: "101", message: expect.stringMatching(/appears twice/) }),
    );
  });

  it("foreign keys to an unknown site-year and an unknown treatment", async () => {
    const csv = `${plotsHeader}\nTB-77-2021,101,1,CHK,3600,13\nTB-01-2021,101,1,NOPE,3600,13\n`;
    const body = await rejected("plots", csv);
    expect(body.errors).toContainEqual(
      expect.objectContaining({ row: 1, column: "site_year", value: "TB-77-2021", message: expect.stringMatching(/not in this version/) }),
    );
    expect(body.errors).toContainEqual(expect.objectContaining({ row: 2, column: "treatment", value: "NOPE" }));
  });

  it("a row with too many fields", async () => {
    const body = await rejected("plots", `${plotsHeader}\nTB-01-2021,101,1,CHK,3600,13,extra\n`);
    expect(body.errors[0]).toMatchObject({ row: 1, message: "row has 7 fields but the header has 6" });
  });

  it("a column mapping to an unknown field, and one naming a missing column", async () => {
    const body = await rejected("plots", plotsCsv(), { mapping: JSON.stringify({ yield_kg_ha: "grain", Yield: "yield_kg_ha" }) });
    expect(body.errors.map((e) => e.message).join("\n")).toMatch(/mapped to "grain"/);
    expect(body.errors.map((e) => e.message).join("\n")).toMatch(/names column "Yield"/);
  });
});

describe("domain rules", () => {
  it("a site-year without a check, and one with two checks", async () => {
    const noCheck = plotsCsv()
      .split("\n")
      .filter((l) => !l.includes(",CHK,"))
      .join("\n");
    // Replace: the file is the whole of the plots, so nothing of the draft's plots is merged in.
    let body = await rejected("plots", noCheck, { mode: "replace" });
    expect(body.errors).toContainEqual(
      expect.objectContaining({ column: "treatment", message: expect.stringMatching(/site-year "TB-01-2021" has no untreated check/) }),
    );
    await upload(f.curatorAgent, f.versionId, "treatments", "treatment,name,is_check,application\nCHK2,Second check,yes,1\n").expect(201);
    body = await rejected(
      "plots",
      plotsCsv({ override: { "TB-02-2021/101": "TB-02-2021,101,1,CHK2,4100,13" } }).replace(/TB-02-2021,102,1,IF/, "TB-02-2021,102,1,CHK"),
      { mode: "replace" },
    );
    expect(body.errors.map((e) => e.message).join("\n")).toMatch(/site-year "TB-02-2021" has 2 checks \(CHK, CHK2\)/);
  });

  it("a check with a product, and an application without its rate", async () => {
    const body = await rejected(
      "treatments",
      "treatment,name,is_check,application,product,grade,product_rate,rate_unit,placement,timing\nCHK,Check,true,1,MAP,11-52-0,50,lb/ac,broadcast,pre-plant\nX,Odd,false,1,MAP,11-52-0,,lb/ac,broadcast,pre-plant\n",
    );
    expect(body.errors).toContainEqual(
      expect.objectContaining({ row: 1, column: "product", message: expect.stringMatching(/untreated check/) }),
    );
    expect(body.errors).toContainEqual(
      expect.objectContaining({ row: 2, column: "product_rate", message: expect.stringMatching(/required for an application/) }),
    );
  });

  it("inconsistent blocks: a block beyond the site-year's blocks, a treatment twice in one block", async () => {
    let body = await rejected("plots", plotsCsv({ override: { "TB-01-2021/101": "TB-01-2021,101,5,CHK,3600,13" } }));
    expect(body.errors).toContainEqual(
      expect.objectContaining({ row: 1, column: "block", value: "5", message: expect.stringMatching(/outside 1–4/) }),
    );
    body = await rejected("plots", plotsCsv({ override: { "TB-01-2021/102": "TB-01-2021,102,1,CHK,3600,13" } }));
    expect(body.errors).toContainEqual(
      expect.objectContaining({ row: 2, column: "block", message: expect.stringMatching(/more than once in block 1/) }),
    );
  });

  it("an implausible harvest moisture", async () => {
    const body = await rejected("plots", plotsCsv({ override: { "TB-01-2021/103": "TB-01-2021,103,1,BAND,3600,55" } }));
    expect(body.errors).toContainEqual(
      expect.objectContaining({ row: 3, column: "harvest_moisture_pct", value: "55", message: expect.stringMatching(/not plausible/) }),
    );
  });

  it("a soil-test class that contradicts its scheme's thresholds is kept as reported, with a warning naming row and column", async () => {
    const res = await upload(
      f.curatorAgent,
      f.versionId,
      "soil_tests",
      "site_year,analyte,value,unit,extractant,class,interpretation\nTB-01-2021,P,7,ppm,Bray-P1,high,tallgrass-illustrative\n",
    ).expect(201);
    const body = uploadResult.parse(res.body);
    expect(body.errors).toBe(0);
    expect(body.problems).toContainEqual(
      expect.objectContaining({
        severity: "warning",
        row: 1,
        column: "class",
        value: "high",
        message: expect.stringMatching(/contradicts scheme "tallgrass-illustrative".*falls in "low"/),
      }),
    );
    const [p] = await rows<{ class: string; reported_class: string; interpretation: string }>(
      sql`select st.class, st.reported_class, st.interpretation from soil_tests st join site_years sy on sy.id = st.site_year_id where st.version_id = ${f.versionId} and sy.code = 'TB-01-2021' and st.analyte = 'P'`,
    );
    expect(p).toEqual({ class: "high", reported_class: "high", interpretation: "tallgrass-illustrative" });
  });

  it("a class label the named scheme does not have, and one off the ordinal scale with no scheme", async () => {
    const unknownLabel = await rejected(
      "soil_tests",
      "site_year,analyte,value,unit,extractant,class,interpretation\nTB-01-2021,P,7,ppm,Bray-P1,medium,tallgrass-illustrative\n",
    );
    expect(unknownLabel.errors[0]).toMatchObject({
      row: 1,
      column: "class",
      value: "medium",
      message: expect.stringMatching(/not a label of scheme "tallgrass-illustrative"/),
    });
    const noScheme = await rejected("soil_tests", "site_year,analyte,value,unit,extractant,class\nTB-01-2021,P,7,ppm,Bray-P1,medium\n");
    expect(noScheme.errors[0]).toMatchObject({
      row: 1,
      column: "class",
      value: "medium",
      message: expect.stringMatching(/not on the ordinal scale.*interpretation/),
    });
    const unknownScheme = await rejected(
      "soil_tests",
      "site_year,analyte,value,unit,extractant,class,interpretation\nTB-01-2021,P,7,ppm,Bray-P1,medium,lab-xyz\n",
    );
    expect(unknownScheme.errors[0]).toMatchObject({
      row: 1,
      column: "interpretation",
      value: "lab-xyz",
      message: expect.stringMatching(/neither in this version's data dictionary/),
    });
  });

  it("tested_nutrients: an unknown nutrient, a check that tests something, and a nutrient the products do not add", async () => {
    const header = "treatment,name,is_check,tested_nutrients,application,product,grade,product_rate,rate_unit,placement,timing";
    const body = await rejected(
      "treatments",
      `${header}\nCHK,Check,true,P,1,,,,,,\nBAND,Band MAP,false,Q,1,MAP,11-52-0,100,lb/ac,2x2-band,at-planting\nBC,Broadcast MAP,false,K,1,MAP,11-52-0,100,lb/ac,broadcast,pre-plant\n`,
    );
    expect(body.errors).toContainEqual(
      expect.objectContaining({ row: 1, column: "tested_nutrients", message: expect.stringMatching(/untreated check/) }),
    );
    expect(body.errors).toContainEqual(expect.objectContaining({ row: 2, column: "tested_nutrients", value: "Q" }));
    expect(body.errors).toContainEqual(
      expect.objectContaining({
        row: 3,
        column: "tested_nutrients",
        value: "K",
        message: expect.stringMatching(/tests K, but its products add no K/),
      }),
    );
  });

  it("derives a blank class from the table, converts lb/ac to ppm", async () => {
    const res = await upload(
      f.curatorAgent,
      f.versionId,
      "soil_tests",
      "site_year,analyte,value,extractant,interpretation\nTB-01-2021,K,240,ammonium-acetate,tallgrass-illustrative\n",
      { units: JSON.stringify({ soilTest: "lb/ac" }) },
    ).expect(201);
    expect(res.body.accepted).toBe(true);
    const [k] = await rows<{ value: number; unit: string; class: string }>(
      sql`select value, unit, class from soil_tests where version_id = ${f.versionId} and analyte = 'K'`,
    );
    expect(k).toEqual({ value: 120, unit: "ppm", class: "low" });
  });

  it("a yield far outside its site-year's range is a warning, not an error", async () => {
    const res = await upload(
      f.curatorAgent,
      f.versionId,
      "plots",
      plotsCsv({ override: { "TB-01-2021/104": "TB-01-2021,104,1,BC,9800,13" } }),
    ).expect(201);
    const body = uploadResult.parse(res.body);
    expect(body.errors).toBe(0);
    expect(body.problems).toContainEqual(
      expect.objectContaining({ severity: "warning", row: 4, column: "yield_kg_ha", message: expect.stringMatching(/far outside/) }),
    );
  });

  it("missing plots are accepted with an unbalance warning; responses use the least-squares fit", async () => {
    const res = await upload(f.curatorAgent, f.versionId, "plots", plotsCsv({ skip: ["TB-01-2021/203", "TB-01-2021/204"] }), {
      mode: "replace",
    }).expect(201);
    expect(res.body.problems).toContainEqual(
      expect.objectContaining({
        severity: "warning",
        column: "block",
        message: expect.stringMatching(/Site-year TB-01-2021 is unbalanced: 2 of 16 plots missing/),
      }),
    );
    const r = await rows<{ balanced: boolean; lsd05_kg_ha: number | null }>(
      sql`select balanced, lsd05_kg_ha from responses where version_id = ${f.versionId} and site_year_code = 'TB-01-2021' and measure = 'yield'`,
    );
    expect(r).toHaveLength(3);
    expect(r.every((x) => x.balanced === false && x.lsd05_kg_ha === null)).toBe(true);
  });
});

describe("units at the edge", () => {
  it("bu/ac at harvest moisture becomes kg/ha at the standard moisture", async () => {
    // 60 bu/ac of soybean = 4035.07 kg/ha (60 lb/bu; NIST Handbook 44 App. C); at 18 % moisture × (100−18)/(100−13)
    // (Mulvaney & Devkota 2020, UF/IFAS EDIS AG442).
    const csv = plotsCsv()
      .replace("yield_kg_ha,harvest_moisture_pct", "Yield (bu/ac),Moisture")
      .replace(
        /^(TB-0[12]-2021,\d+,\d,\w+,)(\d+),([\d.]+)$/gm,
        (_m, a: string, y: string, mo: string) => `${a}${(Number(y) / 67.25).toFixed(2)},${mo}`,
      )
      .replace(/TB-02-2021,101,1,CHK,[0-9.]+,[0-9.]+/, "TB-02-2021,101,1,CHK,60,18");
    await upload(f.curatorAgent, f.versionId, "plots", csv, {
      mapping: JSON.stringify({ "Yield (bu/ac)": "yield_kg_ha", Moisture: "harvest_moisture_pct" }),
      units: JSON.stringify({ yield: "bu/ac", yieldMoisture: "harvest" }),
    }).expect(201);
    const [p] = await rows<{ yield_kg_ha: number; harvest_moisture_pct: number }>(
      sql`select p.yield_kg_ha, p.harvest_moisture_pct from plots p join site_years sy on sy.id = p.site_year_id where p.version_id = ${f.versionId} and sy.code = 'TB-02-2021' and p.plot = '101'`,
    );
    expect(p!.harvest_moisture_pct).toBe(18);
    expect(p!.yield_kg_ha).toBeCloseTo(((60 * 60 * 0.45359237) / 0.40468564224) * (82 / 87), 6);
  });

  it("nutrient rates come from grade and product rate; fluids through their density", async () => {
    const t2 = await rows<{ code: string; n_lb_ac: number; p2o5_lb_ac: number; nutrients: string[]; placements: string[] }>(
      sql`select code, n_lb_ac, p2o5_lb_ac, nutrients, placements from treatments where version_id = ${f.versionId} and code in ('IF', 'BAND') order by code`,
    );
    // 100 lb/ac MAP 11-52-0 → 11 N + 52 P2O5; 5 gal/ac 10-34-0 at 11.4 lb/gal (Univ. of Nebraska PASSEL) → 57 lb → 5.7 N + 19.38 P2O5.
    expect(t2[0]).toMatchObject({ code: "BAND", n_lb_ac: 11, p2o5_lb_ac: 52, nutrients: ["N", "P"], placements: ["2x2-band"] });
    expect(t2[1]!.n_lb_ac).toBeCloseTo(5.7, 9);
    expect(t2[1]!.p2o5_lb_ac).toBeCloseTo(19.38, 9);
    // The density used is kept with the application (the grade's typical one here), and a dry product has none.
    const dens = await rows<{ code: string; density_lb_gal: number | null }>(
      sql`select t.code, a.density_lb_gal from applications a join treatments t on t.id = a.treatment_id where a.version_id = ${f.versionId} and t.code in ('IF', 'BAND') order by t.code`,
    );
    expect(dens).toEqual([
      { code: "BAND", density_lb_gal: null },
      { code: "IF", density_lb_gal: 11.4 },
    ]);
    // A density given in the file wins over the typical one (10.67 lb/gal for 28 % UAN, from memory).
    await upload(
      f.curatorAgent,
      f.versionId,
      "treatments",
      "treatment,name,is_check,application,product,grade,product_rate,rate_unit,density_lb_gal,placement,timing\nFL,Fluid given,false,1,UAN,28-0-0,10,gal/ac,10.67,broadcast,pre-plant\n",
    ).expect(201);
    const [fl] = await rows<{ n_lb_ac: number; density_lb_gal: number }>(
      sql`select t.n_lb_ac, a.density_lb_gal from treatments t join applications a on a.treatment_id = t.id where t.version_id = ${f.versionId} and t.code = 'FL'`,
    );
    expect(fl!.density_lb_gal).toBe(10.67);
    expect(fl!.n_lb_ac).toBeCloseTo(10 * 10.67 * 0.28, 3);
    // An elemental grade: 0-20-0 as P is 45.82 % P2O5 (÷ 0.4365, Virginia Tech SPES-201NP).
    await upload(
      f.curatorAgent,
      f.versionId,
      "treatments",
      "treatment,name,is_check,application,product,grade,product_rate,rate_unit,placement,timing\nEL,Elemental,false,1,TSP-E,0-20-0,100,kg/ha,broadcast,pre-plant\n",
      { units: JSON.stringify({ gradeBasis: "element" }) },
    ).expect(201);
    const [el] = await rows<{ p2o5_lb_ac: number }>(
      sql`select p2o5_lb_ac from treatments where version_id = ${f.versionId} and code = 'EL'`,
    );
    expect(el!.p2o5_lb_ac).toBeCloseTo(Math.round(((((100 * 0.40468564224) / 0.45359237) * (20 / 0.4365)) / 100) * 1000) / 1000, 3);
  });
});

describe("summaries and reports", () => {
  it("a site-year given as means, r, MSE and df gets responses from them", async () => {
    await upload(f.curatorAgent, f.versionId, "site_years", "site_year,site,crop,year,blocks\nTB-05-2021,TB-05,soybean,2021,4\n").expect(
      201,
    );
    const res = await upload(
      f.curatorAgent,
      f.versionId,
      "summaries",
      "site_year,treatment,mean_kg_ha,replicates,mse,df_error\nTB-05-2021,CHK,3500,4,20000,9\nTB-05-2021,BAND,3800,4,20000,9\n",
    ).expect(201);
    expect(res.body.responses.uncomputed).toEqual([]);
    const [r] = await rows<{ md_kg_ha: number; se_kg_ha: number; from_summary: boolean; df_error: number }>(
      sql`select md_kg_ha, se_kg_ha, from_summary, df_error from responses where version_id = ${f.versionId} and site_year_code = 'TB-05-2021' and measure = 'yield'`,
    );
    expect(r).toMatchObject({ md_kg_ha: 300, from_summary: true, df_error: 9 });
    expect(r!.se_kg_ha).toBeCloseTo(Math.sqrt((2 * 20000) / 4), 9);
    // A site-year cannot have both.
    await rejected("plots", `${plotsHeader}\nTB-05-2021,101,1,CHK,3600,13\n`);
  });

  it("stores every report; it can be filtered and downloaded as CSV", async () => {
    const body = await rejected(
      "plots",
      plotsCsv().replace("TB-01-2021,102,1,IF,", "TB-01-2021,102,x,IF,").replace("TB-01-2021,103,1,BAND,", "TB-01-2021,103,1,ZZ,"),
    );
    const all = validationReport.parse(
      (await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}/reports/${body.reportId}`).expect(200)).body,
    );
    expect(all.accepted).toBe(false);
    expect(all.errors).toBe(2);
    const byColumn = validationReport.parse(
      (await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}/reports/${body.reportId}?column=treatment`).expect(200)).body,
    );
    expect(byColumn.total).toBe(1);
    expect(byColumn.problems[0]).toMatchObject({ row: 3, value: "ZZ" });
    const csv = await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}/reports/${body.reportId}.csv`).expect(200);
    expect(csv.headers["content-type"]).toMatch(/text\/csv/);
    const lines = csv.text.trim().split("\r\n");
    expect(lines[0]).toBe("severity,file,row,column,value,message");
    expect(lines.slice(1).some((l) => l.startsWith("error,plots.csv,2,block,x,"))).toBe(true);
    await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}/reports/${body.reportId}?severity=fatal`).expect(400);
  });
});

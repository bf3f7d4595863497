import Papa from "papaparse";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { datasetDetail, observationPage, responsePage, versionDetail } from "@/schemas/public";
import { problemSchema } from "@/schemas/problem";
import { tableSchemaDescriptor } from "@/schemas/table-schema";
import { CsvWriter } from "@/server/csv";
import { blocks, insertPublicFixture, isLatestPublished, modelCells } from "@/tests/support/public-fixture";
import { checkCsvAgainstTableSchema } from "@/tests/support/data-package-check";
import { testApp, type TestApp } from "@/tests/support/test-app";

let t: TestApp;
beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000 });
  await insertPublicFixture(t.ctx);
});
afterAll(() => t.close());

const get = (url: string) => request(t.app).get(url);
const latestPlots = modelCells(isLatestPublished).length * blocks.length;
const v110 = "/api/v1/datasets/tb-soy-starter-p/versions/1.1.0";

function parseCsv(text: string) {
  const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
  expect(parsed.errors).toEqual([]);
  return parsed;
}

describe("dataset and version metadata", () => {
  it("a dataset lists its published versions and the withdrawn one as a tombstone with its reason", async () => {
    const body = datasetDetail.parse((await get("/api/v1/datasets/tb-soy-starter-p").expect(200)).body);
    expect(body.latestVersion).toBe("1.1.0");
    expect(body.versions.map((v) => [v.semver, v.state])).toEqual([
      ["1.1.0", "published"],
      ["1.0.0", "published"],
      ["0.9.0", "withdrawn"],
    ]);
    expect(body.versions[2]!.withdrawnReason).toMatch(/swapped two blocks/);
  });
  it("the versions list matches, and an unknown dataset is 404 problem+json", async () => {
    const res = await get("/api/v1/datasets/tb-soy-starter-p/versions").expect(200);
    expect(res.body.items).toHaveLength(3);
    const missing = await get("/api/v1/datasets/no-such-dataset").expect(404);
    expect(missing.headers["content-type"]).toMatch(/problem\+json/);
  });
  it("latest is an alias of the newest published version, with counts and links", async () => {
    const latest = versionDetail.parse((await get("/api/v1/datasets/tb-soy-starter-p/versions/latest").expect(200)).body);
    const pinned = versionDetail.parse((await get(v110).expect(200)).body);
    expect(latest).toEqual(pinned);
    const cells = modelCells((s) => s.slug === "tb-soy-starter-p" && s.semver === "1.1.0");
    expect(latest.counts).toEqual({
      sites: new Set(cells.map((c) => c.siteCode)).size,
      siteYears: new Set(cells.map((c) => c.siteYearCode)).size,
      treatments: new Set(cells.map((c) => c.treatment)).size,
      plots: cells.length * blocks.length,
      responses: cells.filter((c) => !c.isCheck).length,
    });
    expect(latest.links.responses).toBe(`${v110}/responses`);
  });
  it("a withdrawn version answers with its metadata and reason but no rows", async () => {
    const v = versionDetail.parse((await get("/api/v1/datasets/tb-soy-starter-p/versions/0.9.0").expect(200)).body);
    expect(v).toMatchObject({ state: "withdrawn", counts: null });
    expect(v.withdrawnReason).toMatch(/swapped two blocks/);
  });
  it("serves a version's Table Schema", async () => {
    const res = await get(`${v110}/schema`).expect(200);
    const schema = tableSchemaDescriptor.parse(res.body);
    expect(schema.resources.plots.fields.find((f) => f.name === "yield")?.unit).toBe("kg/ha");
  });
});

describe("withdrawn versions are gone: 410 on every rows endpoint", () => {
  for (const resource of ["sites", "site-years", "treatments", "observations", "responses"]) {
    it(resource, async () => {
      const res = await get(`/api/v1/datasets/tb-soy-starter-p/versions/0.9.0/${resource}`).expect(410);
      const problem = problemSchema.parse(res.body);
      expect(problem.detail).toMatch(/withdrawn/);
      expect(res.body.withdrawnReason).toMatch(/swapped two blocks/);
    });
  }
  it("and on a cross-dataset read that names it", async () => {
    await get("/api/v1/responses?dataset=tb-soy-starter-p&version=0.9.0").expect(410);
  });
});

describe("units", () => {
  it("bu/ac is the default, kg/ha on request; responses convert by the crop's test weight", async () => {
    const bu = responsePage.parse((await get("/api/v1/responses?limit=1000").expect(200)).body);
    const kg = responsePage.parse((await get("/api/v1/responses?limit=1000&units=kg/ha").expect(200)).body);
    expect(bu.units).toBe("bu/ac");
    expect(kg.units).toBe("kg/ha");
    // kg/ha per bu/ac = lb/bu × 0.45359237 / 0.40468564224 (NIST Handbook 44, Appendix C): soybean (60 lb/bu) 67.25,
    // corn (56 lb/bu) 62.77.
    const factor = { soybean: 67.25, corn: 62.77 } as Record<string, number>;
    for (const [i, row] of bu.items.entries()) {
      const other = kg.items[i]!;
      expect(other.id).toBe(row.id);
      expect(row.yieldUnit).toBe("bu/ac");
      expect(other.yieldUnit).toBe("kg/ha");
      expect(row.md * factor[row.crop]!).toBeCloseTo(other.md, 0);
      expect(row.se * factor[row.crop]!).toBeCloseTo(other.se, 0);
      expect(row.checkMean * factor[row.crop]!).toBeCloseTo(other.checkMean, -1);
      expect(row.lnrr).toBe(other.lnrr);
      expect(row.moistureBasisPct).toBe(row.crop === "soybean" ? 13 : 15.5);
    }
  });
  it("observations convert too; an unknown unit is a 400 naming units", async () => {
    const bu = observationPage.parse((await get("/api/v1/observations?crop=soybean&limit=5").expect(200)).body);
    const kg = observationPage.parse((await get("/api/v1/observations?crop=soybean&limit=5&units=kg/ha").expect(200)).body);
    expect(bu.items[0]!.yield! * 67.25).toBeCloseTo(kg.items[0]!.yield!, -1);
    const bad = await get("/api/v1/observations?units=t/ha").expect(400);
    expect(bad.body.errors[0].field).toBe("query.units");
  });
});

describe("bad parameters are 400 problem+json naming the parameter", () => {
  const cases: [string, string][] = [
    ["/api/v1/responses?bogus=1", "query"],
    ["/api/v1/responses?yearFrom=last-year", "query.yearFrom"],
    ["/api/v1/observations?placement=sideways", "query.placement"],
    ["/api/v1/site-years?limit=5000", "query.limit"],
    ["/api/v1/responses?version=1.0.0", "query.version"],
    ["/api/v1/responses?format=xlsx", "query.format"],
    [`${v110}/sites?crop=corn`, "query"],
    ["/api/v1/datasets?page=2", "query"],
  ];
  for (const [url, field] of cases) {
    it(url, async () => {
      const res = await get(url).expect(400);
      expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
      const fields = problemSchema.parse(res.body).errors!.map((e) => e.field);
      // A list parameter names the bad item too (query.placement.0).
      expect(
        fields.some((f) => f === field || f?.startsWith(`${field}.`)),
        fields.join(),
      ).toBe(true);
    });
  }
  it("the unknown parameter's name is in the message", async () => {
    const res = await get("/api/v1/responses?bogus=1").expect(400);
    expect(JSON.stringify(res.body.errors)).toContain("bogus");
  });
});

describe("cursor paging", () => {
  it("follows Link rel=next to the end: every row once, in order, the count equals the total", async () => {
    const ids: number[] = [];
    let url: string | null = "/api/v1/observations?limit=7";
    let pages = 0;
    while (url) {
      const res: request.Response = await get(url).expect(200);
      const body = observationPage.parse(res.body);
      expect(body.items.length).toBeLessThanOrEqual(7);
      ids.push(...body.items.map((r) => r.id));
      const next: string | null = (res.headers.link as string | undefined)?.match(/<([^>]+)>; rel="next"/)?.[1] ?? null;
      expect(next === null).toBe(body.nextPageToken === null);
      url = next;
      pages++;
    }
    expect(ids).toHaveLength(latestPlots);
    expect(new Set(ids).size).toBe(ids.length);
    expect([...ids].sort((a, b) => a - b)).toEqual(ids);
    expect(pages).toBe(Math.ceil(latestPlots / 7));
  });
  it("nextPageToken works as a parameter too, and the default page is 100 rows", async () => {
    const first = observationPage.parse((await get("/api/v1/observations").expect(200)).body);
    expect(first.items).toHaveLength(Math.min(100, latestPlots));
    const second = observationPage.parse((await get(`/api/v1/observations?pageToken=${first.nextPageToken}`).expect(200)).body);
    expect(second.items[0]!.id).toBeGreaterThan(first.items.at(-1)!.id);
  });
  it("refuses a token used with other filters, and one it never issued", async () => {
    const first = (await get("/api/v1/responses?limit=2&crop=soybean").expect(200)).body;
    const other = await get(`/api/v1/responses?limit=2&crop=corn&pageToken=${first.nextPageToken}`).expect(400);
    expect(other.body.errors[0].field).toBe("query.pageToken");
    const forged = await get("/api/v1/responses?pageToken=bm90LWEtdG9rZW4").expect(400);
    expect(forged.body.errors[0].field).toBe("query.pageToken");
  });
});

describe("CSV", () => {
  it("Accept: text/csv and format=csv give the same stream: all rows, no paging, with a describedby link", async () => {
    const byAccept = await get("/api/v1/observations").set("Accept", "text/csv").expect(200);
    const byParam = await get("/api/v1/observations?format=csv").expect(200);
    expect(byAccept.headers["content-type"]).toMatch(/^text\/csv/);
    expect(byAccept.text).toBe(byParam.text);
    const rows = parseCsv(byAccept.text).data;
    expect(rows).toHaveLength(latestPlots);
    expect(byAccept.headers.link).toContain('</api/v1/schemas/observations>; rel="describedby"; type="application/json"');
    expect(byAccept.headers.link).toContain(`<${v110}/schema>; rel="related"`);
    expect(byAccept.headers.link).toContain('</api/v1/datasets/tb-corn-nk/versions/1.0.0/schema>; rel="related"');
  });
  it("each CSV view's describedby link names a Table Schema that describes that CSV: its columns, in order, with their types", async () => {
    const views = [
      ...["sites", "site-years", "treatments", "observations", "responses"].map((r) => `${v110}/${r}?format=csv`),
      ...["site-years", "observations", "responses"].map((r) => `/api/v1/${r}?format=csv`),
      "/api/v1/observations?format=csv&units=kg/ha",
    ];
    for (const url of views) {
      const csv = await get(url).expect(200);
      const link = /^<([^>]+)>; rel="describedby"/.exec(csv.headers.link ?? "");
      expect(link, url).not.toBeNull();
      const schema = (await get(link![1]!).expect(200)).body;
      expect(checkCsvAgainstTableSchema(url, schema, csv.text), url).toEqual([]);
      expect(parseCsv(csv.text).data.length, url).toBeGreaterThan(0);
    }
    // The version's resource schemas describe the Data Package files, whose columns differ from the views'.
    const resourceSchema = (await get(`${v110}/schema`).expect(200)).body;
    const observations = await get(`${v110}/observations?format=csv`).expect(200);
    expect(checkCsvAgainstTableSchema("plots", resourceSchema.resources.plots, observations.text)).not.toEqual([]);
  });
  it("has the JSON rows' columns and values; lines end in CRLF", async () => {
    const csv = await get("/api/v1/responses?format=csv&crop=corn").expect(200);
    const json = responsePage.parse((await get("/api/v1/responses?crop=corn&limit=1000").expect(200)).body);
    const parsed = parseCsv(csv.text);
    expect(parsed.meta.fields).toEqual(Object.keys(json.items[0]!));
    expect(parsed.data).toHaveLength(json.items.length);
    expect(Number(parsed.data[0]!.md)).toBeCloseTo(json.items[0]!.md, 9);
    expect(parsed.data[0]!.nutrients).toBe(json.items[0]!.nutrients.join(";"));
    expect(csv.text.split("\r\n").length).toBe(json.items.length + 2);
    // A negative difference is a number, not text: no quote, no apostrophe.
    expect(json.items.some((r) => r.md < 0)).toBe(true);
    for (const [i, r] of json.items.entries()) if (r.md < 0) expect(parsed.data[i]!.md).toMatch(/^-\d/);
  });
  it("quotes per RFC 4180 and neutralises cells that a spreadsheet would run as formulas", async () => {
    const sitesCsv = (await get(`${v110}/sites?format=csv`).expect(200)).text;
    expect(sitesCsv).toContain('"Tallgrass ""A"", silt loam"');
    const sites = parseCsv(sitesCsv).data;
    expect(sites.map((s) => s.location)).toEqual(expect.arrayContaining(["'=Prairie County", "'+Cedar grid 14"]));
    const treatments = parseCsv((await get(`${v110}/treatments?format=csv`).expect(200)).text).data;
    expect(treatments.map((r) => r.name)).toEqual(expect.arrayContaining(["'@In-furrow 10-34-0", "'-Broadcast MAP"]));
    const siteYears = parseCsv((await get(`${v110}/site-years?format=csv`).expect(200)).text).data;
    expect(siteYears.filter((r) => r.variety === "'-MG 2.4 line").length).toBeGreaterThan(0);
    expect(siteYears[0]).toHaveProperty("soilPClass");
    // JSON keeps the text as it is.
    const json = (await get(`${v110}/sites`).expect(200)).body;
    expect(json.items.map((s: { location: string }) => s.location)).toContain("=Prairie County");
  });
  it("neutralises tab and carriage-return starts as well", () => {
    const line = (value: string | number) => new CsvWriter(["x"]).rows([[value]]);
    expect(line("\tcmd")).toBe("'\tcmd\r\n");
    expect(line("\rx")).toBe('"\'\rx"\r\n');
    expect(line(-3.5)).toBe("-3.5\r\n");
  });
});

describe("caching", () => {
  it("a pinned version's rows: strong ETag, a year's immutable caching, and 304 for a current copy", async () => {
    const first = await get(`${v110}/responses?placement=2x2-band`).expect(200);
    const etag = first.headers.etag as string;
    expect(etag).toMatch(/^"[\w-]+"$/);
    expect(first.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
    const again = await get(`${v110}/responses?placement=2x2-band`).set("If-None-Match", etag).expect(304);
    expect(again.text ?? "").toBe("");
    expect(again.headers.etag).toBe(etag);
  });
  it("the ETag follows the query and the format, but not the order of list values", async () => {
    const a = (await get(`${v110}/responses?placement=2x2-band,in-furrow`).expect(200)).headers.etag;
    const b = (await get(`${v110}/responses?placement=in-furrow,2x2-band`).expect(200)).headers.etag;
    const c = (await get(`${v110}/responses?placement=in-furrow`).expect(200)).headers.etag;
    const d = (await get(`${v110}/responses?placement=in-furrow&format=csv`).expect(200)).headers.etag;
    expect(a).toBe(b);
    expect(new Set([a, c, d]).size).toBe(3);
    await get(`${v110}/responses?placement=in-furrow&format=csv`).set("If-None-Match", d!).expect(304);
  });
  it("latest and cross-dataset reads are cached for a minute; their ETags still give 304s", async () => {
    const latest = await get("/api/v1/datasets/tb-soy-starter-p/versions/latest/observations").expect(200);
    expect(latest.headers["cache-control"]).toBe("public, max-age=60");
    const cross = await get("/api/v1/responses?crop=corn").expect(200);
    expect(cross.headers["cache-control"]).toBe("public, max-age=60");
    await get("/api/v1/responses?crop=corn").set("If-None-Match", cross.headers.etag!).expect(304);
  });
  it("a pinned version's schema is immutable too", async () => {
    const res = await get(`${v110}/schema`).expect(200);
    expect(res.headers["cache-control"]).toContain("immutable");
    await get(`${v110}/schema`).set("If-None-Match", res.headers.etag!).expect(304);
  });
});

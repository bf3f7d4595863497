import { createHash } from "node:crypto";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import type { Express } from "express";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { datasets as datasetsTable, versions as versionsTable } from "@/db/schema";
import { createApp } from "@/server/app";
import { createFakeDataCite, type FakeDataCite } from "@/server/doi/fake-datacite";
import { resourceCsv } from "@/server/services/curation/resource-csv";
import { scriptSafeJson } from "@/server/services/linked-data/dataset-page-head";
import { defaultTableSchema } from "@/datasets/default-table-schema";
import { citableFixture } from "@/tests/support/citable-fixture";
import { DCAT, DCT, SDO, SPDX, expand, id, nodes, value, values, type Expanded } from "@/tests/support/linked-data-expand";
import { testApp, type TestApp } from "@/tests/support/test-app";

let fake: FakeDataCite;
let t: TestApp;
let webDir: string;
let web: Express;
let versionIds: string[];
beforeAll(async () => {
  fake = createFakeDataCite({ user: "PLOTBANK.TEST", password: "fake-secret", prefixes: ["10.80555"] });
  const url = await fake.start();
  t = await testApp({ datacite: { url, user: "PLOTBANK.TEST", password: "fake-secret", prefix: "10.80555" } });
  const f = await citableFixture(t.ctx, "tb-linked");
  await t.ctx.db
    .update(datasetsTable)
    .set({ methods: "RCBD with 4 blocks per site-year; plot combine harvest; yields at 13 % moisture." })
    .where(eq(datasetsTable.id, f.datasetId));
  versionIds = [
    await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2023, 10, 1)), years: [2019, 2021] }),
    await f.publish("1.1.0", { publishedAt: new Date(Date.UTC(2024, 10, 1)), years: [2019, 2023] }),
  ];
  // The same app with a web export to serve: a minimal index.html shaped like Expo's.
  webDir = mkdtempSync(path.join(os.tmpdir(), "plotbank-web-"));
  writeFileSync(
    path.join(webDir, "index.html"),
    '<!DOCTYPE html>\n<html lang="en">\n  <head>\n    <meta charset="utf-8" />\n    <title>Plotbank</title>\n<meta name="description" content="The site description.">\n</head>\n  <body><div id="root"></div></body>\n</html>\n',
  );
  web = createApp({ database: t.database, config: t.ctx.config, webDistDir: webDir }).app;
});
afterAll(async () => {
  await fake.stop();
  await t.close();
  rmSync(webDir, { recursive: true, force: true });
});

describe("the DCAT 3 catalogue", () => {
  it("expands as JSON-LD to a dcat:Catalog whose dcat:dataset entries are the versions, with distributions, theme and contact point", async () => {
    const res = await request(t.app).get("/api/v1/catalog").expect(200);
    expect(res.headers["content-type"]).toBe("application/ld+json; charset=utf-8");
    const [catalog] = await expand(JSON.parse(res.text));
    expect(catalog!["@type"]).toEqual([`${DCAT}Catalog`]);
    expect(catalog!["@id"]).toBe("http://plotbank.test/api/v1/catalog");
    expect(id(catalog!, `${DCAT}themeTaxonomy`)).toBe("http://publications.europa.eu/resource/authority/data-theme");

    // A harvester following dcat:dataset reaches datasets that have files.
    const versions = nodes(catalog!, `${DCAT}dataset`);
    expect(versions.map((v) => v["@id"])).toEqual([
      "http://plotbank.test/datasets/tb-linked?version=1.0.0",
      "http://plotbank.test/datasets/tb-linked?version=1.1.0",
    ]);
    for (const v of versions) {
      expect(v["@type"]).toEqual([`${DCAT}Dataset`]);
      expect(nodes(v, `${DCAT}distribution`).length).toBeGreaterThan(0);
      expect(id(v, `${DCAT}theme`)).toBe("http://publications.europa.eu/resource/authority/data-theme/AGRI");
      const contact = nodes(v, `${DCAT}contactPoint`)[0]!;
      expect(contact["@type"]).toEqual(["http://www.w3.org/2006/vcard/ns#Organization"]);
      expect(value(contact, "http://www.w3.org/2006/vcard/ns#fn")).toBe("Tallgrass Basin Agronomy Network");
      expect(id(contact, "http://www.w3.org/2006/vcard/ns#hasURL")).toBe("http://plotbank.test/datasets/tb-linked");
      expect(id(v, `${DCT}isVersionOf`)).toBe("http://plotbank.test/datasets/tb-linked");
    }
    const [v1, v2] = versions as [Expanded, Expanded];
    expect(versions.map((v) => value(v, `${DCAT}version`))).toEqual(["1.0.0", "1.1.0"]);
    expect(id(v1, `${DCAT}previousVersion`)).toBeUndefined();
    expect(id(v2, `${DCAT}previousVersion`)).toBe(v1["@id"]);
    expect(value(v2, `${DCT}identifier`)).toBe("10.80555/plotbank.tb-linked.v1.1.0");
    expect(values(v2, `${DCT}issued`)[0]).toEqual({ "@value": "2024-11-01", "@type": "http://www.w3.org/2001/XMLSchema#date" });
    const temporal = nodes(v2, `${DCT}temporal`)[0]!;
    expect([value(temporal, `${DCAT}startDate`), value(temporal, `${DCAT}endDate`)]).toEqual(["2019", "2023"]);
    expect(value(nodes(v2, `${DCT}spatial`)[0]!, "http://www.w3.org/2000/01/rdf-schema#label")).toBe(
      "Tallgrass Basin (invented), temperate uplands",
    );

    // The dataset as a whole is a catalogued resource that names its versions (DCAT 3 versioning).
    const [dataset] = nodes(catalog!, `${DCAT}resource`);
    expect(dataset!["@type"]).toEqual([`${DCAT}Dataset`]);
    expect(dataset!["@id"]).toBe("http://plotbank.test/datasets/tb-linked");
    expect(value(dataset!, `${DCT}title`)).toBe("Soybean starter phosphorus placement in the Tallgrass Basin");
    expect(value(dataset!, `${DCT}identifier`)).toBe("10.80555/plotbank.tb-linked");
    expect(id(dataset!, `${DCT}license`)).toBe("https://creativecommons.org/licenses/by/4.0/");
    expect(id(dataset!, `${DCAT}hasCurrentVersion`)).toBe("http://plotbank.test/datasets/tb-linked?version=1.1.0");
    expect(values(dataset!, `${DCAT}hasVersion`).map((v) => v["@id"])).toEqual(versions.map((v) => v["@id"]));
    expect(nodes(nodes(dataset!, `${DCT}publisher`)[0]!, "http://xmlns.com/foaf/0.1/name")[0]!["@value"]).toBe("Plotbank");
  });

  it("lists each version's Data Package and CSVs as distributions, with format, and the exact size and SHA-256 of what each download sends", async () => {
    const [catalog] = await expand(JSON.parse((await request(t.app).get("/api/v1/catalog")).text));
    const v2 = nodes(catalog!, `${DCAT}dataset`)[1]!;
    const distributions = nodes(v2, `${DCAT}distribution`);
    expect(distributions.every((d) => (d["@type"] as string[]).includes(`${DCAT}Distribution`))).toBe(true);
    const base = "http://plotbank.test/api/v1/datasets/tb-linked/versions/1.1.0";
    const expected = [
      [`${base}/datapackage.zip`, "application/zip"],
      ...["sites", "site_years", "soil_tests", "treatments", "plots", "summaries"].map((r) => [`${base}/resources/${r}.csv`, "text/csv"]),
    ];
    expect(
      distributions.map((d) => [
        id(d, `${DCAT}downloadURL`),
        id(d, `${DCAT}mediaType`)?.replace("https://www.iana.org/assignments/media-types/", ""),
      ]),
    ).toEqual(expected);
    expect(
      distributions.map((d) => id(d, `${DCT}format`)?.replace("http://publications.europa.eu/resource/authority/file-type/", "")),
    ).toEqual(["ZIP", "CSV", "CSV", "CSV", "CSV", "CSV", "CSV"]);

    for (const d of distributions) {
      const url = id(d, `${DCAT}downloadURL`)!;
      const download = await request(t.app)
        .get(url.replace("http://plotbank.test", ""))
        .buffer(true)
        .parse((res, done) => {
          const parts: Buffer[] = [];
          res.on("data", (c: Buffer) => parts.push(c));
          res.on("end", () => done(null, Buffer.concat(parts)));
        })
        .expect(200);
      const bytes = download.body as Buffer;
      expect(value(d, `${DCAT}byteSize`), url).toBe(String(bytes.length));
      const checksum = nodes(d, `${SPDX}checksum`)[0]!;
      expect(checksum["@type"]).toEqual([`${SPDX}Checksum`]);
      expect(id(checksum, `${SPDX}algorithm`)).toBe(`${SPDX}checksumAlgorithm_sha256`);
      expect(value(checksum, `${SPDX}checksumValue`), url).toBe(createHash("sha256").update(bytes).digest("hex"));
    }
    // The CSV bytes are the canonical export of the version's rows.
    const sitesCsv = await resourceCsv(t.ctx.db, versionIds[1]!, defaultTableSchema(), "sites");
    expect(sitesCsv.toString("utf8")).toContain("TB-01,Tallgrass County (invented)");
  });
});

describe("schema.org Dataset JSON-LD in the served dataset page", () => {
  const ldOf = (html: string) => {
    const m = /<script type="application\/ld\+json">([\s\S]*?)<\/script>/.exec(html);
    expect(m, "the page carries a JSON-LD script").not.toBeNull();
    return JSON.parse(m![1]!) as Record<string, unknown>;
  };

  it("puts a title, a meta description and the Dataset markup in <head>, without JavaScript", async () => {
    const res = await request(web).get("/datasets/tb-linked").expect(200);
    expect(res.headers["content-type"]).toMatch(/^text\/html/);
    const head = res.text.slice(0, res.text.indexOf("</head>"));
    expect(head).toContain("<title>Soybean starter phosphorus placement in the Tallgrass Basin (version 1.1.0) · Plotbank</title>");
    expect(head).toMatch(/<meta [^>]*name="description" content="Invented demonstration trials: starter P placement/);
    expect(head.match(/name="description"/g), "one description: the dataset's replaces the site's").toHaveLength(1);
    expect(head.match(/<title>/g)).toHaveLength(1);
    expect(head).toContain('<script type="application/ld+json">');
  });

  it("expands to a https://schema.org/Dataset with version, licence, creators, coverage, variables and downloads", async () => {
    const res = await request(web).get("/datasets/tb-linked").expect(200);
    const [d] = await expand(ldOf(res.text));
    expect(d!["@type"]).toEqual([`${SDO}Dataset`]);
    expect(value(d!, `${SDO}name`)).toBe("Soybean starter phosphorus placement in the Tallgrass Basin");
    expect(value(d!, `${SDO}version`)).toBe("1.1.0");
    expect(id(d!, `${SDO}license`)).toBe("https://creativecommons.org/licenses/by/4.0/");
    expect(id(d!, `${SDO}url`)).toBe("http://plotbank.test/datasets/tb-linked");
    // The unversioned page is the dataset as a whole: the concept DOI, never a version's.
    expect(id(d!, `${SDO}sameAs`)).toBe("https://doi.org/10.80555/plotbank.tb-linked");
    expect(value(d!, `${SDO}identifier`)).toBe("https://doi.org/10.80555/plotbank.tb-linked");
    const current = nodes(d!, `${SDO}hasPart`)[0]!;
    expect(current["@id"]).toBe("http://plotbank.test/datasets/tb-linked?version=1.1.0");
    expect(value(current, `${SDO}identifier`)).toBe("https://doi.org/10.80555/plotbank.tb-linked.v1.1.0");
    expect(value(current, `${SDO}version`)).toBe("1.1.0");
    const catalog = nodes(d!, `${SDO}includedInDataCatalog`)[0]!;
    expect(catalog["@type"]).toEqual([`${SDO}DataCatalog`]);
    expect(catalog["@id"]).toBe("http://plotbank.test/api/v1/catalog");
    expect(nodes(d!, `${SDO}funder`).map((f) => [f["@type"], value(f, `${SDO}name`)])).toEqual([
      [[`${SDO}Organization`], "Basin Soil Fund"],
    ]);
    expect(value(d!, `${SDO}measurementTechnique`)).toBe(
      "RCBD with 4 blocks per site-year; plot combine harvest; yields at 13 % moisture.",
    );
    expect(value(d!, `${SDO}temporalCoverage`)).toBe("2019/2023");
    const place = nodes(d!, `${SDO}spatialCoverage`)[0]!;
    expect(place["@type"]).toEqual([`${SDO}Place`]);
    expect(value(place, `${SDO}name`)).toBe("Tallgrass Basin (invented), temperate uplands");

    const creators = nodes(d!, `${SDO}creator`);
    expect(creators.map((c) => [c["@type"], value(c, `${SDO}name`)])).toEqual([
      [[`${SDO}Person`], "Marta Quillon"],
      [[`${SDO}Organization`], "Tallgrass Basin Agronomy Network"],
    ]);

    const variables = nodes(d!, `${SDO}variableMeasured`);
    expect(variables.every((v) => (v["@type"] as string[])[0] === `${SDO}PropertyValue`)).toBe(true);
    const yieldVar = variables.find((v) => value(v, `${SDO}propertyID`) === "yield_kg_ha")!;
    expect(value(yieldVar, `${SDO}unitText`)).toBe("kg/ha");
    // Every variable the data dictionary gives a unit is listed, with that unit.
    const withUnits = Object.values(defaultTableSchema().resources).flatMap((r) => r!.fields.filter((f) => f.unit));
    expect(new Set(variables.map((v) => value(v, `${SDO}propertyID`)))).toEqual(new Set(withUnits.map((f) => f.name)));

    const downloads = nodes(d!, `${SDO}distribution`);
    expect(downloads.every((x) => (x["@type"] as string[])[0] === `${SDO}DataDownload`)).toBe(true);
    expect(downloads.map((x) => [value(x, `${SDO}encodingFormat`), id(x, `${SDO}contentUrl`)])).toContainEqual([
      "application/zip",
      "http://plotbank.test/api/v1/datasets/tb-linked/versions/1.1.0/datapackage.zip",
    ]);
  });

  it("?version= describes that version: its own @id and page, its coverage and DOI, and a link to the dataset as a whole", async () => {
    const res = await request(web).get("/datasets/tb-linked?version=1.0.0").expect(200);
    const head = res.text.slice(0, res.text.indexOf("</head>"));
    expect(head).toContain("<title>Soybean starter phosphorus placement in the Tallgrass Basin (version 1.0.0) · Plotbank</title>");
    expect(head).toContain('<link rel="canonical" href="http://plotbank.test/datasets/tb-linked?version=1.0.0" />');
    const [d] = await expand(ldOf(res.text));
    expect(d!["@id"]).toBe("http://plotbank.test/datasets/tb-linked?version=1.0.0");
    expect(value(d!, `${SDO}version`)).toBe("1.0.0");
    expect(value(d!, `${SDO}temporalCoverage`)).toBe("2019/2021");
    expect(value(d!, `${SDO}identifier`)).toBe("https://doi.org/10.80555/plotbank.tb-linked.v1.0.0");
    expect(nodes(d!, `${SDO}includedInDataCatalog`)[0]!["@id"]).toBe("http://plotbank.test/api/v1/catalog");
    expect(value(d!, `${SDO}datePublished`)).toBe("2023-11-01");
    const downloads = nodes(d!, `${SDO}distribution`).map((x) => id(x, `${SDO}contentUrl`));
    expect(id(d!, `${SDO}url`)).toBe("http://plotbank.test/datasets/tb-linked?version=1.0.0");
    expect(downloads).toContain("http://plotbank.test/api/v1/datasets/tb-linked/versions/1.0.0/datapackage.zip");
    expect(downloads.some((u) => String(u).includes("/versions/1.1.0/"))).toBe(false);
    const whole = nodes(d!, `${SDO}isPartOf`)[0]!;
    expect(whole["@id"]).toBe("http://plotbank.test/datasets/tb-linked");
    expect(value(whole, `${SDO}name`)).toBe("Soybean starter phosphorus placement in the Tallgrass Basin");

    // Without ?version= (or with `latest`, or a version that does not exist) the page describes the current version.
    for (const path of ["/datasets/tb-linked", "/datasets/tb-linked?version=latest", "/datasets/tb-linked?version=9.9.9"]) {
      const [current] = await expand(ldOf((await request(web).get(path).expect(200)).text));
      expect([current!["@id"], value(current!, `${SDO}version`)], path).toEqual(["http://plotbank.test/datasets/tb-linked", "1.1.0"]);
    }
  });

  it("a withdrawn version's page carries its tombstone: the reason, no downloads, and its DOI", async () => {
    const f = await citableFixture(t.ctx, "tb-linked-withdrawn");
    const id = await f.publish("1.0.0");
    await f.publish("1.1.0");
    await t.ctx.db
      .update(versionsTable)
      .set({ state: "withdrawn", withdrawnReason: "Yields at TB-01 were in bu/ac", withdrawnAt: new Date() })
      .where(eq(versionsTable.id, id));
    const res = await request(web).get("/datasets/tb-linked-withdrawn?version=1.0.0").expect(200);
    expect(res.text).toContain(
      "<title>Soybean starter phosphorus placement in the Tallgrass Basin (version 1.0.0, withdrawn) · Plotbank</title>",
    );
    const [d] = await expand(ldOf(res.text));
    expect(d!["@id"]).toBe("http://plotbank.test/datasets/tb-linked-withdrawn?version=1.0.0");
    expect(value(d!, `${SDO}creativeWorkStatus`)).toBe("Withdrawn");
    expect(value(d!, `${SDO}description`)).toMatch(/^Withdrawn: Yields at TB-01 were in bu\/ac\./);
    expect(nodes(d!, `${SDO}distribution`)).toEqual([]);
    expect(value(d!, `${SDO}identifier`)).toBe("https://doi.org/10.80555/plotbank.tb-linked-withdrawn.v1.0.0");
  });

  it("names the schema.org context, and a licence without a known deed URL as a CreativeWork rather than a bare IRI", async () => {
    const f = await citableFixture(t.ctx, "tb-linked-own-licence");
    await t.ctx.db.update(datasetsTable).set({ licence: "LicenseRef-basin-data-1.0" }).where(eq(datasetsTable.id, f.datasetId));
    await f.publish("1.0.0");
    const ld = ldOf((await request(web).get("/datasets/tb-linked-own-licence").expect(200)).text);
    expect(ld["@context"]).toBe("https://schema.org");
    const [d] = await expand(ld);
    const licence = nodes(d!, `${SDO}license`)[0]!;
    expect(licence["@type"]).toEqual([`${SDO}CreativeWork`]);
    expect(value(licence, `${SDO}name`)).toBe("LicenseRef-basin-data-1.0");
  });

  it("escapes markup inside the JSON so no value can close the script element", async () => {
    const hostile = { name: "</script><script>alert(1)</script> & <!-- \u2028" };
    const safe = scriptSafeJson(hostile);
    expect(safe.toLowerCase()).not.toContain("</script");
    expect(safe).not.toContain("<!--");
    expect(JSON.parse(safe)).toEqual(hostile);

    const f = await citableFixture(t.ctx, "tb-hostile-title");
    await t.ctx.db.execute(
      // Written past the API's own validation, as a stored value could be.
      (await import("drizzle-orm"))
        .sql`UPDATE datasets SET description = ${"Ends early? </SCRIPT><img src=x onerror=alert(1)>"} WHERE id = ${f.datasetId}`,
    );
    await f.publish("1.0.0");
    const res = await request(web).get("/datasets/tb-hostile-title").expect(200);
    expect(res.text.match(/<\/script>/gi)).toHaveLength(1);
    expect(res.text).not.toContain("<img");
    expect(ldOf(res.text).description).toBe("Ends early? </SCRIPT><img src=x onerror=alert(1)>");
  });

  it("other pages are served unchanged; a dataset with nothing published gets the app without markup, as a 404", async () => {
    const plain = await request(web).get("/datasets").expect(200);
    expect(plain.text).toContain("<title>Plotbank</title>");
    expect(plain.text).not.toContain("application/ld+json");
    const unknown = await request(web).get("/datasets/not-published-anywhere").expect(404);
    expect(unknown.text).not.toContain("application/ld+json");
  });
});

import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { Cite } from "@citation-js/core";
import "@citation-js/plugin-bibtex";
import "@citation-js/plugin-ris";
import { parse as parseBibtex } from "@retorquere/bibtex-parser";
import type { Express } from "express";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seedDemo } from "@/datasets";
import { createApp } from "@/server/app";
import { createFakeDataCite, type FakeDataCite } from "@/server/doi/fake-datacite";
import { drainDoiQueue } from "@/server/services/citation/doi-queue";
import { retryPendingDois } from "@/server/services/citation/doi-registration";
import { checkDataPackage } from "@/tests/support/data-package-check";
import { DCAT, DCT, SDO, VCARD, expand, id, jsonLdOfPage, nodes, value, values } from "@/tests/support/linked-data-expand";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { binary, unzip } from "@/tests/support/zip";

/**
 * The independent validators run over the demo as a data user meets it: every published version of the Tallgrass
 * Basin demo, as `npm start` loads it. (Each validator also runs on a freshly published test version in the tests of
 * its feature: curation-exports, citable-citation, citable-linked-data, citable-doi.)
 */

let fake: FakeDataCite;
let t: TestApp;
let web: Express;
let webDir: string;
let published: { slug: string; semver: string }[];
/** What each demo dataset says about its funding and methods (not every one names a funder). */
let about: Map<string, { funding: string | null; methods: string | null }>;
beforeAll(async () => {
  fake = createFakeDataCite({ user: "PLOTBANK.TEST", password: "fake-secret", prefixes: ["10.80555"] });
  const url = await fake.start();
  // A data user's tool reads hundreds of files here; the anonymous quota is not what is being tested.
  t = await testApp({
    anonRatePerMinute: 1_000_000,
    datacite: { url, user: "PLOTBANK.TEST", password: "fake-secret", prefix: "10.80555" },
  });
  await seedDemo(t.ctx);
  await drainDoiQueue(t.ctx);
  // On a busy machine a registration can time out while the demo loads; later passes send those again.
  for (let pass = 0; pass < 3; pass++)
    if ((await retryPendingDois(t.ctx, { now: new Date(Date.now() + (pass + 1) * 3_600_000) })).pending === 0) break;
  const datasets = (await request(t.app).get("/api/v1/datasets").expect(200)).body.items as { slug: string }[];
  published = [];
  about = new Map();
  for (const d of datasets) {
    const detail = (await request(t.app).get(`/api/v1/datasets/${d.slug}`).expect(200)).body as {
      funding: string | null;
      methods: string | null;
    };
    about.set(d.slug, detail);
    const versions = (await request(t.app).get(`/api/v1/datasets/${d.slug}/versions`).expect(200)).body.items as {
      semver: string;
      state: string;
    }[];
    for (const v of versions) if (v.state === "published") published.push({ slug: d.slug, semver: v.semver });
  }
  webDir = mkdtempSync(path.join(os.tmpdir(), "plotbank-web-"));
  writeFileSync(
    path.join(webDir, "index.html"),
    '<!DOCTYPE html>\n<html lang="en">\n  <head>\n    <meta charset="utf-8" />\n    <title>Plotbank</title>\n</head>\n  <body><div id="root"></div></body>\n</html>\n',
  );
  web = createApp({ database: t.database, config: t.ctx.config, webDistDir: webDir }).app;
}, 180_000);
afterAll(async () => {
  await fake.stop();
  await t.close();
  rmSync(webDir, { recursive: true, force: true });
});

const bytes = async (url: string) => {
  const res = await request(t.app).get(url).buffer(true).parse(binary);
  expect(res.status, url).toBe(200);
  return res.body as Buffer;
};

describe("the demo's published versions", () => {
  it("are at least seven, across three datasets", () => {
    expect(published.length).toBeGreaterThanOrEqual(7);
    expect(new Set(published.map((p) => p.slug)).size).toBe(3);
  });

  it("each is a valid Data Package, in the zip and from the standalone descriptor's URL (profiles, hashes, sizes, tables, foreign keys)", async () => {
    for (const { slug, semver } of published) {
      const base = `/api/v1/datasets/${slug}/versions/${semver}`;
      const files = unzip(await bytes(`${base}/datapackage.zip`));
      const inZip = JSON.parse(files.get("datapackage.json")!.toString("utf8"));
      expect(await checkDataPackage(inZip, async (p) => files.get(p) ?? Buffer.alloc(0)), `${slug}@${semver} zip`).toEqual([]);
      const standalone = (await request(t.app).get(`${base}/datapackage.json`).expect(200)).body;
      const problems = await checkDataPackage(standalone, (p) =>
        bytes(new URL(p, `http://plotbank.test${base}/datapackage.json`).pathname),
      );
      expect(problems, `${slug}@${semver} datapackage.json`).toEqual([]);
      // The /schema answer names the same resources as the package.
      const schema = (await request(t.app).get(`${base}/schema`).expect(200)).body;
      expect(Object.keys(schema.resources).sort()).toEqual(standalone.resources.map((r: { name: string }) => r.name).sort());
    }
  });

  it("each one's citations read back with independent parsers, field by field the CSL-JSON record; BibTeX keys are all different", async () => {
    const keys: string[] = [];
    for (const { slug, semver } of published) {
      const base = `/api/v1/datasets/${slug}/versions/${semver}/citation?format=`;
      const [csl] = JSON.parse((await request(t.app).get(`${base}csl-json`).expect(200)).text) as Record<string, unknown>[];
      const where = `${slug}@${semver}`;
      expect(csl!.DOI, where).toBeTruthy();

      const bib = (await request(t.app).get(`${base}bibtex`).expect(200)).text;
      const library = parseBibtex(bib, { sentenceCase: false });
      expect(library.errors, where).toEqual([]);
      const entry = library.entries[0]!;
      expect(entry.type, where).toBe("dataset");
      expect([entry.fields.title, entry.fields.doi, entry.fields.url, entry.fields.version], where).toEqual([
        csl!.title,
        csl!.DOI,
        csl!.URL,
        csl!.version,
      ]);
      keys.push(entry.key);
      const [fromBib] = new Cite(bib).data as Record<string, unknown>[];
      expect(fromBib, where).toMatchObject({
        type: "dataset",
        title: csl!.title,
        DOI: csl!.DOI,
        URL: csl!.URL,
        version: csl!.version,
        publisher: csl!.publisher,
        issued: csl!.issued,
      });

      const ris = (await request(t.app).get(`${base}ris`).expect(200)).text;
      for (const line of ris.trimEnd().split("\n")) expect(line, where).toMatch(/^[A-Z][A-Z0-9] {2}-( |$)/);
      const [fromRis] = new Cite(ris).data as Record<string, unknown>[];
      expect(fromRis, where).toMatchObject({
        type: "dataset",
        title: csl!.title,
        DOI: csl!.DOI,
        URL: csl!.URL,
        version: csl!.version,
        publisher: csl!.publisher,
      });
    }
    expect(new Set(keys).size).toBe(published.length);
  });

  it("the DCAT catalogue leads harvesters from dcat:dataset to every published version, each with distributions, format, theme and contact point", async () => {
    const [catalog] = await expand(JSON.parse((await request(t.app).get("/api/v1/catalog").expect(200)).text));
    const versions = nodes(catalog!, `${DCAT}dataset`);
    expect(versions.map((v) => v["@id"]).sort()).toEqual(
      published.map((p) => `http://plotbank.test/datasets/${p.slug}?version=${p.semver}`).sort(),
    );
    for (const v of versions) {
      const where = String(v["@id"]);
      expect(v["@type"], where).toEqual([`${DCAT}Dataset`]);
      const distributions = nodes(v, `${DCAT}distribution`);
      expect(distributions.length, where).toBe(7);
      for (const d of distributions) {
        expect(d["@type"], where).toEqual([`${DCAT}Distribution`]);
        expect(id(d, `${DCT}format`), where).toMatch(/^http:\/\/publications\.europa\.eu\/resource\/authority\/file-type\/(ZIP|CSV)$/);
        expect(id(d, `${DCAT}mediaType`), where).toMatch(/^https:\/\/www\.iana\.org\/assignments\/media-types\//);
        expect(Number(value(d, `${DCAT}byteSize`)), where).toBeGreaterThan(0);
      }
      expect(id(v, `${DCAT}theme`), where).toBe("http://publications.europa.eu/resource/authority/data-theme/AGRI");
      const contact = nodes(v, `${DCAT}contactPoint`)[0]!;
      expect(value(contact, `${VCARD}fn`), where).toBeTruthy();
      expect(id(contact, `${VCARD}hasURL`), where).toMatch(/^http:\/\/plotbank\.test\/datasets\//);
      expect(value(v, `${DCT}identifier`), where).toMatch(/^10\.80555\//);
    }
    const concepts = nodes(catalog!, `${DCAT}resource`);
    expect(concepts).toHaveLength(3);
    for (const c of concepts) {
      const mine = versions.filter((v) => id(v, `${DCT}isVersionOf`) === c["@id"]).map((v) => v["@id"]);
      expect(values(c, `${DCAT}hasVersion`).map((v) => v["@id"])).toEqual(mine);
      expect(mine).toContain(id(c, `${DCAT}hasCurrentVersion`));
    }
  });

  it("schema.org markup of each dataset page and version page: catalogue, funder, methods, and the right DOI for each", async () => {
    for (const slug of new Set(published.map((p) => p.slug))) {
      const [whole] = await expand(jsonLdOfPage((await request(web).get(`/datasets/${slug}`).expect(200)).text));
      expect(whole!["@type"]).toEqual([`${SDO}Dataset`]);
      expect(nodes(whole!, `${SDO}includedInDataCatalog`)[0]!["@type"]).toEqual([`${SDO}DataCatalog`]);
      const { funding, methods } = about.get(slug)!;
      expect(
        nodes(whole!, `${SDO}funder`).map((f) => value(f, `${SDO}name`)),
        slug,
      ).toEqual(funding ? [funding] : []);
      expect(methods, slug).toBeTruthy();
      expect(value(whole!, `${SDO}measurementTechnique`), slug).toBe(methods);
      // The dataset as a whole is identified by its concept DOI, not by one of its versions'.
      expect(value(whole!, `${SDO}identifier`), slug).toBe(`https://doi.org/10.80555/plotbank.${slug}`);
      for (const { semver } of published.filter((p) => p.slug === slug)) {
        const [one] = await expand(jsonLdOfPage((await request(web).get(`/datasets/${slug}?version=${semver}`).expect(200)).text));
        expect(value(one!, `${SDO}identifier`), `${slug}@${semver}`).toBe(`https://doi.org/10.80555/plotbank.${slug}.v${semver}`);
        expect(nodes(one!, `${SDO}includedInDataCatalog`)).toHaveLength(1);
        expect(nodes(one!, `${SDO}isPartOf`)[0]!["@id"]).toBe(`http://plotbank.test/datasets/${slug}`);
      }
    }
  });

  it("each version's DataCite record carries the dataset's funding, methods and contributors", () => {
    expect([...about.values()].some((d) => d.funding)).toBe(true);
    for (const { slug, semver } of published) {
      const record = fake.records.get(`10.80555/plotbank.${slug}.v${semver}`);
      expect(record, `${slug}@${semver}`).toBeDefined();
      const { funding, methods } = about.get(slug)!;
      expect(record!.fundingReferences ?? [], `${slug}@${semver}`).toEqual(funding ? [{ funderName: funding }] : []);
      expect(record!.descriptions, `${slug}@${semver}`).toContainEqual({ description: methods, descriptionType: "Methods" });
      expect(record!.contributors?.map((c) => c.contributorType)).toContain("DataCurator");
    }
  });
});

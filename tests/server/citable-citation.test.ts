import { Cite } from "@citation-js/core";
// The parsers that read the formats back.
import "@citation-js/plugin-bibtex";
import "@citation-js/plugin-ris";
import { parse as parseBibtex } from "@retorquere/bibtex-parser";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { defaultTableSchema } from "@/datasets/default-table-schema";
import { versions } from "@/db/schema";
import { createFakeDataCite, type FakeDataCite } from "@/server/doi/fake-datacite";
import { citableFixture } from "@/tests/support/citable-fixture";
import { testApp, type TestApp } from "@/tests/support/test-app";

let fake: FakeDataCite;
let t: TestApp;
beforeAll(async () => {
  fake = createFakeDataCite({ user: "PLOTBANK.TEST", password: "fake-secret", prefixes: ["10.80555"] });
  const url = await fake.start();
  t = await testApp({ datacite: { url, user: "PLOTBANK.TEST", password: "fake-secret", prefix: "10.80555" } });
  const f = await citableFixture(t.ctx, "tb-starter-p");
  await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2024, 4, 2, 9)) });
  await f.publish("1.1.0", { publishedAt: new Date(Date.UTC(2025, 2, 14, 9)) });
});
afterAll(async () => {
  await fake.stop();
  await t.close();
});

const base = "/api/v1/datasets/tb-starter-p/versions";
const doi = "10.80555/plotbank.tb-starter-p.v1.1.0";

describe("citation formats of a published version", () => {
  it("plain text in APA style, with the registered DOI", async () => {
    const res = await request(t.app).get(`${base}/1.1.0/citation?format=text`).expect(200);
    expect(res.headers["content-type"]).toBe("text/plain; charset=utf-8");
    // APA 7 dataset pattern: Author. (Year). Title (Version x) [Dataset]. Publisher. DOI URL.
    expect(res.text).toBe(
      "Quillon, M. & Tallgrass Basin Agronomy Network. (2025). Soybean starter phosphorus placement in the Tallgrass Basin " +
        `(Version 1.1.0) [Dataset]. Plotbank. https://doi.org/${doi}\n`,
    );
    // Plain text is the default.
    expect((await request(t.app).get(`${base}/1.1.0/citation`).expect(200)).text).toBe(res.text);
  });

  it("BibTeX as a biblatex @dataset that two independent parsers read back as a dataset, with the same fields", async () => {
    const res = await request(t.app).get(`${base}/1.1.0/citation?format=bibtex`).expect(200);
    expect(res.headers["content-type"]).toBe("application/x-bibtex; charset=utf-8");
    expect(res.headers["content-disposition"]).toBe('inline; filename="tb-starter-p-v1.1.0.bib"');
    expect(res.text).toBe(
      [
        "@dataset{tb_starter_p_v1_1_0,",
        "\tauthor = {Quillon, Marta and {Tallgrass Basin Agronomy Network}},",
        `\tdoi = {${doi}},`,
        "\tdate = {2025-03-14},",
        "\tkeywords = {soybean,phosphorus,starter fertilizer},",
        "\tpublisher = {Plotbank},",
        "\ttitle = {Soybean starter phosphorus placement in the {Tallgrass} {Basin}},",
        "\turl = {http://plotbank.test/datasets/tb-starter-p?version=1.1.0},",
        "\tversion = {1.1.0},",
        "}",
        "",
      ].join("\n"),
    );
    // Read back by an independent BibTeX parser (the one Better BibTeX for Zotero uses), not only by the library
    // that wrote it: the braces keep the group author one name and the title's capitals as written.
    const library = parseBibtex(res.text, { sentenceCase: false });
    expect(library.errors).toEqual([]);
    expect(library.entries).toHaveLength(1);
    expect(library.entries[0]).toMatchObject({
      type: "dataset",
      key: "tb_starter_p_v1_1_0",
      fields: {
        author: [{ lastName: "Quillon", firstName: "Marta" }, { name: "Tallgrass Basin Agronomy Network" }],
        doi,
        date: "2025-03-14",
        version: "1.1.0",
        publisher: ["Plotbank"],
        title: "Soybean starter phosphorus placement in the Tallgrass Basin",
        url: "http://plotbank.test/datasets/tb-starter-p?version=1.1.0",
      },
    });
    const [parsed] = new Cite(res.text).data as Record<string, unknown>[];
    expect(parsed).toMatchObject({
      type: "dataset",
      "citation-key": "tb_starter_p_v1_1_0",
      title: "Soybean starter phosphorus placement in the Tallgrass Basin",
      author: [{ family: "Quillon", given: "Marta" }, { family: "Tallgrass Basin Agronomy Network" }],
      DOI: doi,
      publisher: "Plotbank",
      issued: { "date-parts": [[2025, 3, 14]] },
      version: "1.1.0",
      URL: "http://plotbank.test/datasets/tb-starter-p?version=1.1.0",
    });
  });

  it("BibTeX keys are unique per dataset and version, so citations of several share one .bib file", async () => {
    const other = await citableFixture(t.ctx, "tb-starter-p-second");
    await other.publish("1.1.0", { publishedAt: new Date(Date.UTC(2025, 2, 14, 9)) });
    const entries = [];
    for (const url of [
      `${base}/1.0.0/citation?format=bibtex`,
      `${base}/1.1.0/citation?format=bibtex`,
      "/api/v1/datasets/tb-starter-p-second/versions/1.1.0/citation?format=bibtex",
    ]) {
      entries.push((await request(t.app).get(url).expect(200)).text);
    }
    const library = parseBibtex(entries.join("\n"), { sentenceCase: false });
    expect(library.errors).toEqual([]);
    expect(library.entries.map((e) => e.key)).toEqual(["tb_starter_p_v1_0_0", "tb_starter_p_v1_1_0", "tb_starter_p_second_v1_1_0"]);
    expect(library.entries.map((e) => e.type)).toEqual(["dataset", "dataset", "dataset"]);
    // citation-js reads the same file as three datasets with three keys.
    const parsed = new Cite(entries.join("\n")).data as Record<string, unknown>[];
    expect(parsed.map((p) => [p.type, p["citation-key"], p.version])).toEqual([
      ["dataset", "tb_starter_p_v1_0_0", "1.0.0"],
      ["dataset", "tb_starter_p_v1_1_0", "1.1.0"],
      ["dataset", "tb_starter_p_second_v1_1_0", "1.1.0"],
    ]);
  });

  it("RIS with the dataset type, each author on a line, and an end-of-record tag", async () => {
    const res = await request(t.app).get(`${base}/1.1.0/citation?format=ris`).expect(200);
    expect(res.headers["content-type"]).toBe("application/x-research-info-systems; charset=utf-8");
    expect(res.text).toBe(
      [
        "TY  - DATA",
        "AU  - Quillon, Marta",
        "AU  - Tallgrass Basin Agronomy Network",
        "DA  - 2025/3/14/",
        "PY  - 2025",
        `DO  - ${doi}`,
        "ET  - 1.1.0",
        "ID  - tb-starter-p-v1.1.0",
        "KW  - soybean",
        "KW  - phosphorus",
        "KW  - starter fertilizer",
        "PB  - Plotbank",
        "TI  - Soybean starter phosphorus placement in the Tallgrass Basin",
        "UR  - http://plotbank.test/datasets/tb-starter-p?version=1.1.0",
        "ER  -",
        "",
      ].join("\n"),
    );
    // Read back with citation-js's RIS input: the same record.
    const [parsed] = new Cite(res.text).data as Record<string, unknown>[];
    expect(parsed).toMatchObject({ type: "dataset", DOI: doi, version: "1.1.0", publisher: "Plotbank" });
  });

  it("RIS never wraps a value: a long URL and title stay on their line and read back whole", async () => {
    const slug = "tallgrass-basin-soybean-starter-phosphorus-placement-long-term";
    const long = await citableFixture(t.ctx, slug);
    await long.publish("12.10.3");
    const res = await request(t.app).get(`/api/v1/datasets/${slug}/versions/12.10.3/citation?format=ris`).expect(200);
    const url = `http://plotbank.test/datasets/${slug}?version=12.10.3`;
    expect(url.length).toBeGreaterThan(70);
    // Every line of a RIS record is a tag line (RIS readers take any other line for a continuation).
    for (const line of res.text.trimEnd().split("\n")) expect(line).toMatch(/^[A-Z][A-Z0-9] {2}-( |$)/);
    expect(res.text).toContain(`UR  - ${url}\n`);
    const [parsed] = new Cite(res.text).data as Record<string, unknown>[];
    expect(parsed).toMatchObject({
      type: "dataset",
      URL: url,
      version: "12.10.3",
      title: "Soybean starter phosphorus placement in the Tallgrass Basin",
    });
  });

  it("CSL-JSON, the record the other formats render from", async () => {
    const res = await request(t.app).get(`${base}/1.1.0/citation?format=csl-json`).expect(200);
    expect(res.headers["content-type"]).toBe("application/vnd.citationstyles.csl+json; charset=utf-8");
    expect(JSON.parse(res.text)).toEqual([
      {
        id: "tb-starter-p-v1.1.0",
        type: "dataset",
        title: "Soybean starter phosphorus placement in the Tallgrass Basin",
        author: [{ family: "Quillon", given: "Marta" }, { literal: "Tallgrass Basin Agronomy Network" }],
        publisher: "Plotbank",
        issued: { "date-parts": [[2025, 3, 14]] },
        version: "1.1.0",
        DOI: doi,
        URL: "http://plotbank.test/datasets/tb-starter-p?version=1.1.0",
        abstract:
          "Invented demonstration trials: starter P placement (check, in-furrow, 2x2 band, broadcast) on soybean across soil-test P classes.",
        license: "CC-BY-4.0",
        keyword: "soybean,phosphorus,starter fertilizer",
      },
    ]);
  });

  it("`latest` names the newest published version; each version keeps its own year", async () => {
    const latest = await request(t.app).get(`${base}/latest/citation`).expect(200);
    expect(latest.text).toContain("(Version 1.1.0)");
    const first = await request(t.app).get(`${base}/1.0.0/citation`).expect(200);
    expect(first.text).toContain("(2024). Soybean starter phosphorus placement in the Tallgrass Basin (Version 1.0.0) [Dataset]");
  });
});

describe("citations of a version still waiting for its DOI", () => {
  it("point at the version's stable page instead of an unregistered DOI", async () => {
    const f = await citableFixture(t.ctx, "tb-no-doi-yet");
    await fake.stop();
    await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2025, 5, 1)) });
    await fake.start();
    const text = await request(t.app).get("/api/v1/datasets/tb-no-doi-yet/versions/1.0.0/citation").expect(200);
    expect(text.text).toMatch(/\[Dataset\]\. Plotbank\. http:\/\/plotbank\.test\/datasets\/tb-no-doi-yet\?version=1\.0\.0\n$/);
    expect(text.text).not.toContain("doi.org");
    const csl = JSON.parse((await request(t.app).get("/api/v1/datasets/tb-no-doi-yet/versions/1.0.0/citation?format=csl-json")).text);
    expect(csl[0].DOI).toBeUndefined();
  });
});

describe("bad citation requests", () => {
  it("an unknown format is a 400 naming the parameter", async () => {
    const res = await request(t.app).get(`${base}/1.1.0/citation?format=endnote`).expect(400);
    expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
    expect(res.body.errors[0].field).toBe("query.format");
  });
  it("an unknown version or dataset is a 404 problem saying which", async () => {
    const v = await request(t.app).get(`${base}/9.9.9/citation`).expect(404);
    expect(v.body.detail).toContain("9.9.9");
    const d = await request(t.app).get("/api/v1/datasets/no-such-dataset/versions/1.0.0/citation").expect(404);
    expect(d.body.detail).toContain("no-such-dataset");
  });
  it("a draft is not citable", async () => {
    const f = await citableFixture(t.ctx, "tb-draft-only");
    await t.ctx.db
      .insert(versions)
      .values({ datasetId: f.datasetId, semver: "1.0.0", createdBy: f.ownerId, tableSchema: defaultTableSchema() });
    await request(t.app).get("/api/v1/datasets/tb-draft-only/versions/1.0.0/citation").expect(404);
  });
});

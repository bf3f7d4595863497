/**
 * Every CSV the product writes goes through the one writer (server/csv.ts): CRLF after every record, UTF-8 without a
 * byte-order mark, and the formula guard on text cells. One test per output, on a version published over HTTP whose
 * sites hold formula-like text.
 */
import { createHash } from "node:crypto";
import express from "express";
import http from "node:http";
import type { AddressInfo } from "node:net";
import Papa from "papaparse";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { streamCsv } from "@/server/csv";
import { draftWithData, plotsCsv, upload, type Fixture } from "@/tests/server/curation-fixtures";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { binary, unzip } from "@/tests/support/zip";

const hostileSites =
  "site,location,soil_series,soil_texture\r\n" +
  'TB-01,"=HYPERLINK(""http://evil.test"",""open"")",@SUM(1+1),silt loam\r\n' +
  "TB-02,+1+1 County,-Marrow,clay loam\r\n";

let t: TestApp;
let f: Fixture;
let base: string;
beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000 });
  f = await draftWithData(t.app, t.ctx);
  const replaced = await upload(f.curatorAgent, f.versionId, "sites", hostileSites, { mode: "replace" });
  expect(replaced.status, JSON.stringify(replaced.body).slice(0, 500)).toBe(201);
  await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
  await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
  base = `/api/v1/datasets/${f.slug}/versions/1.0.0`;
});
afterAll(() => t.close());

/** The file is CRLF-terminated UTF-8 without a BOM, and has no bare LF. */
function expectCsvFraming(bytes: Buffer | string) {
  const buf = Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes, "utf8");
  expect(buf.subarray(0, 3).equals(Buffer.from([0xef, 0xbb, 0xbf])), "no byte-order mark").toBe(false);
  const text = buf.toString("utf8");
  expect(text.endsWith("\r\n"), "the last record ends with CRLF").toBe(true);
  expect(/[^\r]\n/.test(text), "no bare LF").toBe(false);
}

const rowsOf = (text: string) => Papa.parse<string[]>(text.trimEnd(), { newline: "\r\n" }).data;

describe("one CSV writer for every output", () => {
  it("a resource CSV guards formula-like text cells, frames with CRLF, and its Data Package field notes name the guarded fields", async () => {
    const res = await request(t.app).get(`${base}/resources/sites.csv`).buffer(true).parse(binary).expect(200);
    const csv = res.body as Buffer;
    expectCsvFraming(csv);
    const rows = rowsOf(csv.toString("utf8"));
    expect(rows[1]).toEqual(["TB-01", `'=HYPERLINK("http://evil.test","open")`, "'@SUM(1+1)", "silt loam"]);
    expect(rows[2]).toEqual(["TB-02", "'+1+1 County", "'-Marrow", "clay loam"]);
    const dp = (await request(t.app).get(`${base}/datapackage.json`).expect(200)).body;
    // The standalone descriptor names each file by the URL that serves it.
    const sites = dp.resources.find((r: { name: string }) => r.name === "sites");
    expect(sites.bytes).toBe(csv.length);
    expect(sites.hash).toBe(`sha256:${createHash("sha256").update(csv).digest("hex")}`);
    const note = (name: string) => sites.schema.fields.find((x: { name: string }) => x.name === name).description ?? "";
    expect(note("location")).toMatch(/leading apostrophe/);
    expect(note("soil_series")).toMatch(/leading apostrophe/);
    expect(note("site")).not.toMatch(/apostrophe/);
    // Numbers are never guarded: a negative yield response in the plots stays a number.
    const plots = dp.resources.find((r: { name: string }) => r.name === "plots");
    expect(JSON.stringify(plots.schema)).not.toMatch(/apostrophe/);
  });

  it("the CSVs inside datapackage.zip are the served bytes, CRLF, guarded, and the version checksum is re-derivable from them", async () => {
    const res = await request(t.app).get(`${base}/datapackage.zip`).buffer(true).parse(binary).expect(200);
    const files = unzip(res.body as Buffer);
    const dp = JSON.parse(files.get("datapackage.json")!.toString("utf8"));
    const single = (await request(t.app).get(`${base}/resources/sites.csv`).buffer(true).parse(binary).expect(200)).body as Buffer;
    expect(files.get("data/sites.csv")!.equals(single)).toBe(true);
    const h = createHash("sha256");
    for (const r of dp.resources) {
      const csv = files.get(r.path)!;
      expectCsvFraming(csv);
      expect(r.hash).toBe(`sha256:${createHash("sha256").update(csv).digest("hex")}`);
      expect(r.bytes).toBe(csv.length);
    }
    for (const name of ["sites", "site_years", "soil_tests", "treatments", "plots", "summaries"])
      h.update(`${name}\n`).update(files.get(`data/${name}.csv`)!);
    expect(dp.plotbank.checksum).toBe(`sha256:${h.digest("hex")}`);
  });

  it("the rows API's CSV stream guards text cells and keeps numbers, with CRLF", async () => {
    const sites = await request(t.app).get(`${base}/sites?format=csv`).expect(200);
    expectCsvFraming(sites.text);
    expect(sites.text).toContain(`"'=HYPERLINK(""http://evil.test"",""open"")"`);
    expect(sites.text).toContain("'@SUM(1+1)");
    const responses = await request(t.app).get(`${base}/responses?format=csv`).expect(200);
    expectCsvFraming(responses.text);
    const rows = rowsOf(responses.text);
    const estimate = rows[0]!.indexOf("md");
    expect(estimate).toBeGreaterThan(-1);
    expect(
      rows.slice(1).some((r) => /^-\d/.test(r[estimate]!)),
      "a negative response is written as a number",
    ).toBe(true);
  });

  it("the validation-report CSV guards the values an uploader sent, with CRLF", async () => {
    await request(t.app).get("/api/v1/health").expect(200);
    const draft = await draftWithData(t.app, t.ctx, { plots: false });
    const bad = plotsCsv({ override: { "TB-01-2021/101": 'TB-01-2021,101,=cmd|"/C calc"!A0,CHK,3700,13.1' } });
    const res = await upload(draft.curatorAgent, draft.versionId, "plots", bad);
    expect(res.status).toBe(422);
    const csv = await draft.curatorAgent.get(`/api/v1/curation/versions/${draft.versionId}/reports/${res.body.reportId}.csv`).expect(200);
    expectCsvFraming(csv.text);
    const row = rowsOf(csv.text).find((r) => r[3] === "block");
    expect(row?.[4]).toBe(`'=cmd|"/C calc"!A0`);
  });

  it("the meta-analysis site-year CSV is CRLF without a BOM, and its negative numbers stay numbers", async () => {
    const res = await request(t.app)
      .get(`/api/v1/analyses/meta?dataset=${f.slug}&version=1.0.0&nutrient=P&format=csv`)
      .buffer(true)
      .parse(binary)
      .expect(200);
    expectCsvFraming(res.body as Buffer);
    const rows = rowsOf((res.body as Buffer).toString("utf8"));
    expect(rows[0]!.slice(0, 3)).toEqual(["id", "site_year", "site"]);
    const estimate = rows[0]!.indexOf("estimate");
    expect(rows.slice(1).some((r) => /^-\d/.test(r[estimate]!))).toBe(true);
  });

  it("streamCsv sends each batch before the next one is read (the stream stays a stream)", async () => {
    let release!: () => void;
    const firstArrived = new Promise<void>((resolve) => (release = resolve));
    async function* batches() {
      yield [{ id: 1, code: "=A1" }];
      // The second batch waits until the client has received the first: a writer that buffered would deadlock here.
      await firstArrived;
      yield [{ id: 2, code: "B" }];
    }
    const app = express().get("/csv", async (_req, res) => {
      await streamCsv(
        res,
        [
          { name: "id", value: (r: { id: number }) => r.id },
          { name: "code", value: (r: { code: string }) => r.code },
        ],
        batches(),
      );
    });
    const server = http.createServer(app).listen(0, "127.0.0.1");
    await new Promise((resolve) => server.once("listening", resolve));
    try {
      const { port } = server.address() as AddressInfo;
      const text = await new Promise<string>((resolve, reject) => {
        http
          .get({ port, host: "127.0.0.1", path: "/csv" }, (res) => {
            let body = "";
            res.on("data", (c: Buffer) => {
              body += c.toString("utf8");
              if (body.includes("'=A1")) release();
            });
            res.on("end", () => resolve(body));
          })
          .on("error", reject);
      });
      expect(text).toBe("id,code\r\n1,'=A1\r\n2,B\r\n");
    } finally {
      await new Promise((resolve) => server.close(resolve));
    }
  });
});

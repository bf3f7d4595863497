import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, plotsCsv, upload, versionFingerprint, type Fixture } from "./curation-fixtures";

/**
 * Property: a generated CSV upload — broken quoting, wrong types, huge fields, odd encodings, duplicate keys — never
 * gets a 5xx, and when it is rejected the draft is exactly as it was (a fingerprint over the version's row and every
 * row of its tables). Runs over real HTTP on a real database.
 */
let t: TestApp;
let f: Fixture;
beforeAll(async () => {
  t = await testApp({ uploadLimitBytes: 256 * 1024 });
  f = await draftWithData(t.app, t.ctx, { plots: false });
});
afterAll(() => t.close());

const base = plotsCsv();
const baseLines = base.trimEnd().split("\n");

type Mutation = (lines: string[]) => string[] | Buffer;
const oneLine = (lines: string[], i: number, change: (cells: string[]) => string[]) => {
  const out = [...lines];
  const at = 1 + (i % (out.length - 1));
  out[at] = change(out[at]!.split(",")).join(",");
  return out;
};
const mutations = (i: number, j: number, text: string): Mutation[] => [
  (l) => oneLine(l, i, (c) => c.map((v, k) => (k === j % c.length ? text : v))), // wrong type or odd value in one cell
  (l) => oneLine(l, i, (c) => c.map((v, k) => (k === j % c.length ? `"${v}` : v))), // unclosed quote
  (l) => oneLine(l, i, (c) => c.map((v, k) => (k === j % c.length ? `"${v}""x"y` : v))), // quotes inside a field
  (l) => oneLine(l, i, (c) => c.map((v, k) => (k === j % c.length ? "x".repeat(20_000 + (i % 50_000)) : v))), // huge field
  (l) => [...l, l[1 + (i % (l.length - 1))]!], // duplicate key
  (l) => oneLine(l, i, (c) => c.slice(0, j % c.length)), // short row
  (l) => oneLine(l, i, (c) => [...c, text]), // extra cell
  (l) => l.map((line) => line.replaceAll(",", ";")), // semicolons
  (l) => [l[0]!.split(",").reverse().join(","), ...l.slice(1)], // headers in the wrong order
  (l) => [l[0]!.replace("yield_kg_ha", text || "yield"), ...l.slice(1)], // unknown column
  (l) => Buffer.concat([Buffer.from([0xfe, 0xff]), Buffer.from(l.join("\n"), "utf16le")]), // UTF-16
  (l) => Buffer.from(l.join("\n").replace("TB-01", "TB-\u00e9\u00e9"), "latin1"), // Latin-1 bytes
  (l) => Buffer.from(l.join("\n") + "\u0000\u0000", "utf8"), // NUL bytes
  (l) => l.slice(0, 1 + (i % l.length)), // truncated file
  () => [], // empty file
  (l) => l.map((line) => line + "\r"), // CRLF line ends
];
const oddText = fc.oneof(
  fc.string({ maxLength: 20 }),
  fc.constantFrom("", "NA", "-1", "1e309", "NaN", "=cmd|' /C calc'!A0", "9999999", "13,5", "TB-99-2021", "ZZZ", '"', "\n", "😀", "0x10"),
);

describe("fuzzed CSV uploads", () => {
  it("never answer 5xx, and a rejected file changes nothing", async () => {
    let fingerprint = await versionFingerprint(t.ctx, f.versionId);
    let accepted = 0;
    let rejected = 0;
    await fc.assert(
      fc.asyncProperty(fc.nat(), fc.nat(), fc.nat(15), oddText, fc.boolean(), async (i, j, which, text, twice) => {
        let lines: string[] | Buffer = baseLines;
        const first = mutations(i, j, text)[which]!;
        lines = first(lines);
        if (twice && !Buffer.isBuffer(lines) && lines.length >= 2) lines = mutations(j, i, text)[(which + 3) % 16]!(lines);
        const body = Buffer.isBuffer(lines) ? lines : Buffer.from(lines.join("\n"), "utf8");
        const res = await upload(f.curatorAgent, f.versionId, "plots", body);
        expect(res.status, `${res.status} ${res.text.slice(0, 400)}`).toBeLessThan(500);
        const now = await versionFingerprint(t.ctx, f.versionId);
        if (res.status === 201) {
          accepted++;
          fingerprint = now;
        } else {
          rejected++;
          expect(res.headers["content-type"]).toMatch(/problem\+json/);
          expect(now, "a rejected upload changed the draft").toBe(fingerprint);
        }
      }),
      { numRuns: Number(process.env.FUZZ_UPLOAD_RUNS ?? 2_500), seed: 42, endOnFailure: true },
    );
    expect(rejected).toBeGreaterThan(0);
    console.log(`fuzzed uploads: ${accepted} accepted, ${rejected} rejected`);
  }, 1_800_000);
});

import fc from "fast-check";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { crops, nutrients, placements, soilTestClasses, tillages, trialFilterShape } from "@/schemas/filters";
import { seedDemo } from "@/datasets";
import { testApp, type TestApp } from "@/tests/support/test-app";

/**
 * Property: no query string, however odd, makes a filtered read answer 5xx; every refusal is problem+json that
 * names a parameter. Runs the real app on a real database holding the demo data.
 */
let t: TestApp;
beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000, tokenRatePerMinute: 1_000_000 });
  // On the demo data, so the filters really reach the SQL and the statistics.
  await seedDemo(t.ctx);
});
afterAll(() => t.close());

const filterNames = Object.keys(trialFilterShape);
const goodValues = [
  ...crops,
  ...nutrients,
  ...placements,
  ...soilTestClasses,
  ...tillages,
  "2019",
  "2024",
  "05-01",
  "30",
  "1.0.0",
  "latest",
];
const oddStrings = fc.oneof(
  fc.constantFrom(...goodValues),
  fc.string({ maxLength: 40 }),
  fc.stringMatching(/^[\d.,eE+-]{0,12}$/),
  fc.constantFrom("", " ", "NaN", "Infinity", "-1", "1e309", "%00", "😀", "'; DROP TABLE plots; --", "a".repeat(5000), "[]", "{}", "true"),
);
const paramName = fc.oneof(
  {
    weight: 8,
    arbitrary: fc.constantFrom(...filterNames, "effect", "method", "ci", "groupBy", "price", "cost", "units", "format", "limit", "cursor"),
  },
  { weight: 1, arbitrary: fc.string({ minLength: 1, maxLength: 12 }) },
);
const query = fc.array(fc.tuple(paramName, oddStrings), { maxLength: 6 });
const endpoints = ["/api/v1/responses", "/api/v1/observations", "/api/v1/site-years", "/api/v1/analyses/meta"];

describe("fuzzed query strings on every filter", () => {
  it("never answer 5xx, and a 400 names the parameter", async () => {
    await fc.assert(
      fc.asyncProperty(fc.constantFrom(...endpoints), query, async (endpoint, pairs) => {
        const qs = pairs.map(([k, v]) => `${encodeURIComponent(k)}=${encodeURIComponent(v)}`).join("&");
        const res = await request(t.app).get(`${endpoint}?${qs}`);
        expect(res.status, `${endpoint}?${qs} → ${res.status} ${res.text.slice(0, 300)}`).toBeLessThan(500);
        if (res.status === 400) {
          expect(res.headers["content-type"]).toMatch(/problem\+json/);
          expect(res.body.errors?.length ?? 0).toBeGreaterThan(0);
        }
      }),
      { numRuns: Number(process.env.FUZZ_QUERY_RUNS ?? 2500), seed: 20261202 },
    );
  }, 600_000);
});

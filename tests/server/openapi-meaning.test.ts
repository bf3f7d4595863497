import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cautionCodes } from "@/schemas/analysis";
import { testApp, type TestApp } from "@/tests/support/test-app";

/** The served OpenAPI document explains the tested-nutrient rule, the soil-test schemes and the caution codes. */
let t: TestApp;
let doc: {
  paths: Record<string, Record<string, { parameters?: { name: string; description?: string }[] }>>;
  components: { schemas: Record<string, { properties?: Record<string, { description?: string; enum?: string[] }> }> };
};
beforeAll(async () => {
  t = await testApp();
  doc = (await request(t.app).get("/api/v1/openapi.json").expect(200)).body;
});
afterAll(() => t.close());

describe("the OpenAPI document says what the answers mean", () => {
  it("describes nutrient= as the tested nutrients (carriers left out) and nutrientSupplied= as any amount", () => {
    const params = doc.paths["/api/v1/analyses/meta"]!.get!.parameters!;
    expect(params.find((p) => p.name === "nutrient")!.description).toMatch(/test.*carrier.*half/);
    expect(params.find((p) => p.name === "nutrientSupplied")!.description).toMatch(/any amount.*carriers included/);
    expect(doc.components.schemas.AnalysisProvenance!.properties!.nutrientRule!.description).toMatch(/rule/);
  });

  it("has the scheme shape, the built-in scheme list, and reported labels beside mapped classes", () => {
    const scheme = doc.components.schemas.SoilTestScheme!.properties!;
    for (const field of ["name", "analyte", "extractant", "unit", "classes", "thresholds", "source", "sourceStatus"])
      expect(scheme, field).toHaveProperty(field);
    expect(scheme.sourceStatus!.enum).toContain("from memory");
    expect(doc.paths["/api/v1/soil-test-schemes"]).toBeDefined();
    expect(doc.components.schemas.ResponseRow!.properties!.soilPReportedClass!.description).toMatch(/reported/);
  });

  it("lists every caution code", () => {
    expect(doc.components.schemas.Caution!.properties!.code!.enum).toEqual([...cautionCodes]);
  });
});

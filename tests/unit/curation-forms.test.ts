import { describe, expect, it } from "vitest";
import { toDatasetBody, initialValues } from "@/components/curation/dataset-form-values";
import { blankRow, fieldOf, renamesOf, rowsOf, withResourceFields } from "@/components/curation/dictionary-rows";
import { issuesUnder, serverFieldIssues, zodFieldIssues } from "@/components/curation/field-issues";
import { defaultTableSchema } from "@/datasets/default-table-schema";
import { ApiError } from "@/lib/api-error";
import { datasetCreate } from "@/schemas/curation";
import { tableSchemaDescriptor } from "@/schemas/table-schema";

describe("the dataset form against the shared contract", () => {
  const blank = initialValues(null);

  it("starts with the CC-BY-4.0 licence and maps each schema issue to its input", () => {
    expect(blank.licence).toBe("CC-BY-4.0");
    const body = toDatasetBody({
      ...blank,
      slug: "Not A Slug",
      contributors: [{ name: "Tallgrass Basin Agronomy Network", role: "creator", orcid: "1234", affiliation: "" }],
    });
    const parsed = datasetCreate.safeParse(body);
    expect(parsed.success).toBe(false);
    const issues = zodFieldIssues(parsed.error!);
    expect(Object.keys(issues).sort()).toEqual(["contributors.0.orcid", "crops", "description", "region", "slug", "title"]);
    expect(issues["contributors.0.orcid"]).toMatch(/ORCID/);
    expect(issuesUnder(issues, "contributors.0.")).toEqual({ orcid: issues["contributors.0.orcid"] });
  });

  it("drops blank optionals and splits keywords, so a filled form parses", () => {
    const body = toDatasetBody({
      ...blank,
      slug: "starter-placement",
      title: "Starter placement",
      crops: ["soybean"],
      region: "Tallgrass Basin",
      description: "Invented trials.",
      keywords: " starter, phosphorus ,, ",
      funding: "  ",
      contributors: [{ name: "A. Curator", role: "curator", orcid: " ", affiliation: "" }],
    });
    expect(body.keywords).toEqual(["starter", "phosphorus"]);
    expect(body.funding).toBeNull();
    expect(body.contributors).toEqual([{ name: "A. Curator", role: "curator" }]);
    expect(datasetCreate.safeParse(body).success).toBe(true);
  });

  it("server field errors (problem+json body.*) land on the same keys; others go above the buttons", () => {
    const err = new ApiError(
      400,
      { type: "about:blank", title: "Bad request", status: 400, errors: [{ field: "body.slug", message: "is taken" }] },
      "Bad request",
    );
    expect(serverFieldIssues(err)).toEqual({ slug: "is taken" });
    expect(serverFieldIssues(new ApiError(409, null, "Conflict here"))).toEqual({ "": "Conflict here" });
  });
});

describe("the data-dictionary rows", () => {
  const plots = defaultTableSchema().resources.plots!;

  it("round-trips every default field unchanged when nothing is edited", () => {
    const back = rowsOf(plots.fields).map(fieldOf);
    expect(back).toEqual(plots.fields);
  });

  it("an edit changes only what was edited and keeps the rest of the descriptor", () => {
    const rows = rowsOf(plots.fields);
    const i = rows.findIndex((r) => r.name === "vigour");
    rows[i] = { ...rows[i]!, unit: "score", maximum: "10", required: true };
    const next = withResourceFields(defaultTableSchema(), "plots", rows);
    const vigour = next.resources.plots!.fields.find((f) => f.name === "vigour")!;
    expect(vigour).toMatchObject({ unit: "score", constraints: { minimum: 1, maximum: 10, required: true } });
    expect(next.resources.plots!.primaryKey).toEqual(plots.primaryKey);
    expect(next.resources.sites).toEqual(defaultTableSchema().resources.sites);
    expect(tableSchemaDescriptor.safeParse(next).success).toBe(true);
  });

  it("a number cell holding text is reported at that cell's path by the shared schema", () => {
    const rows = rowsOf(plots.fields);
    rows[4] = { ...rows[4]!, minimum: "ten" };
    rows[0] = { ...rows[0]!, name: "9bad" };
    const parsed = tableSchemaDescriptor.safeParse(withResourceFields(defaultTableSchema(), "plots", rows));
    expect(parsed.success).toBe(false);
    const keys = Object.keys(zodFieldIssues(parsed.error!));
    expect(keys).toContain("resources.plots.fields.4.constraints.minimum");
    expect(keys).toContain("resources.plots.fields.0.name");
  });

  it("a save keeps the version's own soil-test schemes and measures beside the edited fields", () => {
    const scheme = { name: "lab-s", title: "A lab's sulfate-S classes", analyte: "S", unit: "ppm", classes: [] } as never;
    const measure = { name: "plant_height", title: "Plant height", unit: "cm", better: "higher", rating: false } as const;
    const descriptor = { ...defaultTableSchema(), soilTestSchemes: [scheme], measures: [measure] };
    const next = withResourceFields(descriptor, "plots", rowsOf(plots.fields));
    expect(next.soilTestSchemes).toEqual([scheme]);
    expect(next.measures).toEqual([measure]);
  });

  it("a stored field whose name cell changed is a rename from its stored name; a new row is not", () => {
    const rows = [...rowsOf([...plots.fields, { name: "seed_lot", type: "string" }]), { ...blankRow(), name: "seed_tag" }];
    const i = rows.findIndex((r) => r.name === "seed_lot");
    rows[i] = { ...rows[i]!, name: " seed_batch " };
    expect(renamesOf("plots", rows)).toEqual([{ resource: "plots", from: "seed_lot", to: "seed_batch", row: i }]);
    expect(renamesOf("plots", rowsOf(plots.fields))).toEqual([]);
  });

  it("enum categories follow the allowed values", () => {
    const siteYears = defaultTableSchema().resources.site_years!;
    const rows = rowsOf(siteYears.fields);
    const i = rows.findIndex((r) => r.name === "design");
    rows[i] = { ...rows[i]!, enumText: "RCBD, strip" };
    const design = fieldOf(rows[i]!);
    expect(design.constraints?.enum).toEqual(["RCBD", "strip"]);
    expect(design.categories?.map((c) => c.value)).toEqual(["RCBD", "strip"]);
  });
});

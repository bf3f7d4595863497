import { describe, expect, it } from "vitest";
import { z } from "zod";
import { defaultTableSchema } from "@/datasets/default-table-schema";
import { datasetCreate, submitBody, editorsBody } from "@/schemas/curation";
import { rowName } from "@/schemas/messages";
import { compileResource } from "@/server/services/ingest/field-values";

/** zod's own English wording starts like this; none of it may reach a person. */
const rawZod = /^(Too small|Too big|Invalid input|Invalid option|Expected|Unrecognized key)/;

function cellProblem(resource: "plots" | "site_years" | "soil_tests" | "treatments", field: string, raw: string) {
  const compiled = compileResource(defaultTableSchema().resources[resource]!, false).get(field)!;
  const parsed = compiled.parse(raw);
  if (parsed.ok) throw new Error(`${field} "${raw}" parsed`);
  return parsed.message;
}

describe("upload cell messages say the field, what was expected, what was found and how to fix it", () => {
  it("a number", () => {
    const message = cellProblem("plots", "yield_kg_ha", "n/a");
    expect(`${rowName("plots", { plot: "203", site_year: "TB-01-2021" })}: ${message}`).toBe(
      'Plot 203 of TB-01-2021: yield (yield_kg_ha) "n/a" is not a number of kg/ha; write digits only (e.g. 3650.5), or leave the cell empty for a missing plot',
    );
    expect(cellProblem("plots", "block", "two")).toMatch(/^block "two" is not a whole number; .*every row needs a value/);
    expect(cellProblem("plots", "yield_kg_ha", "30000")).toBe(
      "yield (yield_kg_ha) 30000 kg/ha is above the highest accepted value, 25000 kg/ha; check the value and its unit",
    );
  });

  it("an enum", () => {
    expect(cellProblem("site_years", "crop", "soya")).toMatch(
      /^crop "soya" is not one of the values this column takes: .*soybean.*; use one of them as written$/,
    );
  });

  it("a missing required value", () => {
    expect(cellProblem("plots", "treatment", "")).toBe("treatment is required but the cell is empty; fill it in");
  });

  it("a date", () => {
    expect(cellProblem("site_years", "planting_date", "12/05/2021")).toBe(
      'planting date "12/05/2021" is not a date; write it as YYYY-MM-DD, e.g. 2021-05-12',
    );
  });

  it("too short, from a dictionary's own constraint", () => {
    const compiled = compileResource({ fields: [{ name: "variety", type: "string", constraints: { minLength: 3 } }] }, false);
    const parsed = compiled.get("variety")!.parse("A1");
    expect(parsed).toEqual({ ok: false, message: 'variety "A1" is too short: at least 3 characters are needed; write it out in full' });
  });
});

describe("zod issues are worded for people, in one place", () => {
  it("too short: never zod's 'Too small: expected string …'", () => {
    const parsed = submitBody.safeParse({ changelog: "ok" });
    expect(parsed.success).toBe(false);
    expect(parsed.error!.issues[0]!.message).toBe("needs at least 3 characters, found 2; write a few more words");
  });

  it("a number, an enum, a missing field and unknown keys", () => {
    const schema = z.object({ rate: z.number(), placement: z.enum(["in-furrow", "2x2-band"]), name: z.string() }).strict();
    const parsed = schema.safeParse({ rate: "lots", placement: "sideways", extra: 1 });
    const messages = Object.fromEntries(parsed.error!.issues.map((i) => [i.path.join(".") || i.code, i.message]));
    expect(messages).toEqual({
      rate: 'expected a number, found "lots"; give a number here',
      placement: 'must be one of in-furrow, 2x2-band, found "sideways"; pick one of these',
      name: "is required but missing; fill it in",
      unrecognized_keys: '"extra" is not known here; remove it or check the spelling',
    });
  });

  it("a date and a format", () => {
    expect(z.iso.date().safeParse("12/05/2021").error!.issues[0]!.message).toBe(
      'expected a date, found "12/05/2021"; write it as YYYY-MM-DD, e.g. 2021-05-12',
    );
    // A schema's own message is kept.
    expect(editorsBody.safeParse({ email: "nobody" }).error!.issues[0]!.message).toBe("an e-mail address");
  });

  it("no shared contract answers with zod's own English", () => {
    const parsed = datasetCreate.safeParse({ slug: "A B", title: "", crops: [], contributors: [{}] });
    expect(parsed.success).toBe(false);
    for (const issue of parsed.error!.issues) expect(issue.message).not.toMatch(rawZod);
  });
});

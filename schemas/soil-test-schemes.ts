import { z } from "zod";
import { soilTestClasses } from "./filters";

/**
 * A soil-test interpretation scheme: how one lab, region or trial names its classes for one analyte and extractant,
 * where their limits lie (or that the classes are only as reported), and which class of our ordinal scale
 * (very_low … very_high) each label stands for, so that filters and groups work across datasets.
 */
const sourceStatuses = ["as published", "from memory", "common practice, no source", "invented for the demo"] as const;

export const soilTestScheme = z
  .object({
    name: z
      .string()
      .min(1)
      .max(80)
      .regex(/^[a-z0-9][a-z0-9._-]*$/, "lower case letters, digits and . _ -")
      .describe("Named in the soil_tests interpretation column"),
    title: z.string().min(1).max(200),
    analyte: z.string().min(1).max(10).describe("P, K, S …"),
    extractant: z.string().max(40).nullable().describe("e.g. Bray-P1, Mehlich-3, ammonium-acetate; null: any"),
    unit: z.string().min(1).max(20).describe("Unit of the thresholds, e.g. ppm"),
    classes: z
      .array(
        z.object({
          label: z.string().min(1).max(40).describe("The class as the scheme (and the trial) names it, e.g. medium"),
          scale: z.enum(soilTestClasses).describe("The class of our ordinal scale it stands for"),
        }),
      )
      .min(2)
      .max(10)
      .describe("In order, lowest first"),
    thresholds: z
      .union([z.literal("as reported"), z.array(z.number().finite())])
      .describe(
        'Upper limits (exclusive) of every class but the last, ascending, in `unit`; or "as reported" when the classes come without limits',
      ),
    source: z.string().min(1).max(500).describe("Where the scheme comes from"),
    sourceStatus: z
      .enum(sourceStatuses)
      .describe("as published, from memory (not checked against the source), common practice, no source, or invented for the demo"),
  })
  .superRefine((s, ctx) => {
    const labels = s.classes.map((c) => c.label.toLowerCase());
    labels.forEach((l, i) => {
      if (labels.indexOf(l) !== i)
        ctx.addIssue({ code: "custom", path: ["classes", i, "label"], message: `label "${s.classes[i]!.label}" appears twice` });
    });
    s.classes.forEach((c, i) => {
      const previous = s.classes[i - 1];
      if (previous && soilTestClasses.indexOf(c.scale) < soilTestClasses.indexOf(previous.scale)) {
        ctx.addIssue({
          code: "custom",
          path: ["classes", i, "scale"],
          message: `classes are lowest first, so ${c.label} cannot map below ${previous.label}`,
        });
      }
    });
    const thresholds = s.thresholds;
    if (Array.isArray(thresholds)) {
      if (thresholds.length !== s.classes.length - 1) {
        ctx.addIssue({
          code: "custom",
          path: ["thresholds"],
          message: `${s.classes.length} classes need ${s.classes.length - 1} thresholds, not ${thresholds.length}`,
        });
      }
      thresholds.forEach((t, i) => {
        if (i > 0 && t <= thresholds[i - 1]!) ctx.addIssue({ code: "custom", path: ["thresholds", i], message: "thresholds must ascend" });
      });
    }
  })
  .meta({ id: "SoilTestScheme" });

export type SoilTestScheme = z.infer<typeof soilTestScheme>;

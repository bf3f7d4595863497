import { z } from "zod";
import { builtInMeasureDefinitions, builtInMeasures, defaultMeasure } from "@/constants/measures";
import { line } from "./safe-text";

const listed = builtInMeasures.map((m) => `${m} (${builtInMeasureDefinitions[m].title}, ${builtInMeasureDefinitions[m].unit})`).join(", ");

/**
 * Which measure responses and analyses are about: a built-in one, or one a version's data dictionary adds (its
 * snake_case name; an unknown one is a 400 naming `measure`). Yield is the default, so older URLs keep their answer.
 */
export const measureParam = z
  .union([
    z.enum(builtInMeasures),
    line()
      .max(64)
      .regex(/^[a-z][a-z0-9_]*$/, "a built-in measure or a snake_case measure name"),
  ])
  .default(defaultMeasure)
  .describe(
    `What was measured: ${listed}; or a measure a dataset's data dictionary adds (GET …/versions/{semver}/schema lists them under measures). ` +
      "Responses are in the measure's unit; units= converts yield only.",
  );

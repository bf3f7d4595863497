import { z } from "zod";

export const problemLocation = z
  .object({
    field: z.string().optional(),
    file: z.string().optional(),
    row: z.number().int().optional(),
    column: z.string().optional(),
    value: z.string().optional(),
    message: z.string(),
  })
  .meta({ id: "ProblemLocation" });

/** RFC 9457 problem details, as every error answer of the API. */
export const problemSchema = z
  .object({
    type: z.string(),
    title: z.string(),
    status: z.number().int(),
    detail: z.string().optional(),
    instance: z.string().optional(),
    errors: z.array(problemLocation).optional(),
  })
  .loose()
  .meta({ id: "Problem" });

export type Problem = z.infer<typeof problemSchema>;

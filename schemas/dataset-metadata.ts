import { z } from "zod";

export type { TableSchemaDescriptor } from "./table-schema";

export const orcid = z
  .string()
  .regex(/^\d{4}-\d{4}-\d{4}-\d{3}[\dX]$/, "an ORCID iD looks like 0000-0002-1825-0097");

export const contributor = z
  .object({
    name: z.string().min(1).max(200),
    role: z.enum(["creator", "curator", "data_collector", "project_leader", "funder", "other"]),
    orcid: orcid.optional(),
    affiliation: z.string().max(200).optional(),
  })
  .meta({ id: "Contributor" });

export type Contributor = z.infer<typeof contributor>;

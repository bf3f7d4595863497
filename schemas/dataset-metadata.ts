import { z } from "zod";
import { line } from "./safe-text";

export type { TableSchemaDescriptor } from "./table-schema";

const orcid = line().regex(/^\d{4}-\d{4}-\d{4}-\d{3}[\dX]$/, "an ORCID iD looks like 0000-0002-1825-0097");

export const contributor = z
  .object({
    name: line().min(1).max(200),
    role: z.enum(["creator", "curator", "data_collector", "project_leader", "funder", "other"]),
    orcid: orcid.optional(),
    affiliation: line().max(200).optional(),
  })
  .meta({ id: "Contributor" });

export type Contributor = z.infer<typeof contributor>;

import type { CurationDataset, DatasetCreate } from "@/schemas/curation";
import type { Contributor } from "@/schemas/dataset-metadata";
import { crops } from "@/schemas/filters";

type Crop = (typeof crops)[number];
type Role = Contributor["role"];

export interface ContributorDraft {
  name: string;
  role: Role;
  orcid: string;
  affiliation: string;
}

export interface DatasetFormValues {
  slug: string;
  title: string;
  crops: Crop[];
  region: string;
  description: string;
  licence: string;
  keywords: string;
  contributors: ContributorDraft[];
  funding: string;
  methods: string;
}

export function initialValues(d: CurationDataset | null): DatasetFormValues {
  return {
    slug: d?.slug ?? "",
    title: d?.title ?? "",
    crops: d?.crops.filter((c): c is Crop => (crops as readonly string[]).includes(c)) ?? [],
    region: d?.region ?? "",
    description: d?.description ?? "",
    licence: d?.licence ?? "CC-BY-4.0",
    keywords: d?.keywords.join(", ") ?? "",
    contributors:
      d?.contributors.map((c) => ({ name: c.name, role: c.role, orcid: c.orcid ?? "", affiliation: c.affiliation ?? "" })) ?? [],
    funding: d?.funding ?? "",
    methods: d?.methods ?? "",
  };
}

/** Form strings → the shared contract's shape (blank optionals left out, keywords split on commas). */
export function toDatasetBody(v: DatasetFormValues): DatasetCreate {
  return {
    slug: v.slug.trim(),
    title: v.title.trim(),
    crops: v.crops,
    region: v.region.trim(),
    description: v.description.trim(),
    licence: v.licence.trim(),
    keywords: v.keywords
      .split(",")
      .map((k) => k.trim())
      .filter(Boolean),
    contributors: v.contributors.map((c) => ({
      name: c.name.trim(),
      role: c.role,
      ...(c.orcid.trim() ? { orcid: c.orcid.trim() } : {}),
      ...(c.affiliation.trim() ? { affiliation: c.affiliation.trim() } : {}),
    })),
    funding: v.funding.trim() || null,
    methods: v.methods.trim() || null,
  };
}

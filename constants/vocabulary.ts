/**
 * Plotbank's vocabulary: every fixed list of values the product stores, filters on or shows, with the words people
 * read for each. The database enums (db/schema/enums.ts), the zod contract (schemas/), the data dictionary, the
 * server's documents and the screens all take their values and labels from here, so a term is added or renamed in
 * one place. Plain constants only: db/schema imports this file, and so does the client bundle.
 */

// Trial terms (the trade's own words, as stored).

export const crops = ["soybean", "corn", "wheat"] as const;
export type Crop = (typeof crops)[number];
export const cropLabels: Record<Crop, string> = { soybean: "Soybean", corn: "Corn", wheat: "Wheat" };

/** Nutrients as applied; labels use the element symbols, as soil tests do (rates are given as oxides). */
export const nutrients = ["N", "P", "K", "S"] as const;
export type Nutrient = (typeof nutrients)[number];
export const nutrientLabels: Record<Nutrient, string> = { N: "N", P: "P", K: "K", S: "S" };

/** Placement terms of the trade, as stored. */
export const placements = [
  "in-furrow",
  "2x2-band",
  "broadcast",
  "broadcast-incorporated",
  "surface-band",
  "side-dress",
  "foliar",
  "deep-band",
] as const;
export type Placement = (typeof placements)[number];
export const placementLabels: Record<Placement, string> = {
  "in-furrow": "In-furrow (seed-placed)",
  "2x2-band": "2x2 band",
  broadcast: "Broadcast",
  "broadcast-incorporated": "Broadcast, incorporated",
  "surface-band": "Surface band",
  "side-dress": "Side-dress",
  foliar: "Foliar",
  "deep-band": "Deep band",
};

/** Ordered soil-test classes, lowest first. */
export const soilTestClasses = ["very_low", "low", "optimum", "high", "very_high"] as const;
export type SoilTestClass = (typeof soilTestClasses)[number];
export const soilTestClassLabels: Record<SoilTestClass, string> = {
  very_low: "Very low",
  low: "Low",
  optimum: "Optimum",
  high: "High",
  very_high: "Very high",
};

export const tillages = ["no-till", "strip-till", "reduced", "conventional"] as const;
export type Tillage = (typeof tillages)[number];
export const tillageLabels: Record<Tillage, string> = {
  "no-till": "No-till",
  "strip-till": "Strip-till",
  reduced: "Reduced",
  conventional: "Conventional",
};

// A version's resources (the files of its Data Package).

export const resourceNames = ["sites", "site_years", "soil_tests", "treatments", "plots", "summaries"] as const;
export type ResourceName = (typeof resourceNames)[number];
export const resourceTitles: Record<ResourceName, string> = {
  sites: "Sites",
  site_years: "Site-years",
  soil_tests: "Soil tests",
  treatments: "Treatments",
  plots: "Plots",
  summaries: "Treatment means",
};

// People and the states of a version.

export const roles = ["member", "curator", "reviewer", "admin"] as const;
export type Role = (typeof roles)[number];
export const roleLabels: Record<Role, string> = { member: "Member", curator: "Curator", reviewer: "Reviewer", admin: "Admin" };
/** Roles above a member: they curate or review, may hold write tokens, use the workbench and can be invited. */
export const staffRoles = ["curator", "reviewer", "admin"] as const satisfies readonly Role[];

export const versionStates = ["draft", "in_review", "published", "withdrawn"] as const;
export type VersionState = (typeof versionStates)[number];
export const versionStateLabels: Record<VersionState, string> = {
  draft: "Draft",
  in_review: "In review",
  published: "Published",
  withdrawn: "Withdrawn",
};

// Stored states with no words of their own on screen.

export const tokenScopes = ["read", "write"] as const;
export const emailTokenPurposes = ["verify", "reset", "invite"] as const;
export const doiStatuses = ["none", "pending", "registered", "failed"] as const;

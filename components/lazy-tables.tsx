import type { ComponentProps } from "react";
import { suspended } from "./lazy";
import type * as Tables from "./tables";

// Import the table components from here: they share one lazily loaded file with the table library.
const tables = () => import("./tables");
const label = "Loading the table…";

export const SiteYearTable = suspended<ComponentProps<typeof Tables.SiteYearTable>>(
  () => tables().then((m) => ({ default: m.SiteYearTable })),
  label,
);
export const DictionaryEditor = suspended<ComponentProps<typeof Tables.DictionaryEditor>>(
  () => tables().then((m) => ({ default: m.DictionaryEditor })),
  label,
);
export const ProblemReportTable = suspended<ComponentProps<typeof Tables.ProblemReportTable>>(
  () => tables().then((m) => ({ default: m.ProblemReportTable })),
  label,
);
export const VersionRowsGrid = suspended<ComponentProps<typeof Tables.VersionRowsGrid>>(
  () => tables().then((m) => ({ default: m.VersionRowsGrid })),
  label,
);
